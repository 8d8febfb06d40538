#!/usr/bin/env bash
# Installs what a fresh Debian 12 machine lacks for LaneBaseline: the native libraries OpenCV links
# (GTK 3), fonts for plot text, and headless Chromium for the report's browser test.
# Idempotent: packages already present are skipped, so repeated runs cost a second.
set -euo pipefail
# Set LANEBASELINE_NO_BROWSER=1 to skip Chromium (only the report's browser test needs it; containers skip it).
pkgs=(libgtk-3-0 fonts-dejavu-core)
[ "${LANEBASELINE_NO_BROWSER:-0}" = 1 ] || pkgs+=(chromium)
need=()
for pkg in "${pkgs[@]}"; do
  dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || need+=("$pkg")
done
if [ "${#need[@]}" -gt 0 ]; then
  SUDO=""
  [ "$(id -u)" = 0 ] || SUDO="sudo"
  echo "setup: installing ${need[*]}" >&2
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${need[@]}" >/dev/null
fi
[ "${SKIP_DOTNET_CHECK:-0}" = 1 ] || command -v dotnet >/dev/null || { echo "setup: the .NET 10 SDK is required (dotnet not on PATH)" >&2; exit 1; }
# Put `lanebaseline` on the PATH: pack the command line of this checkout as a .NET tool and install it for the user
# (docs/deploy.md). Set LANEBASELINE_NO_TOOL=1 to skip (e.g. machines that only run the tests).
root=$(cd "$(dirname "$0")/.." && pwd)
if [ "${LANEBASELINE_NO_TOOL:-0}" != 1 ] && [ -f "$root/src/LaneBaseline.Cli/LaneBaseline.Cli.csproj" ] \
   && command -v dotnet >/dev/null && dotnet --list-sdks 2>/dev/null | grep -q .; then
  feed="$root/out/tool"
  rm -rf "$feed"
  echo "setup: packing the lanebaseline tool" >&2
  dotnet pack "$root/src/LaneBaseline.Cli" -c Release -o "$feed" -nologo -v q >/dev/null
  # The same version number on every pack: drop the installed copy and the cached package so this build is installed.
  dotnet tool uninstall --global lanebaseline >/dev/null 2>&1 || true
  # The pack is two packages: lanebaseline.VERSION (a pointer) and lanebaseline.linux-x64.VERSION (the precompiled
  # tool); drop both from the cache.
  rm -rf "${NUGET_PACKAGES:-$HOME/.nuget/packages}/lanebaseline" "${NUGET_PACKAGES:-$HOME/.nuget/packages}/lanebaseline.linux-x64"
  nupkg=$(ls "$feed"/lanebaseline.[0-9]*.nupkg | head -n 1)
  version=$(basename "$nupkg" .nupkg); version=${version#lanebaseline.}
  dotnet tool install --global lanebaseline --version "$version" --add-source "$feed" --ignore-failed-sources >/dev/null
  tools="$HOME/.dotnet/tools"
  if [ "$(id -u)" = 0 ] && [ -d /usr/local/bin ]; then
    ln -sf "$tools/lanebaseline" /usr/local/bin/lanebaseline
  elif ! command -v lanebaseline >/dev/null; then
    echo "setup: add $tools to your PATH (export PATH=\"\$PATH:$tools\") to run lanebaseline" >&2
  fi
  echo "setup: $("$tools/lanebaseline" --version)" >&2
fi
