#!/bin/sh
# The proof of every sample, through the tool: two runs give the same bytes
# (cmp); pdfinfo's page count is the "n of n" of the last title block;
# every page has the same size; no date without SOURCE_DATE_EPOCH, and the
# given one with it.
# usage: test-proof.sh GLASSPLOT SOURCE_DIR
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

for sample in "$src"/samples/*.yaml; do
	name=$(basename "$sample" .yaml)
	"$tool" build -q "$sample" -o "$work/$name-1" --only proof ||
		bad "$name: build 1"
	"$tool" build -q "$sample" -o "$work/$name-2" --only proof ||
		bad "$name: build 2"
	pdf=$work/$name-1/proof.pdf
	check cmp "$pdf" "$work/$name-2/proof.pdf"
	pages=$(pdfinfo "$pdf" | sed -n 's/^Pages: *//p')
	last=$(pdftotext -f "$pages" -l "$pages" "$pdf" - |
		grep -E "^[0-9]+ of [0-9]+$")
	check test "$last" = "$pages of $pages"
	sizes=$(pdfinfo -f 1 -l "$pages" "$pdf" | grep -E "^Page +[0-9]+ size:" |
		sed 's/^Page *[0-9]* size: *//' | sort -u | wc -l)
	check test "$sizes" -eq 1
	if grep -q CreationDate "$pdf"; then
		bad "$name: the proof has a date without SOURCE_DATE_EPOCH"
	else
		ok
	fi
done

# 1700000000 s after the epoch is 2023-11-14 22:13:20 UTC
SOURCE_DATE_EPOCH=1700000000 "$tool" build -q "$src/samples/panel-2x16.yaml" \
	-o "$work/dated" --only proof || bad "dated build"
check sh -c "pdfinfo '$work/dated/proof.pdf' | grep -q 'CreationDate: *Tue Nov 14 22:13:20 2023 UTC'"
check sh -c "pdftotext -f 1 -l 1 '$work/dated/proof.pdf' - | grep -qx 2023-11-14"

echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
