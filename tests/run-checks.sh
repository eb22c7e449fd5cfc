#!/bin/sh
# Every description in checks/ has one planted defect (or none): 'glassplot
# check' must print exactly the finding lines of NAME.expected, exit 1 when
# one is an error and 0 otherwise; with --strict a warning gives 1 too.
# Every sample must give no error.
# usage: run-checks.sh GLASSPLOT CHECKS_DIR SAMPLES_DIR
set -u
tool=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
dir=$2
samples=$(cd "$3" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
passed=0
failed=0
fail() {
	echo "FAIL $1"
	failed=$((failed + 1))
}
cd "$dir" || exit 1
for input in *.yaml; do
	name=${input%.yaml}
	"$tool" check "$input" >"$work/stdout" 2>"$work/stderr"
	status=$?
	grep -E '^(error|warning) ' "$work/stdout" >"$work/found"
	want=0
	grep -q '^error ' "$name.expected" && want=1
	strict=$want
	grep -q '^warning ' "$name.expected" && strict=1
	if ! cmp -s "$work/found" "$name.expected"; then
		fail "$name: findings differ"
		diff "$name.expected" "$work/found" | sed 's/^/    /'
	elif [ "$status" -ne "$want" ]; then
		fail "$name: exit status $status, expected $want"
	else
		"$tool" check --strict "$input" >/dev/null 2>&1
		status=$?
		if [ "$status" -ne "$strict" ]; then
			fail "$name: --strict exit status $status, expected $strict"
		else
			passed=$((passed + 1))
		fi
	fi
done
for input in "$samples"/*.yaml; do
	"$tool" check "$input" >"$work/stdout" 2>"$work/stderr"
	status=$?
	if [ "$status" -ne 0 ] || grep -q '^error ' "$work/stdout"; then
		fail "sample $(basename "$input"): errors found"
		grep '^error ' "$work/stdout" | head -5 | sed 's/^/    /'
	else
		passed=$((passed + 1))
	fi
done
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ] && [ "$passed" -ge 6 ]
