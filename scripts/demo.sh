#!/usr/bin/env bash
# The main job end to end on the bundled sample frames (Quendaspar Ridge proving loop) with the default preset:
# detect lanes, score them against the exact truth, audit them, and write one HTML report.
# Outputs go to out/demo/ (ignored by git). Usage: bash scripts/demo.sh [extra detect options]
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
dotnet build src/LaneBaseline.Cli -c Release -nologo -v q >/dev/null
lb() { dotnet src/LaneBaseline.Cli/bin/Release/net10.0/lanebaseline.dll "$@"; }
out=out/demo
rm -rf "$out"; mkdir -p "$out"

lb detect --frames sample-frames -o "$out/baseline.lanes.jsonl" --config default --overlays "$out/overlays" "$@"
lb audit --pred "$out/baseline.lanes.jsonl" --camera sample-frames/camera.json --design-speed-kmh 80 \
  -o "$out/findings.jsonl" >"$out/audit.txt" || true
lb score --truth sample-frames/truth.lanes.jsonl --pred baseline="$out/baseline.lanes.jsonl" \
  --camera sample-frames/camera.json --json "$out/score.json" --csv "$out/frames.csv"
lb bench --frames sample-frames --size 1280x720,640x360 --threads 1 --max-frames 12 --warmup 3 --passes 1 \
  --json "$out/bench.json" >"$out/bench.txt"
lb report --score "$out/score.json" --audit "$out/findings.jsonl" --bench "$out/bench.json" -o "$out/report.html" \
  --frames sample-frames --truth sample-frames/truth.lanes.jsonl --pred baseline="$out/baseline.lanes.jsonl"
echo
echo "report:   $out/report.html"
echo "overlays: $out/overlays/"
