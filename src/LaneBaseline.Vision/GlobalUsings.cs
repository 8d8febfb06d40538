// The OpenCV-free geometry kernel (fits, solves, homographies) lives in Core; every Vision file may use it.
global using LaneBaseline.Core.Geometry;
