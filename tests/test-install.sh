#!/bin/sh
# meson install --destdir puts every file in its usual place; both man
# pages render; the installed pkg-config file lets a program link.
# usage: test-install.sh MESON BUILD_DIR SANITIZE
set -u
meson=$1
build=$2
sanitize=$3
dest=$(mktemp -d)
trap 'rm -rf "$dest"' EXIT
passed=0
failed=0
check() { if "$@"; then passed=$((passed + 1)); else echo "FAIL: $*"; failed=$((failed + 1)); fi; }

"$meson" install -C "$build" --destdir "$dest" --quiet >/dev/null ||
	{ echo "FAIL: meson install"; exit 1; }
prefix=$(find "$dest" -path '*/bin/glassplot' | sed 's|/bin/glassplot$||')
check test -x "$prefix/bin/glassplot"
check test -f "$prefix/include/glassplot.h"
check test -n "$(find "$prefix" -name 'libglassplot.so*' | head -1)"
pc=$(find "$prefix" -name glassplot.pc | head -1)
check test -f "$pc"
check test -f "$prefix/share/man/man1/glassplot.1"
check test -f "$prefix/share/man/man5/glassplot.5"
check test -f "$prefix/share/bash-completion/completions/glassplot"
check test -f "$prefix/share/glassplot/samples/panel-2x16.yaml"
for page in 1 5; do
	check sh -c "MANWIDTH=80 man -l '$prefix/share/man/man$page/glassplot.$page' 2>&1 | grep -q '^NAME'"
done
check bash -n "$prefix/share/bash-completion/completions/glassplot"

# a small program against the installed library
cat >"$dest/probe.c" <<'PROBE'
#include <glassplot.h>
#include <stdio.h>
int main(void)
{
	struct gp_diag *diag = gp_diag_create();
	puts(gp_version());
	gp_diag_destroy(diag);
	return 0;
}
PROBE
flags=$(PKG_CONFIG_PATH=$(dirname "$pc") pkg-config \
	--define-variable=prefix="$prefix" --cflags --libs glassplot)
extra=
[ "$sanitize" = none ] || extra="-fsanitize=$sanitize"
libdir=$(PKG_CONFIG_PATH=$(dirname "$pc") pkg-config \
	--define-variable=prefix="$prefix" --variable=libdir glassplot)
check cc $extra -o "$dest/probe" "$dest/probe.c" $flags -Wl,-rpath,"$libdir"
version=$("$dest/probe")
check test "$version" = "$("$prefix/bin/glassplot" --version | cut -d' ' -f2)"

echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
