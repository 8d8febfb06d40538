#!/usr/bin/env bash
# The project's test command: set up a fresh machine, run every test with a plain `dotnet test`,
# and finish with the line "N passed, N failed". Fails when a test fails or when no test ran.
set -uo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh || exit 1
log=$(mktemp)
dotnet test LaneBaseline.sln 2>&1 | tee "$log"
status=${PIPESTATUS[0]}
passed=0; failed=0; summaries=0
while IFS= read -r line; do
  p=$(sed -nE 's/.*Passed: *([0-9]+).*/\1/p' <<<"$line")
  f=$(sed -nE 's/.*Failed: *([0-9]+).*/\1/p' <<<"$line")
  passed=$((passed + ${p:-0})); failed=$((failed + ${f:-0})); summaries=$((summaries + 1))
done < <(grep -E '^(Passed|Failed)! +- +Failed: +[0-9]+, +Passed: +[0-9]+' "$log")
rm -f "$log"
echo "$passed passed, $failed failed"
if [ "$summaries" -eq 0 ] || [ "$passed" -eq 0 ]; then echo "no test ran" >&2; exit 1; fi
if [ "$failed" -ne 0 ] || [ "$status" -ne 0 ]; then exit 1; fi
exit 0
