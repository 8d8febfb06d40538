#!/usr/bin/env bash
# Refits the confidence calibration of the default preset (docs/detect.md, "Confidence calibration"):
# renders the calibration validation set (tuning seed 4242, 500 stills at 960x540, every render condition in turn),
# runs `tune --calibrate` on it with configs/presets/default.yaml (its old calibration ignored) and writes the
# fitted `calibration:` section back into configs/presets/default.yaml. Deterministic: the same build gives the
# same file for any --threads. Never fit on the held-out seed (27182) used to measure it.
# Usage: bash scripts/calibrate-default.sh            (about 1 minute on 2 cores)
set -euo pipefail
cd "$(dirname "$0")/.."
dotnet build src/LaneBaseline.Cli -c Release -nologo -v q >/dev/null
lb() { dotnet src/LaneBaseline.Cli/bin/Release/net10.0/lanebaseline.dll "$@"; }
val=out/calibration/validation
rm -rf "$val"; mkdir -p "$val"
lb render --out "$val" --seed 4242 --count 500 --size 960x540 --threads 2 >/dev/null
lb tune --calibrate --frames "$val" --truth "$val/truth.lanes.jsonl" --config configs/presets/default.yaml \
  -o configs/presets/default.yaml --threads 2
# the preset is embedded in the assembly: rebuild so `--config default` uses the new calibration
dotnet build src/LaneBaseline.Cli -c Release -nologo -v q >/dev/null
