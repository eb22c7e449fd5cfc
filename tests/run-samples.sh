#!/bin/sh
# The program itself on every sample: builds each twice into fresh folders
# and checks exit status 0, that files were written, and that the two runs
# are byte-identical (DESIGN.md §3, determinism).  Under the 'valgrind'
# test setup (GP_VALGRIND set) each sample is built once, to save time.
# usage: run-samples.sh GLASSPLOT SAMPLES_DIR
set -u
tool=$1
dir=$2
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
passed=0
failed=0
for input in "$dir"/*.yaml; do
	name=$(basename "$input" .yaml)
	runs="1 2"
	[ -n "${GP_VALGRIND:-}" ] && runs=1
	for run in $runs; do
		"$tool" build "$input" -o "$work/$name-$run" -q
		status=$?
		if [ "$status" -ne 0 ]; then
			echo "FAIL $name: run $run exit status $status"
			failed=$((failed + 1))
			continue 2
		fi
	done
	if [ -z "$(ls "$work/$name-1")" ]; then
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
