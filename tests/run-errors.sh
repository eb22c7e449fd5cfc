#!/bin/sh
# Every broken description in errors/ must give exactly its expected error
# line(s) on stderr, exit status 2, and write nothing.  An expected line
# "FILE:LINE:COL: [code]" matches on place and message code only
# (match-messages.py); a whole line must match word for word.  NAME.args, when
# present, holds extra command-line arguments, one a line (--set ...).
# usage: run-errors.sh GLASSPLOT ERRORS_DIR
set -u
tool=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
dir=$2
match=$(cd "$(dirname "$0")" && pwd)/match-messages.py
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
passed=0
failed=0
cd "$dir" || exit 1
for input in *.yaml; do
	name=${input%.yaml}
	set --
	if [ -f "$name.args" ]; then
		while IFS= read -r arg; do
			set -- "$@" "$arg"
		done <"$name.args"
	fi
	"$tool" build "$input" -o "$work/out" "$@" >"$work/stdout" \
		2>"$work/stderr"
	status=$?
	if [ "$status" -ne 2 ]; then
		echo "FAIL $name: exit status $status, expected 2"
		failed=$((failed + 1))
	elif ! python3 "$match" "$name.expected" "$work/stderr" \
		>"$work/diff"; then
		echo "FAIL $name: messages differ"
		cat "$work/diff"
		failed=$((failed + 1))
	elif [ -e "$work/out" ] || [ -s "$work/stdout" ]; then
		echo "FAIL $name: something was written"
		failed=$((failed + 1))
	else
		passed=$((passed + 1))
	fi
	rm -rf "$work/out"
done
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ] && [ "$passed" -ge 60 ]
