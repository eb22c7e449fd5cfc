#!/bin/sh
# Every Gerber file of every sample read by the project's strict reader
# (gerber-lint: the Gerber Layer Format Specification 2024.05 subset the
# writer uses, 4.10.3 on every contour, the side each is seen from stated),
# both sets: the viewer's and the coated faces'.
# usage: run-sample-gerbers.sh GLASSPLOT GERBER_LINT SAMPLES_DIR
set -u
tool=$1
lint=$2
dir=$3
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
files=0
failed=0
for input in "$dir"/*.yaml; do
	name=$(basename "$input" .yaml)
	if ! "$tool" build "$input" -o "$work/$name" -q --faces both; then
		echo "FAIL $name: the build failed"
		failed=$((failed + 1))
		continue
	fi
	for gbr in "$work/$name"/*.gbr; do
		files=$((files + 1))
		if ! "$lint" "$gbr"; then
			echo "FAIL $name: $(basename "$gbr")"
			failed=$((failed + 1))
		fi
	done
done
echo "$files files read, $failed failed"
[ "$failed" -eq 0 ] && [ "$files" -ge 1 ]
