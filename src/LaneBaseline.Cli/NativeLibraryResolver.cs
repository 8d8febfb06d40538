using System.Reflection;
using System.Runtime.InteropServices;

namespace LaneBaseline.Cli;

/// <summary>
/// Lets a Native AOT or hand-assembled deployment keep the native OpenCV wrapper library beside the executable:
/// when <c>libOpenCvSharpExtern.so</c> (or <c>OpenCvSharpExtern.dll</c>) is in the executable's folder it is loaded
/// from there; otherwise the runtime's ordinary probing (the NuGet <c>runtimes/RID/native</c> layout of a
/// framework-dependent or single-file build) is left alone. See docs/deploy.md.
/// </summary>
internal static class NativeLibraryResolver
{
    private static int installed;

    public static void Install()
    {
        if (Interlocked.Exchange(ref installed, 1) == 1)
        {
            return;
        }

        NativeLibrary.SetDllImportResolver(typeof(OpenCvSharp.Cv2).Assembly, Resolve);
    }

    private static IntPtr Resolve(string libraryName, Assembly assembly, DllImportSearchPath? searchPath)
    {
        if (!libraryName.Contains("OpenCvSharpExtern", StringComparison.Ordinal))
        {
            return IntPtr.Zero;
        }

        foreach (string file in new[] { "libOpenCvSharpExtern.so", "libOpenCvSharpExtern.dylib", "OpenCvSharpExtern.dll" })
        {
            string path = Path.Combine(AppContext.BaseDirectory, file);
            if (File.Exists(path) && NativeLibrary.TryLoad(path, out IntPtr handle))
            {
                return handle;
            }
        }

        return IntPtr.Zero;
    }
}
