#!/bin/sh
# Every broken description in errors/ must give exactly its expected error
# line(s) on stderr, exit status 2, and write nothing.  An expected line
# "FILE:LINE:COL: [code]" matches on place and message code only
# (matches, below); any other line must match word for word.  NAME.args, when
# present, holds extra command-line arguments, one a line (--set ...).
# Under the 'valgrind' test setup (GP_VALGRIND set) every eighth case is run,
# in name order, so memcheck sees each stage's error paths within CI's time;
# the sanitizer run takes every case.
# usage: run-errors.sh GLASSPLOT ERRORS_DIR
set -u
tool=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
dir=$2
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

# Do the lines of $2 match those of $1?  An expected line that ends in
# "[code]" after its place matches an actual line with the same start and
# the same code at its end, whatever the wording between.
matches() {
	awk 'NR == FNR { want[FNR] = $0; n = FNR; next }
	{
		m++; got = $0; w = want[FNR]
		if (got == w) next
		if (match(w, /\[[a-z0-9-]+\]$/)) {
			head = substr(w, 1, RSTART - 1); code = substr(w, RSTART)
			if (substr(got, 1, length(head)) == head &&
			    substr(got, length(got) - length(code)) == " " code)
				next
		}
		bad = 1
	}
	END { exit (bad || m != n) }' "$1" "$2"
}

passed=0
failed=0
cd "$dir" || exit 1
index=0
for input in *.yaml; do
	name=${input%.yaml}
	index=$((index + 1))
	[ -n "${GP_VALGRIND:-}" ] && [ $((index % 8)) -ne 1 ] && continue
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
	elif ! matches "$name.expected" "$work/stderr"; then
		echo "FAIL $name: messages differ"
		diff "$name.expected" "$work/stderr" | sed 's/^/    /'
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
least=60
[ -n "${GP_VALGRIND:-}" ] && least=12
[ "$failed" -eq 0 ] && [ "$passed" -ge "$least" ]
