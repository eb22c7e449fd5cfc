#!/usr/bin/env python3
"""The public header compiles on its own as ISO C11 and as ISO C++11,
pedantic, with every warning an error; and the library exports exactly
the functions it declares, as glassplot.map lists them.

Usage: check-header.py CC CXX LIBDIR SHARED_LIBRARY
"""
import os
import re
import subprocess
import sys
import tempfile

# Uses a little of everything the header declares, so that a declaration
# C or C++ cannot read fails here.
PROGRAM = r'''#include "glassplot.h"
int main(void)
{
	struct gp_diag *diag = gp_diag_create();
	struct gp_design *design = gp_design_load("x.yaml", 0, 0, diag);
	struct gp_build *build = design ? gp_build_create(design, diag) : 0;
	const struct gp_build *view = build;
	struct gp_outputs *outputs = view ? gp_build_render(view, diag) : 0;
	size_t size = 0;
	const void *data = outputs ? gp_outputs_find(outputs, "pins.csv", &size)
				   : 0;
	int status = (view ? gp_build_check_status(view, false) : 2) +
		     (data != 0) + (gp_build_check_text(view) != 0);
	gp_outputs_destroy(outputs);
	gp_build_destroy(build);
	gp_design_destroy(design);
	gp_diag_destroy(diag);
	return status + (gp_version()[0] == 0);
}
'''

COMPILES = [
    ('C11', 'c', ['-std=c11', '-pedantic-errors', '-Wall', '-Wextra',
                  '-Werror', '-Wstrict-prototypes']),
    ('C++11', 'cpp', ['-std=c++11', '-pedantic-errors', '-Wall', '-Wextra',
                      '-Werror', '-x', 'c++']),
]


def compile_header(cc, cxx, libdir):
    failed = []
    with tempfile.TemporaryDirectory() as work:
        source = os.path.join(work, 'use.c')
        with open(source, 'w') as f:
            f.write(PROGRAM)
        for name, lang, flags in COMPILES:
            compiler = cc if lang == 'c' else cxx
            cmd = compiler.split() + flags + ['-fsyntax-only', '-I', libdir,
                                              source]
            run = subprocess.run(cmd, capture_output=True, text=True)
            if run.returncode != 0:
                failed.append(f'glassplot.h as {name}:\n{run.stderr}')
    return failed


def declared(libdir):
    text = open(os.path.join(libdir, 'glassplot.h'), encoding='utf-8').read()
    return set(re.findall(r'GP_EXPORT[^;(]*?\b(gp_\w+)\s*\(', text, re.S))


def mapped(libdir):
    text = open(os.path.join(libdir, 'glassplot.map'), encoding='utf-8').read()
    text = re.sub(r'/\*.*?\*/', '', text, flags=re.S)
    body = text.split('global:')[1].split('local:')[0]
    return set(name.strip() for name in body.split(';') if name.strip())


def exported(library):
    out = subprocess.run(['nm', '-D', '--defined-only', library],
                         capture_output=True, text=True, check=True).stdout
    names = set()
    for line in out.splitlines():
        fields = line.split()
        if len(fields) == 3 and fields[1] in 'TDBRWV':
            names.add(fields[2].split('@')[0])
    return names


def main(cc, cxx, libdir, library):
    failed = compile_header(cc, cxx, libdir)
    header, listed, shipped = declared(libdir), mapped(libdir), exported(library)
    for what, names in (('declared in glassplot.h but not in glassplot.map',
                         header - listed),
                        ('in glassplot.map but not declared', listed - header),
                        ('exported but not declared', shipped - header),
                        ('declared but not exported', header - shipped)):
        if names:
            failed.append(f'{what}: {", ".join(sorted(names))}')
    for line in failed:
        print(line)
    print(f'{len(header)} public functions; {len(failed)} problems')
    return 1 if failed else 0


if __name__ == '__main__':
    sys.exit(main(*sys.argv[1:5]))
