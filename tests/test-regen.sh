#!/bin/sh
# Scripted regeneration: reproducible outputs, SOURCE_DATE_EPOCH, checksums,
# overrides seen through diff, output subsets, JSON summary, depfiles.
# usage: test-regen.sh GLASSPLOT SOURCE_DIR
set -u
tool=$(cd "$(dirname "$1")" && pwd)/$(basename "$1")
src=$(cd "$2" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
passed=0
failed=0
ok() { passed=$((passed + 1)); }
bad() { echo "FAIL: $*"; failed=$((failed + 1)); }
check() { if "$@"; then ok; else bad "$*"; fi; }

# Two builds of every sample are byte-identical; sha256sum -c passes.
for sample in "$src"/samples/*.yaml; do
	name=$(basename "$sample" .yaml)
	"$tool" build -q "$sample" -o "$work/$name-1" || bad "$name: build 1"
	"$tool" build -q "$sample" -o "$work/$name-2" || bad "$name: build 2"
	check diff -r "$work/$name-1" "$work/$name-2"
	check sh -c "cd '$work/$name-1' && sha256sum --quiet -c checksums.sha256"
	# without SOURCE_DATE_EPOCH no output carries a date
	if grep -q CreationDate "$work/$name-1"/*.gbr; then
		bad "$name: a Gerber file has a date without SOURCE_DATE_EPOCH"
	else
		ok
	fi
done

# SOURCE_DATE_EPOCH supplies every date (GNU date gives the reference).
epoch=1780000000
stamp=$(date -u -d "@$epoch" +%Y-%m-%dT%H:%M:%S+00:00)
SOURCE_DATE_EPOCH=$epoch "$tool" build -q "$src/samples/panel-2x16.yaml" \
	-o "$work/dated" || bad "dated build"
for gbr in "$work/dated"/*.gbr; do
	check grep -qx "%TF.CreationDate,$stamp\*%" "$gbr"
done
if [ -f "$work/dated/proof.pdf" ]; then
	check sh -c "pdfinfo '$work/dated/proof.pdf' | grep -q '$(date -u -d "@$epoch" '+%a %b %e %H:%M:%S %Y')'"
fi
SOURCE_DATE_EPOCH=soon "$tool" build -q "$src/samples/panel-2x16.yaml" \
	-o "$work/nodate" 2>/dev/null
check test $? -eq 2

# An override of the cell pitch moves each segment by the change times its
# cell index (5 dot columns a cell) and changes nothing else on the front.
plain=$src/tests/data/plain-matrix.yaml
"$tool" diff "$plain" --set blocks.main.cell_pitch=3.16 >"$work/diff.txt"
check test $? -eq 1
check awk '
	/^front-ito SEG[0-9]+: moved by / {
		n = substr($2, 4) + 0; sub(",", "", $5)
		want = 0.01 * int((n - 1) / 5)
		if ($5 + 0 != want || $6 != "0") { print "bad shift: " $0; bad = 1 }
		moved++
		next
	}
	/^back-ito COM[0-9]+: reshaped/ { next }
	/ differences$/ { next }
	{ print "unexpected: " $0; bad = 1 }
	END { if (moved != 75) { print "moved " moved ", expected 75"; bad = 1 }
	      exit bad }' "$work/diff.txt"
"$tool" diff "$plain" "$plain" >/dev/null
check test $? -eq 0
"$tool" build -q "$plain" -o "$work/p1"
"$tool" build -q "$plain" -o "$work/p2" --set blocks.main.cell_pitch=3.16
check cmp -s "$work/p1/front-outline.gbr" "$work/p2/front-outline.gbr"
check cmp -s "$work/p1/back-outline.gbr" "$work/p2/back-outline.gbr"
if cmp -s "$work/p1/front-ito.gbr" "$work/p2/front-ito.gbr"; then
	bad "front-ito.gbr did not change with the pitch"
else
	ok
fi
"$tool" diff "$plain" --set blocks.main.cell_pitch=3.16 --pdf "$work/d.pdf" >/dev/null
check sh -c "pdfinfo '$work/d.pdf' | grep -q '^Pages: *1'"

# Only what is asked.
"$tool" build -q "$plain" -o "$work/only" --only gerber
check test "$(ls "$work/only" | wc -l)" -eq 5
"$tool" build -q "$plain" -o "$work/bad" --only gerbers 2>"$work/err"
check test $? -eq 2
check grep -q "unknown kind of output 'gerbers'" "$work/err"
"$tool" build "$plain" -o "$work/json" --json >"$work/summary.json"
check sh -c "jq -e '.nets.commons == 16 and .nets.segments == 80 and .nets.pixels == 1280' '$work/summary.json' >/dev/null"
"$tool" build -q "$plain" -o "$work/json" --set glass.revision=B --json >"$work/summary.json"
check sh -c "jq -e '.overrides == [\"glass.revision=B\"] and .revision == \"B\"' '$work/summary.json' >/dev/null"
check test "$("$tool" build -q "$plain" -o "$work/quiet")" = ""

# Dependency file for make.
"$tool" build -q "$plain" -o "$work/dep" --depfile "$work/dep.d"
check grep -q "^$work/dep/front-ito.gbr .*: $plain" "$work/dep.d"
printf 'all: %s/dep/front-ito.gbr\ninclude %s/dep.d\n' "$work" "$work" >"$work/Makefile"
check sh -c "make -s -q -f '$work/Makefile' -C '$work' all"

# The dependency file is staged before the outputs are committed: when it
# cannot be written (no such folder, a device) the run fails with one line
# and the folder keeps its old set.  Replaced whole, no temporary left.
for depfile in "$work/no-such-folder/dep.d" /dev/full; do
	"$tool" build -q "$plain" -o "$work/dep" --set glass.revision=B \
		--depfile "$depfile" 2>"$work/err"
	check test $? -eq 2
	check test "$(wc -l <"$work/err")" -eq 1
	check grep -q "^glassplot: build: --depfile $depfile: " "$work/err"
	check grep -qx "design-rule report: TEST-REGEN revision A" "$work/dep/report.txt"
	check sh -c "cd '$work/dep' && sha256sum --quiet -c checksums.sha256"
	check test -z "$(ls -A "$work/dep" | grep -v '^[a-z]')"
done
check cmp -s "$work/p1/front-ito.gbr" "$work/dep/front-ito.gbr"
"$tool" build -q "$plain" -o "$work/dep" --depfile "$work/dep.d" \
	--only gerber
check grep -q "^$work/dep/front-ito.gbr .*checksums.sha256: $plain" "$work/dep.d"
check test -z "$(ls -A "$work" | grep '^\.dep\.d')"

# diff --pdf also writes its page whole under a temporary name: a second
# run replaces the first page, and no temporary is left.
"$tool" diff "$plain" --set blocks.main.cell_pitch=3.17 --pdf "$work/d.pdf" >/dev/null
check sh -c "pdfinfo '$work/d.pdf' | grep -q '^Pages: *1'"
check test -z "$(ls -A "$work" | grep '^\.d\.pdf')"
"$tool" diff "$plain" --set blocks.main.cell_pitch=3.17 --pdf /dev/full \
	>/dev/null 2>"$work/err"
check test $? -eq 2
check grep -q "^glassplot: diff: --pdf /dev/full: not a plain file" "$work/err"
check test -c /dev/full

# -v gives the time of each stage; check runs no writers (no "writing"
# stage) and writes nothing.
"$tool" build "$plain" -o "$work/stages" -v >/dev/null 2>"$work/err"
check test "$(grep -cE '^glassplot: (loading|layout|checks|writing): [0-9]+\.[0-9]{3} s$' "$work/err")" -eq 4
mkdir "$work/empty"
(cd "$work/empty" && "$tool" check "$plain" -v >/dev/null 2>"$work/err")
check test "$(grep -cE '^glassplot: (loading|layout|checks): [0-9]+\.[0-9]{3} s$' "$work/err")" -eq 3
check test "$(grep -c 'writing' "$work/err")" -eq 0
check test -z "$(ls -A "$work/empty")"

# An output folder that cannot be written: exit 2, one line, nothing kept.
: >"$work/file-in-the-way"
"$tool" build -q "$plain" -o "$work/file-in-the-way" 2>"$work/err"
check test $? -eq 2
check test "$(wc -l <"$work/err")" -eq 1

echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
