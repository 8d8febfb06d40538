#!/usr/bin/env bash
# Memory soak (issue #8): peak resident memory of score, audit and detect as the number of frames grows, one run
# each, one thread. Not part of the test suite (it takes tens of minutes); quote its table, not a timed unit test.
# Usage: bash scripts/soak.sh [score/audit frame counts...]   default: 1000 10000 100000
# Detect runs on the bundled sample frames repeated under distinct names (symbolic links) at 1,000 and 10,000
# frames (LANEBASELINE_SOAK_DETECT="1000 10000" to change, "" to skip). Work files go to out/soak/ (ignored by git).
set -euo pipefail
cd "$(dirname "$0")/.."
command -v /usr/bin/time >/dev/null || { echo "needs GNU time: apt-get install -y time" >&2; exit 2; }
counts=("${@:-1000 10000 100000}"); counts=(${counts[*]})
detect_counts=(${LANEBASELINE_SOAK_DETECT-1000 10000})
dotnet build src/LaneBaseline.Cli -c Release -nologo -v q >/dev/null
dotnet build tests/LaneBaseline.Benchmarks -c Release -nologo -v q >/dev/null
lb=src/LaneBaseline.Cli/bin/Release/net10.0/lanebaseline.dll
out=out/soak; mkdir -p "$out"
peak() { # command... -> prints "peak_MiB seconds"
  /usr/bin/time -f "%M %e" -o "$out/time.txt" "$@" >/dev/null 2>"$out/last.err" || { cat "$out/last.err" >&2; exit 1; }
  awk '{printf "%.1f MiB  %s s\n", $1/1024, $2}' "$out/time.txt"
}
printf '%-8s %8s  %s\n' command frames "peak RSS, wall time"
for n in "${counts[@]}"; do
  d="$out/data-$n"
  [ -f "$d/pred.lanes.jsonl" ] || dotnet tests/LaneBaseline.Benchmarks/bin/Release/net10.0/LaneBaseline.Benchmarks.dll soak-data "$n" "$d"
  printf '%-8s %8s  %s\n' score "$n" "$(peak dotnet "$lb" score --truth "$d/truth.lanes.jsonl" --pred "$d/pred.lanes.jsonl" --bootstrap 1000 --threads 1 --json "$d/score.json")"
  printf '%-8s %8s  %s\n' audit "$n" "$(peak dotnet "$lb" audit --pred "$d/pred.lanes.jsonl" --baseline "$d/truth.lanes.jsonl" --threads 1 -o "$d/findings.jsonl")"
done
for n in "${detect_counts[@]}"; do
  f="$out/frames-$n"
  if [ ! -d "$f" ]; then
    mkdir -p "$f"; mapfile -t src < <(find "$PWD/sample-frames" -name '*.jpg' | sort)
    for ((i = 0; i < n; i++)); do ln -s "${src[$((i % ${#src[@]}))]}" "$f/$(printf '%06d' "$i").jpg"; done
  fi
  printf '%-8s %8s  %s\n' detect "$n" "$(peak dotnet "$lb" detect --frames "$f" -o "$out/detect-$n.lanes.jsonl" --threads 1)"
done
