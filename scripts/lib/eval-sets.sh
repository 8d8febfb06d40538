# Shared by scripts/eval-conditions.sh and scripts/eval-camera.sh (sourced, not run): the conditions evaluated and
# the rendered set of one condition with its four-boundary truth. The caller defines `lb` (runs the CLI).

# Conditions in table order ("clean" renders with --conditions none).
EVAL_CONDITIONS="clean shadows traffic night rain glare worn-paint wet-night sodium-dusk low-sun heavy-wear"

# eval_render_set DIR SEED COUNT SIZE CONDITION
# Renders COUNT stills of CONDITION with SEED at SIZE into DIR/frames (skipped when DIR/frames/truth.lanes.jsonl
# exists) and writes DIR/truth4.lanes.jsonl: the truth with only the lanes of slots -2, -1, +1, +2.
eval_render_set() {
  local d=$1 seed=$2 count=$3 size=$4 cond=$5
  [ "$cond" = clean ] && cond=none
  if [ ! -f "$d/frames/truth.lanes.jsonl" ]; then
    lb render -o "$d/frames" --seed "$seed" --count "$count" --size "$size" --conditions "$cond" >/dev/null 2>&1
  fi
  python3 - "$d/frames/truth.lanes.jsonl" "$d/truth4.lanes.jsonl" <<'PY'
import json, sys
with open(sys.argv[1]) as f, open(sys.argv[2], "w") as o:
    for line in f:
        r = json.loads(line)
        r["lanes"] = [l for l in r["lanes"] if abs(l.get("slot", 0)) in (1, 2)]
        o.write(json.dumps(r) + "\n")
PY
}
