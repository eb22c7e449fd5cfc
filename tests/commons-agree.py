#!/usr/bin/env python3
"""Every common counted once: the N of the drive agrees everywhere.

For every sample and a generated set of glasses (blocks x digits x duty x
icons x drive section) this builds the glass and asserts that
`glassplot drive` reports the same number of commons N as the build's
summary, as the number of COM pads in pins.csv (read with Python's csv
module), as the proof's spec sheet (pdftotext) and, with a frame rate, that
the RC check's row time is 1/(N f) (report.json).  The outside reference
is the artwork itself: the COM pads the routing brought out.

A generated glass the tool refuses (exit 2) must be refused by
`glassplot drive` too, with the same first error, unless the build got past
the layout (a routing failure); the test fails when fewer than MIN_BUILT
generated glasses build (all 58 of them, blocks with icons beside
their rows included), so it cannot pass by refusing everything.

Usage: commons-agree.py GLASSPLOT SAMPLES_DIR
"""
import csv
import io
import itertools
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

MIN_BUILT = 58

BASE = """\
glass:
  part: GEN-{name}
  revision: A
  title: generated glass {name}
  segments_on: front
front:
  size: [{width}, 34]
  position: [0, 0]
back:
  size: [{width}, 28]
  position: [0, 6]
viewing_area:
  position: [8, 9]
  size: [{inner}, 22]
rules:
  min_line: 0.03
  min_space: 0.03
  registration: 0.04
ledges:
  main:
    side: bottom
    plate: front
    connection: {{method: elastomeric, pitch: 0.1}}
    pitch: 0.5
    pad_width: 0.25
    pad_length: 2
    edge_clearance: 0.5
    numbering: right
leads:
  width: 0.03
  space: 0.03
seal:
  width: 0.8
  distance: 0.4
  fill_port: {{side: top, width: 2}}
transfers:
  size: 0.3
  count: 2
  place: seal
"""

BLOCK = """\
blocks:
  text:
    origin: [11, 29]
    cells: [{cells}, {lines}]
    dots: [5, {rows}]
    dot_size: [0.3, 0.3]
    dot_pitch: [0.35, 0.35]
    cell_pitch: 2.2
    line_pitch: {line_pitch}
"""

DIGITS = """\
digits:
  row:
    origin: [24, 11]
    count: {count}
    pitch: 9
    segments: 7
    height: 8
    width: 4.5
    stroke: 0.9
    gap: 0.2
    slant: 6
    ends: bevelled
    point: {{shape: round, size: 0.8}}
    duty: {duty}
"""

ICONS = """\
icons:
  bell:
    shape: circle
    diameter: 1.2
    position: [{x}, 27]
    common: alarm
    segment: bell
  arrow:
    shape: triangle
    size: [1.4, 1]
    position: [{x2}, 27]
    common: alarm
    segment: arrow
"""

DRIVE = """\
drive:
  frame_rate: 80
optics:
  threshold: 1.4
  saturation: 2.0
"""


def generated():
    """(name, text) for figure x duty x options."""
    for blocks, digits, duty, icons, drive in itertools.product(
            (None, (4, 1, 7), (3, 2, 8)), (0, 2, 4), (1, 4), (False, True),
            (False, True)):
        if not blocks and not digits and not icons:
            continue
        if not digits and duty != 1:
            continue
        parts = []
        name = []
        width = 70
        if blocks:
            cells, lines, rows = blocks
            parts.append(BLOCK.format(cells=cells, lines=lines, rows=rows,
                                      line_pitch=rows * 0.35 + 0.6))
            name.append(f'b{cells}x{lines}r{rows}')
        if digits:
            parts.append(DIGITS.format(count=digits, duty=duty))
            name.append(f'd{digits}n{duty}')
        if icons:
            parts.append(ICONS.format(x=50, x2=53))
            name.append('i')
        if drive:
            parts.append(DRIVE)
            name.append('f')
        label = '-'.join(name)
        yield label, BASE.format(name=label, width=width,
                                 inner=width - 16) + ''.join(parts)


def run(args):
    return subprocess.run(args, capture_output=True, text=True)


def first_error(stderr):
    for line in stderr.splitlines():
        if 'error' in line:
            return line
    return stderr.strip()


def drive_commons(glassplot, path):
    r = run([glassplot, 'drive', '--json', path])
    if r.returncode == 2:
        return None, first_error(r.stderr)
    return json.loads(r.stdout)['multiplex']['commons'], None


def check(glassplot, path, out, failures):
    """'built', 'refused' or 'routing'."""
    name = os.path.basename(path)
    r = run([glassplot, 'build', path, '-o', out, '--json'])
    n_drive, drive_error = drive_commons(glassplot, path)
    if r.returncode == 2:
        if drive_error is None:
            # the layout made its nets; only a later stage refused
            return 'routing'
        if first_error(r.stderr) != drive_error:
            failures.append(f'{name}: build and drive refuse differently:'
                            f' {first_error(r.stderr)!r} and'
                            f' {drive_error!r}')
        return 'refused'
    if drive_error is not None:
        failures.append(f'{name}: builds but drive refuses: {drive_error}')
        return 'built'
    summary = json.loads(r.stdout)
    n_summary = summary['nets']['commons']
    with open(os.path.join(out, 'pins.csv'), newline='',
              encoding='utf-8') as f:
        rows = list(csv.DictReader(f))
    n_pads = sum(1 for row in rows if row['role'] == 'common')
    com_nets = {row['net'] for row in rows if row['role'] == 'common'}
    if len(com_nets) != n_pads:
        failures.append(f'{name}: a common has two pads: {sorted(com_nets)}')
    if not (n_drive == n_summary == n_pads):
        failures.append(f'{name}: N differs: drive {n_drive}, summary '
                        f'{n_summary}, COM pads in pins.csv {n_pads}')
    proof = run(['pdftotext', '-layout', os.path.join(out, 'proof.pdf'),
                 '-'])
    if proof.returncode == 0:
        m = re.search(r'commons N\s+(\d+)', proof.stdout)
        n_proof = int(m.group(1)) if m else None
        if n_proof != n_drive:
            failures.append(f'{name}: the proof says N {n_proof}, drive '
                            f'says {n_drive}')
    with open(os.path.join(out, 'report.json'), encoding='utf-8') as f:
        report = json.load(f)
    row_time = report['limits'].get('row_time_s')
    text = open(path, encoding='utf-8').read()
    rate = re.search(r'frame_rate:\s*([0-9.]+)', text)
    if rate:
        expected = 1.0 / (n_drive * float(rate.group(1)))
        if row_time is None or abs(row_time - expected) > 1e-9 * expected:
            failures.append(f'{name}: row time {row_time} s, expected '
                            f'1/(N f) = {expected} s')
    elif row_time is not None:
        failures.append(f'{name}: a row time {row_time} s without a '
                        'frame rate')
    return 'built'


def main(glassplot, samples):
    failures = []
    tally = {'built': 0, 'refused': 0, 'routing': 0}
    work = tempfile.mkdtemp(prefix='gp-commons-')
    try:
        for entry in sorted(os.listdir(samples)):
            if not entry.endswith('.yaml'):
                continue
            outcome = check(glassplot, os.path.join(samples, entry),
                            os.path.join(work, entry + '.out'), failures)
            if outcome != 'built':
                failures.append(f'{entry}: a sample does not build')
        for label, text in generated():
            path = os.path.join(work, label + '.yaml')
            with open(path, 'w', encoding='utf-8') as f:
                f.write(text)
            outcome = check(glassplot, path, os.path.join(work, label),
                            failures)
            tally[outcome] += 1
            print(f'{label}: {outcome}')
    finally:
        shutil.rmtree(work)
    print(f'generated: {tally}')
    if tally['built'] < MIN_BUILT:
        failures.append(f'only {tally["built"]} generated glasses built; '
                        f'at least {MIN_BUILT} must')
    for line in failures:
        print('FAIL', line)
    return 1 if failures else 0


if __name__ == '__main__':
    sys.exit(main(sys.argv[1], sys.argv[2]))
