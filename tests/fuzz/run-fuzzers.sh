#!/bin/sh
# Runs every libFuzzer harness for a time budget, side by side (one core
# each), from the kept corpus, the past findings, the samples and the
# broken descriptions; fails on any finding.  New inputs go to a scratch
# folder, never into the repository.
# usage: tests/fuzz/run-fuzzers.sh BUILD_DIR [SECONDS_PER_HARNESS]
# BUILD_DIR was set up with: CC=clang meson setup BUILD_DIR -Dfuzzing=true
#   -Db_sanitize=address,undefined -Db_lundef=false
set -u
build=$1
seconds=${2:-60}
root=$(cd "$(dirname "$0")/../.." && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
harnesses="load build"
for harness in $harnesses; do
	mkdir -p "$work/$harness/new" "$work/$harness/findings"
	# an input slower than 30 s is a finding (a hang); merely slow
	# inputs are not reported (the harness skips the large designs)
	( "$build/tests/fuzz/fuzz-$harness" -max_total_time="$seconds" \
		-timeout=30 -rss_limit_mb=2048 -report_slow_units=1000 \
		-max_len=65536 -print_final_stats=1 \
		-artifact_prefix="$work/$harness/findings/" \
		"$work/$harness/new" "$root/tests/fuzz/corpus-$harness" \
		"$root/tests/fuzz/regressions" \
		"$root/samples" "$root/tests/errors" \
		>"$work/$harness/log" 2>&1
	  echo $? >"$work/$harness/status" ) &
done
wait
status=0
for harness in $harnesses; do
	rc=$(cat "$work/$harness/status")
	runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$work/$harness/log")
	echo "fuzz-$harness: ${runs:-?} executions in ${seconds} s, exit status $rc"
	found=$(ls "$work/$harness/findings" | grep -E '^(crash|leak|timeout|oom)-')
	if [ "$rc" -ne 0 ] || [ -n "$found" ]; then
		status=1
		tail -n 60 "$work/$harness/log"
		for f in "$work/$harness/findings"/*; do
			[ -e "$f" ] || continue
			echo "finding $(basename "$f") (base64; fix it, then add it to tests/fuzz/regressions/):"
			base64 "$f"
		done
	fi
done
exit $status
