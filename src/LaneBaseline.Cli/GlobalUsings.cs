// Every output file goes through Core's AtomicFile (temporary sibling, then rename; in place for FIFOs and devices).
global using LaneBaseline.Core.IO;
