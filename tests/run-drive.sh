#!/bin/sh
# 'glassplot drive' end to end: exit 0 when the fluid can be switched,
# 1 when no Vop can (Alt & Pleshko 1974 limit), 2 on bad input; stderr as
# expected; the Vop convention stated in the report.
# usage: run-drive.sh GLASSPLOT DRIVE_DIR
set -u
tool=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
cd "$2" || exit 1
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
failed=0
check() { # name expected-status
	"$tool" drive "$1.yaml" >"$work/stdout" 2>"$work/stderr"
	status=$?
	if [ "$status" -ne "$2" ]; then
		echo "FAIL $1: exit status $status, expected $2"
		failed=$((failed + 1))
	fi
	if [ -e "$1.expected" ]; then
		expected="$1.expected"
	else
		expected=/dev/null
	fi
	if ! cmp -s "$work/stderr" "$expected"; then
		echo "FAIL $1: messages differ"
		diff "$expected" "$work/stderr" | sed 's/^/    /'
		failed=$((failed + 1))
	fi
}
check feasible 0
grep -q "not a peak-to-peak value" "$work/stdout" ||
	{ echo "FAIL feasible: Vop convention not stated"; failed=$((failed + 1)); }
grep -q "^  Vop  *[0-9.]* V at 25 °C (recommended" "$work/stdout" ||
	{ echo "FAIL feasible: no recommended Vop"; failed=$((failed + 1)); }
# the ordering spec names a whole-number bias, and the ladder is listed in
# the usual driver order
grep -q "^  bias  *1/5$" "$work/stdout" ||
	{ echo "FAIL feasible: ordering spec bias is not 1/5"; failed=$((failed + 1)); }
grep -q "^  V3 = 2/a  *3.221 V (0.4000 Vop)$" "$work/stdout" ||
	{ echo "FAIL feasible: V3 is not 2/a Vop"; failed=$((failed + 1)); }
grep -q "^  1/5  .* chosen$" "$work/stdout" ||
	{ echo "FAIL feasible: 1/5 not marked chosen"; failed=$((failed + 1)); }
check infeasible 1
grep -q "EMPTY" "$work/stdout" ||
	{ echo "FAIL infeasible: window not marked empty"; failed=$((failed + 1)); }
check bad 2
[ -s "$work/stdout" ] && { echo "FAIL bad: printed a report"; failed=$((failed + 1)); }
"$tool" drive --json feasible.yaml >"$work/json" || failed=$((failed + 1))
grep -q '"feasible": true' "$work/json" ||
	{ echo "FAIL json: no feasible flag"; failed=$((failed + 1)); }
echo "$failed failed"
[ "$failed" -eq 0 ]
