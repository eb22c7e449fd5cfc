#!/bin/sh
# The program itself on every sample: builds each twice into fresh folders
# and checks exit status 0, that files were written, and that the two runs
# are byte-identical (DESIGN.md §3, determinism).  Under the 'valgrind'
# test setup (GP_VALGRIND set) each sample is built once, two samples at a
# time (valgrind runs one thread; the machine has two cores).
# usage: run-samples.sh GLASSPLOT SAMPLES_DIR
set -u
tool=$1
dir=$2
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
runs="1 2"
[ -n "${GP_VALGRIND:-}" ] && runs=1

# Build sample $1 into $work/NAME-RUN for each run; the status goes to
# $work/NAME.status.
build_sample() {
	name=$(basename "$1" .yaml)
	for run in $runs; do
		"$tool" build "$1" -o "$work/$name-$run" -q
		status=$?
		if [ "$status" -ne 0 ]; then
			echo "run $run exit status $status" >"$work/$name.status"
			return
		fi
	done
	: >"$work/$name.status"
}

jobs=0
for input in "$dir"/*.yaml; do
	if [ -n "${GP_VALGRIND:-}" ]; then
		build_sample "$input" &
		jobs=$((jobs + 1))
		[ "$jobs" -ge 2 ] && { wait; jobs=0; }
	else
		build_sample "$input"
	fi
done
wait

passed=0
failed=0
for input in "$dir"/*.yaml; do
	name=$(basename "$input" .yaml)
	if [ -s "$work/$name.status" ] || [ ! -e "$work/$name.status" ]; then
		echo "FAIL $name: $(cat "$work/$name.status" 2>/dev/null)"
		failed=$((failed + 1))
	elif [ -z "$(ls "$work/$name-1")" ]; then
		echo "FAIL $name: nothing written"
		failed=$((failed + 1))
	elif [ -z "${GP_VALGRIND:-}" ] &&
		! diff -r "$work/$name-1" "$work/$name-2" >/dev/null; then
		echo "FAIL $name: two runs differ"
		failed=$((failed + 1))
	else
		passed=$((passed + 1))
	fi
done
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ] && [ "$passed" -ge 1 ]
