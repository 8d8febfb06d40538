#!/usr/bin/env bash
# Per-condition accuracy and confidence of the default preset on rendered frames (docs/detect.md, "Per condition").
# Renders a VALIDATION set (seed 2718, the only one used while tuning the detector) and a HELD-OUT set (seed 6113,
# never used for tuning) for each condition, runs `detect` with the default preset (no --camera), scores it against
# the four-boundary truth (slots -2, -1, +1, +2) and prints one table per set:
#   F1@0.50, precision of lanes with score >= 0.5, and the expected calibration error of `score` (10 equal bins).
# Usage: bash scripts/eval-conditions.sh [--count N] [--size WxH] [--config PRESET] [--out DIR] [--sets validation,held-out]
# Needs python3 (table arithmetic only). Outputs go to out/eval-conditions/ (ignored by git).
set -euo pipefail
cd "$(dirname "$0")/.."
count=30 size=1280x720 config=default out=out/eval-conditions sets=validation,held-out
while [ $# -gt 0 ]; do
  case "$1" in
    --count) count=$2; shift 2 ;;
    --size) size=$2; shift 2 ;;
    --config) config=$2; shift 2 ;;
    --out) out=$2; shift 2 ;;
    --sets) sets=$2; shift 2 ;;
    *) echo "eval-conditions: unknown option $1" >&2; exit 2 ;;
  esac
done
command -v python3 >/dev/null || { echo "eval-conditions: python3 is needed for the table" >&2; exit 1; }
dotnet build src/LaneBaseline.Cli -c Release -nologo -v q >/dev/null
lb() { dotnet src/LaneBaseline.Cli/bin/Release/net10.0/lanebaseline.dll "$@"; }
. scripts/lib/eval-sets.sh
conditions=$EVAL_CONDITIONS
mkdir -p "$out"
for set in ${sets//,/ }; do
  case "$set" in
    validation) seed=2718 ;;
    held-out) seed=6113 ;;
    *) echo "eval-conditions: unknown set $set" >&2; exit 2 ;;
  esac
  for c in $conditions; do
    d="$out/$set/$c"
    eval_render_set "$d" "$seed" "$count" "$size" "$c"
    lb detect --frames "$d/frames" -o "$d/pred.lanes.jsonl" --config "$config" --threads 2 >/dev/null 2>&1
    lb score --truth "$d/truth4.lanes.jsonl" --pred "$d/pred.lanes.jsonl" --json "$d/score.json" --bootstrap 0 >/dev/null 2>&1
  done
  echo "== $set (seed $seed, $count frames per condition, $size, preset $config) =="
  python3 - "$out/$set" $conditions <<'PY'
import json, sys
root, conds = sys.argv[1], sys.argv[2:]
print(f"{'condition':<12} {'F1@0.50':>8} {'P(s>=0.5)':>10} {'n(s>=0.5)':>10} {'ECE':>6} {'lanes':>6}")
tot = {"tp": 0, "fp": 0, "fn": 0, "tp5": 0, "n5": 0, "ece_w": 0.0, "n": 0}
for c in conds:
    s = json.load(open(f"{root}/{c}/score.json"))
    t = s["iou_f1"]["thresholds"]["0.50"]
    sweep = {round(r["min_score"], 2): r for r in s["confidence_sweep"]}
    scores = []
    for line in open(f"{root}/{c}/pred.lanes.jsonl"):
        scores += [l.get("score", 1.0) for l in json.loads(line)["lanes"]]
    # ECE (10 equal-width bins, Naeini et al. 2015) as `score` computes it on lanes matched at IoU 0.50
    ece = s["calibration"]["ece"] if s.get("calibration") and s["calibration"].get("ece") is not None else float("nan")
    n = len(scores)
    r5 = sweep[0.5]; n5 = r5["tp"] + r5["fp"]
    p5 = r5["tp"] / n5 if n5 else float("nan")
    print(f"{c:<12} {t['f1']:8.3f} {p5:10.3f} {n5:10d} {ece:6.3f} {n:6d}")
    for key, v in (("tp", t["tp"]), ("fp", t["fp"]), ("fn", t["fn"]), ("tp5", r5["tp"]), ("n5", n5), ("n", n)):
        tot[key] += v
    tot["ece_w"] += ece * n
f1 = 2 * tot["tp"] / max(1, 2 * tot["tp"] + tot["fp"] + tot["fn"])
print(f"{'all':<12} {f1:8.3f} {tot['tp5'] / max(1, tot['n5']):10.3f} {tot['n5']:10d} {tot['ece_w'] / max(1, tot['n']):6.3f} {tot['n']:6d}")
print("(ECE 'all' is the lane-weighted mean of the per-condition ECEs)")
PY
done
