#!/usr/bin/env python3
"""No generated file can be broken by a name.

Builds glasses whose part number, revision, title, block, icon, common,
segment and ledge names hold what each output format treats as code or
markup: the end of a C comment, a preprocessor line, a trigraph, a bidi
override (U+202E), CSV commas, quotes and spaces, Gerber's reserved '*'
and '%', backslashes.  Then reads every output back with a reader that
does not come from this project:

- glass-map.h is compiled with cc -std=c11 -Wall -Wextra -Werror -pedantic
  (GCC's -Wbidi-chars is on by default) and must define nothing the
  names injected;
- pins.csv and pin-matrix.csv are read with Python's csv module (RFC 4180)
  and give back every name as written;
- every Gerber file: a G04 comment or attribute holds no raw '*' or '%'
  (Gerber Layer Format Specification, section 3.4.3) and gerbv reads it;
- report.json and the --json summary parse with Python's json module and
  give back the part number;
- the PDF's metadata (pdfinfo) gives back the title;
- nothing the tool prints holds a control or bidi character.

A description with a control character (a YAML escape) is refused with
exit status 2 at its FILE:LINE:COL, and the message shows it escaped.

Usage: hostile-names.py GLASSPLOT
"""
import csv
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

PART = 'X*/ #define INJECTED 1 /*\u202e??/,"%\\'
REVISION = 'A*/'
TITLE = 'T, "q" */ \u202e % * \\'
BLOCK = 'r,e"a*/d '
ICON = 'b,e"l*/l\u202e'
COMMON = 'c,o*/m'
SEGMENT = 's"e,g'
LEDGE = 'ma,in'


def yaml_string(text):
    """A YAML double-quoted scalar."""
    out = []
    for ch in text:
        if ch in '"\\':
            out.append('\\' + ch)
        elif ord(ch) > 0x7e:
            out.append(f'\\u{ord(ch):04x}')
        else:
            out.append(ch)
    return '"' + ''.join(out) + '"'


DESCRIPTION = f"""\
glass:
  part: {yaml_string(PART)}
  revision: {yaml_string(REVISION)}
  title: {yaml_string(TITLE)}
  segments_on: front
front:
  size: [54, 30]
  position: [0, -3]
back:
  size: [54, 22]
  position: [0, 5]
viewing_area:
  position: [4, 8.5]
  size: [46, 16]
blocks:
  {yaml_string(BLOCK)}:
    origin: [8, 23.5]
    cells: [4, 1]
    dots: [5, 7]
    dot_size: [0.45, 0.5]
    dot_pitch: [0.5, 0.55]
    cell_pitch: 3
icons:
  {yaml_string(ICON)}:
    shape: circle
    diameter: 1.5
    position: [40, 14]
    common: {yaml_string(COMMON)}
    segment: {yaml_string(SEGMENT)}
ledges:
  {yaml_string(LEDGE)}:
    side: bottom
    plate: front
    connection: {{method: elastomeric, pitch: 0.1}}
    pitch: 0.65
    pad_width: 0.33
    pad_length: 2
    edge_clearance: 0.5
    numbering: right
leads:
  width: 0.06
  space: 0.06
seal:
  width: 1
  distance: 0.5
  fill_port: {{side: top, width: 2}}
transfers:
  size: 0.3
  count: 2
  place: seal
"""

UNSAFE = re.compile('[\x00-\x08\x0b-\x1f\x7f-\x9f\u061c\u200e\u200f'
                    '\u202a-\u202e\u2066-\u2069]')

failures = []


def fail(message):
    failures.append(message)
    print('FAIL', message)


def check_terminal(what, text):
    m = UNSAFE.search(text)
    if m:
        fail(f'{what} prints U+{ord(m.group()):04X} raw')


def check_header(work, out):
    program = os.path.join(work, 'use.c')
    with open(program, 'w', encoding='utf-8') as f:
        f.write('#include "glass-map.h"\n'
                '#ifdef INJECTED\n#error "a name defined a macro"\n#endif\n'
                'int main(void) { return 0; }\n')
    r = subprocess.run(['cc', '-std=c11', '-Wall', '-Wextra', '-Werror',
                        '-pedantic', '-I', out, '-o',
                        os.path.join(work, 'use'), program],
                       capture_output=True, text=True)
    if r.returncode != 0:
        fail('glass-map.h does not compile: ' + r.stderr[:400])
    header = open(os.path.join(out, 'glass-map.h'), encoding='utf-8').read()
    if any(ord(ch) > 0x7e or (ord(ch) < 0x20 and ch not in '\n\t')
           for ch in header):
        fail('glass-map.h is not plain ASCII')


def check_csv(out):
    with open(os.path.join(out, 'pins.csv'), newline='',
              encoding='utf-8') as f:
        rows = list(csv.reader(f))
    header = rows[0]
    if any(len(row) != len(header) for row in rows):
        fail(f'pins.csv rows of {sorted({len(r) for r in rows})} fields '
             f'under a {len(header)}-field header')
    ledges = {row[1] for row in rows[1:]}
    if ledges != {LEDGE}:
        fail(f'pins.csv ledge names {ledges}, expected {{{LEDGE!r}}}')
    drives = ' '.join(row[-1] for row in rows[1:])
    for name in (BLOCK.strip(), ICON):
        if name not in drives:
            fail(f'pins.csv does not name {name!r}')
    matrix = os.path.join(out, 'pin-matrix.csv')
    if os.path.exists(matrix):
        with open(matrix, newline='', encoding='utf-8') as f:
            rows = list(csv.reader(f))
        if any(len(row) != len(rows[0]) for row in rows):
            fail('pin-matrix.csv rows differ in length')
        if not any(ICON in cell for row in rows for cell in row):
            fail(f'pin-matrix.csv does not name {ICON!r}')


def check_gerber(out):
    for name in sorted(os.listdir(out)):
        if not name.endswith('.gbr'):
            continue
        text = open(os.path.join(out, name), encoding='utf-8').read()
        for line in text.splitlines():
            if line.startswith('G04 '):
                body = line[4:]
                if not body.endswith('*') or '*' in body[:-1] or \
                        '%' in body:
                    fail(f'{name}: G04 holds a raw reserved character: '
                         f'{line!r}')
            elif line.startswith('%TF'):
                body = line[1:-2]
                if not line.endswith('*%') or '*' in body or '%' in body:
                    fail(f'{name}: attribute holds a raw reserved '
                         f'character: {line!r}')
            if UNSAFE.search(line):
                fail(f'{name}: a control or bidi character raw')
        if shutil.which('gerbv'):
            r = subprocess.run(['gerbv', '-x', 'rs274x', '-o', os.devnull,
                                os.path.join(out, name)],
                               capture_output=True, text=True)
            if r.returncode != 0 or 'rror' in r.stderr:
                fail(f'gerbv cannot read {name}: {r.stderr[:200]}')


def check_json(out, summary):
    report = json.load(open(os.path.join(out, 'report.json'),
                            encoding='utf-8'))
    if report.get('part') != PART:
        fail(f'report.json part {report.get("part")!r}')
    if json.loads(summary).get('part') != PART:
        fail('the JSON summary does not give the part back')


def check_pdf(out):
    if not shutil.which('pdfinfo'):
        return
    r = subprocess.run(['pdfinfo', os.path.join(out, 'proof.pdf')],
                       capture_output=True, text=True)
    if r.returncode != 0:
        fail('pdfinfo cannot read proof.pdf: ' + r.stderr[:200])
        return
    title = re.search(r'^Title:\s*(.*)$', r.stdout, re.M)
    if not title or TITLE.strip() not in title.group(1) and \
            PART not in title.group(1):
        fail(f'proof.pdf title {title.group(1) if title else None!r}')


def check_refused(glassplot, work):
    path = os.path.join(work, 'control.yaml')
    text = DESCRIPTION.replace(f'title: {yaml_string(TITLE)}',
                               'title: "red \\e[31m text"')
    with open(path, 'w', encoding='utf-8') as f:
        f.write(text)
    r = subprocess.run([glassplot, 'build', path, '-o',
                        os.path.join(work, 'refused')],
                       capture_output=True, text=True)
    check_terminal('the refusal', r.stdout + r.stderr)
    line = text.splitlines().index('  title: "red \\e[31m text"') + 1
    if r.returncode != 2 or f'control.yaml:{line}:10:' not in r.stderr:
        fail(f'a control character: exit {r.returncode}, '
             f'{r.stderr.strip()!r}, expected exit 2 at line {line} col 10')


def main(glassplot):
    work = tempfile.mkdtemp(prefix='gp-hostile-')
    try:
        path = os.path.join(work, 'hostile.yaml')
        with open(path, 'w', encoding='utf-8') as f:
            f.write(DESCRIPTION)
        out = os.path.join(work, 'out')
        r = subprocess.run([glassplot, 'build', path, '-o', out],
                           capture_output=True, text=True)
        check_terminal('build', r.stdout + r.stderr)
        if r.returncode != 0:
            fail(f'build exit {r.returncode}: {r.stderr[:400]}')
            return 1
        for command in (['drive', path], ['check', path]):
            c = subprocess.run([glassplot] + command, capture_output=True,
                               text=True)
            check_terminal(command[0], c.stdout + c.stderr)
        summary = subprocess.run([glassplot, 'build', path, '-o', out,
                                  '--json'], capture_output=True,
                                 text=True).stdout
        check_header(work, out)
        check_csv(out)
        check_gerber(out)
        check_json(out, summary)
        check_pdf(out)
        check_refused(glassplot, work)
    finally:
        shutil.rmtree(work)
    print(f'{len(failures)} failures')
    return 1 if failures else 0


if __name__ == '__main__':
    sys.exit(main(sys.argv[1]))
