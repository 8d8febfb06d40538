#!/usr/bin/env bash
# Accuracy of detect with and without the rendered camera file, per condition (docs/detect.md, "With a camera file").
# Renders the HELD-OUT set (seed 6113, never used for tuning; --seed 2718 gives the validation set) for each condition,
# with the rendering and truth filter shared with eval-conditions.sh (scripts/lib/eval-sets.sh), runs the default preset three
# ways (no --camera; --camera with metric.metresPerPx 0, i.e. the camera's vanishing point and the trapezoid;
# --camera with the metric bird's-eye view) and scores each against the four-boundary truth (slots -2, -1, +1, +2):
# F1@0.50 / precision / recall, then the precision of lanes with score >= 0.5.
# Usage: bash scripts/eval-camera.sh [--count N] [--size WxH] [--seed S] [--out DIR]
# Needs python3 (table arithmetic only). Outputs go to out/eval-camera/ (ignored by git). LB=path/to/lanebaseline.dll
# uses an existing build instead of building Release.
set -euo pipefail
cd "$(dirname "$0")/.."
count=30 size=1280x720 seed=6113 out=out/eval-camera
while [ $# -gt 0 ]; do
  case "$1" in
    --count) count=$2; shift 2 ;;
    --size) size=$2; shift 2 ;;
    --seed) seed=$2; shift 2 ;;
    --out) out=$2; shift 2 ;;
    *) echo "eval-camera: unknown option $1" >&2; exit 2 ;;
  esac
done
command -v python3 >/dev/null || { echo "eval-camera: python3 is needed for the table" >&2; exit 1; }
if [ -z "${LB:-}" ]; then
  dotnet build src/LaneBaseline.Cli -c Release -nologo -v q >/dev/null
  LB=src/LaneBaseline.Cli/bin/Release/net10.0/lanebaseline.dll
fi
lb() { dotnet "$LB" "$@"; }
. scripts/lib/eval-sets.sh
conditions=$EVAL_CONDITIONS
mkdir -p "$out"
printf 'metric:\n  metresPerPx: 0\n' > "$out/trapezoid.yaml"
for c in $conditions; do
  d="$out/$c"
  eval_render_set "$d" "$seed" "$count" "$size" "$c"
  lb detect --frames "$d/frames" -o "$d/none.lanes.jsonl" --threads 2 >/dev/null 2>&1
  lb detect --frames "$d/frames" -o "$d/trapezoid.lanes.jsonl" --camera "$d/frames/camera.json" --config "$out/trapezoid.yaml" --threads 2 >/dev/null 2>&1
  lb detect --frames "$d/frames" -o "$d/metric.lanes.jsonl" --camera "$d/frames/camera.json" --threads 2 >/dev/null 2>&1
  for s in none trapezoid metric; do
    lb score --truth "$d/truth4.lanes.jsonl" --pred "$d/$s.lanes.jsonl" --json "$d/$s.score.json" --bootstrap 0 >/dev/null 2>&1
  done
done
case "$seed" in 6113) set=held-out ;; 2718) set=validation ;; *) set=rendered ;; esac
echo "== $set (seed $seed, $count frames per condition, $size, preset default): F1@0.50 / precision / recall =="
python3 - "$out" $conditions <<'PY'
import json, sys
root, conds = sys.argv[1], sys.argv[2:]
systems = ["none", "trapezoid", "metric"]
print(f"{'condition':<12}" + "".join(f"{s:>24}" for s in systems))
tot = {s: [0, 0, 0] for s in systems}
def cell(tp, fp, fn):
    p = tp / (tp + fp) if tp + fp else 0.0
    r = tp / (tp + fn) if tp + fn else 0.0
    f = 2 * p * r / (p + r) if p + r else 0.0
    return f"{f:.3f} / {p:.3f} / {r:.3f}"
for c in conds:
    row = f"{c:<12}"
    for s in systems:
        t = json.load(open(f"{root}/{c}/{s}.score.json"))["iou_f1"]["thresholds"]["0.50"]
        tp, fp, fn = t["tp"], t["fp"], t["fn"]
        for i, v in enumerate((tp, fp, fn)):
            tot[s][i] += v
        row += f"{cell(tp, fp, fn):>24}"
    print(row)
print(f"{'overall':<12}" + "".join(f"{cell(*tot[s]):>24}" for s in systems))
# Precision of lanes with score >= 0.5 (the scorer's confidence sweep at 0.50) and how many there are.
print()
print(f"{'P(s>=0.5)':<12}" + "".join(f"{s:>24}" for s in systems))
tot5 = {s: [0, 0] for s in systems}
def cell5(tp, n):
    return f"{tp / n if n else float('nan'):.3f} of {n}"
for c in conds:
    row = f"{c:<12}"
    for s in systems:
        sweep = {round(r["min_score"], 2): r for r in json.load(open(f"{root}/{c}/{s}.score.json"))["confidence_sweep"]}
        tp, n = sweep[0.5]["tp"], sweep[0.5]["tp"] + sweep[0.5]["fp"]
        tot5[s][0] += tp
        tot5[s][1] += n
        row += f"{cell5(tp, n):>24}"
    print(row)
print(f"{'overall':<12}" + "".join(f"{cell5(*tot5[s]):>24}" for s in systems))
PY
