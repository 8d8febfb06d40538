#!/usr/bin/env bash
# Refits the confidence calibration of the default preset (docs/detect.md, "Confidence calibration"):
# renders the calibration validation set (tuning seed 4242 at 960x540: 400 stills of the default condition mix plus 50 of
# each opt-in hard condition: wet-night, sodium-dusk, low-sun, heavy-wear),
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
# the default condition mix, plus the opt-in hard conditions one at a time; keys get their part's folder
lb render -o "$val/mix" --seed 4242 --count 400 --size 960x540 --threads 2 >/dev/null
: > "$val/truth.lanes.jsonl"
sed 's#"frame":"#"frame":"mix/#' "$val/mix/truth.lanes.jsonl" >> "$val/truth.lanes.jsonl"
for c in wet-night sodium-dusk low-sun heavy-wear; do
  lb render -o "$val/$c" --seed 4242 --count 50 --size 960x540 --conditions "$c" --threads 2 >/dev/null
  sed "s#\"frame\":\"#\"frame\":\"$c/#" "$val/$c/truth.lanes.jsonl" >> "$val/truth.lanes.jsonl"
done
lb tune --calibrate --frames "$val" --truth "$val/truth.lanes.jsonl" --config configs/presets/default.yaml \
  -o configs/presets/default.yaml --threads 2
# the preset is embedded in the assembly: rebuild so `--config default` uses the new calibration
dotnet build src/LaneBaseline.Cli -c Release -nologo -v q >/dev/null
