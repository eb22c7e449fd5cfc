#!/usr/bin/env python3
"""The pin matrix agrees with the firmware map and the pad table, both ways.

For every sample: builds it, reads pin-matrix.csv and pins.csv with
Python's csv module (RFC 4180), and compiles a probe against glass-map.h
(cc -std=c11 -Wall -Wextra -Werror -pedantic) that prints every dot of
every block and every element of the element table as
"label,common,common_pin,segment_pin".  Then:

- header to matrix: every dot and element is named in the matrix cell
  where its segment pin's row crosses its common's column;
- matrix to header: every label in a cell is a dot or element of the
  header with that segment pin and that common;
- every common pin's row names itself in its own column, and the matrix's
  pins and nets are the rows of pins.csv.

Usage: pin-matrix-agree.py GLASSPLOT SAMPLES_DIR
"""
import csv
import os
import re
import shutil
import subprocess
import sys
import tempfile

BLOCK = re.compile(r"/\* Block '([^']*)': (\d+) line\(s\) of (\d+) cell\(s\), "
                   r"(\d+) x (\d+) dots each\.\n.*?\n"
                   r"static inline bool (\w+)_dot\(", re.S)


def read_csv(path):
    with open(path, newline='', encoding='utf-8') as f:
        return list(csv.reader(f))


def probe_source(header_text):
    prefix = re.search(r'struct (\w+)_drive \{', header_text).group(1)
    blocks = BLOCK.findall(header_text)
    lines = ['#include "glass-map.h"', '#include <stdio.h>',
             'int main(void)', '{', f'\tstruct {prefix}_drive d;']
    for name, nlines, cells, across, down, function in blocks:
        label = f'{name}:' if len(blocks) > 1 else ''
        lines += [
            f'\tfor (int l = 0; l < {nlines}; l++)',
            f'\tfor (int k = 0; k < {cells}; k++)',
            f'\tfor (int r = 0; r < {down}; r++)',
            f'\tfor (int x = 0; x < {across}; x++) {{',
            f'\t\tif (!{function}_dot(l, k, r, x, &d)) return 1;',
            f'\t\tprintf("{label}R%dC%d,%d,%d,%d\\n", l * {down} + r + 1,',
            f'\t\t       k * {across} + x + 1, d.common, d.common_pin,',
            '\t\t       d.segment_pin);',
            '\t}']
    if f'struct {prefix}_element {{' in header_text:
        lines += [
            f'\tstruct {prefix}_element e;',
            f'\tfor (int i = 0; {prefix}_element(i, &d, &e); i++)',
            '\t\tprintf("%s,%d,%d,%d\\n", e.name, d.common, d.common_pin,',
            '\t\t       d.segment_pin);']
    lines += ['\treturn 0;', '}']
    return '\n'.join(lines) + '\n'


def check(glassplot, sample, work, failures):
    name = os.path.basename(sample)
    out = os.path.join(work, name)
    r = subprocess.run([glassplot, 'build', sample, '-o', out, '-q'],
                       capture_output=True, text=True)
    if r.returncode != 0:
        failures.append(f'{name}: build exit {r.returncode}: {r.stderr}')
        return
    header = open(os.path.join(out, 'glass-map.h'), encoding='utf-8').read()
    with open(os.path.join(out, 'probe.c'), 'w', encoding='utf-8') as f:
        f.write(probe_source(header))
    r = subprocess.run(['cc', '-std=c11', '-Wall', '-Wextra', '-Werror',
                        '-pedantic', '-o', os.path.join(out, 'probe'),
                        os.path.join(out, 'probe.c')],
                       capture_output=True, text=True, cwd=out)
    if r.returncode != 0:
        failures.append(f'{name}: the probe does not compile: {r.stderr}')
        return
    r = subprocess.run([os.path.join(out, 'probe')], capture_output=True,
                       text=True)
    if r.returncode != 0:
        failures.append(f'{name}: the probe fails ({r.returncode})')
        return
    lit = set()
    for line in r.stdout.splitlines():
        label, common, common_pin, segment_pin = line.rsplit(',', 3)
        lit.add((label, int(common), int(segment_pin)))

    matrix = read_csv(os.path.join(out, 'pin-matrix.csv'))
    pins = read_csv(os.path.join(out, 'pins.csv'))
    heading = matrix[0]
    commons = [int(c[3:]) for c in heading[2:]]
    if heading[:2] != ['pin', 'net'] or \
            commons != list(range(1, len(commons) + 1)):
        failures.append(f'{name}: pin-matrix.csv heading {heading}')
        return
    pad_rows = [(row[0], row[4]) for row in pins[1:]]
    matrix_rows = [(row[0], row[1]) for row in matrix[1:]]
    if pad_rows != matrix_rows:
        failures.append(f'{name}: the matrix rows are not the pins of '
                        'pins.csv')
    in_matrix = set()
    for row in matrix[1:]:
        pin, net = int(row[0]), row[1]
        for k, cell in zip(commons, row[2:]):
            if net.startswith('COM'):
                want = net if k == int(net[3:]) else ''
                if cell != want:
                    failures.append(f'{name}: common pin {pin} shows '
                                    f'{cell!r} under COM{k}')
                continue
            for label in cell.split():
                in_matrix.add((label, k, pin))
    for item in sorted(lit - in_matrix):
        failures.append(f'{name}: the header lights {item[0]} on COM'
                        f'{item[1]} by pin {item[2]}; the matrix does not')
    for item in sorted(in_matrix - lit):
        failures.append(f'{name}: the matrix lights {item[0]} on COM'
                        f'{item[1]} by pin {item[2]}; the header does not')
    print(f'{name}: {len(lit)} pixels agree')


def main(glassplot, samples):
    failures = []
    work = tempfile.mkdtemp(prefix='gp-matrix-')
    try:
        for entry in sorted(os.listdir(samples)):
            if entry.endswith('.yaml'):
                check(glassplot, os.path.join(samples, entry), work,
                      failures)
    finally:
        shutil.rmtree(work)
    for line in failures[:40]:
        print('FAIL', line)
    return 1 if failures else 0


if __name__ == '__main__':
    sys.exit(main(sys.argv[1], sys.argv[2]))
