#!/usr/bin/env python3
"""check-messages.py SRCDIR: the message registry (lib/base/messages.def)
is whole and used.  Every entry has a unique enum name and a unique code
(lower-case words joined by '-') and a meaning; every code is used in lib/
or tools/; and every error or warning call gives a code, except in the
files still listed in UNCODED below (a ratchet: a listed file that has no
uncoded call left fails too, so the list only shrinks)."""
import os
import re
import sys

ENTRY = re.compile(r'^GP_MESSAGE\((\w+), "([^"]*)", "([^"]*)"\)$', re.M)
UNCODED_CALL = re.compile(r'\bgp_diag_(error|warning)\(')

# Files whose errors do not carry codes yet.
UNCODED = {
    'lib/base/font.c',
    'lib/check/check.c',
    'lib/drive/drive-resolve.c', 'lib/layout/digits-layout.c',
    'lib/layout/digits-plan.c', 'lib/layout/digits.c',
    'lib/layout/icon-layout.c',
    'lib/load/digits-read.c',
    'lib/load/drive-read.c',
    'lib/load/route-read.c', 'lib/pipeline/build.c',
    'lib/pipeline/diff.c', 'lib/route/ledge.c', 'lib/route/route-bundle.c',
    'lib/route/route-join.c', 'lib/route/route.c', 'lib/route/seal.c',
}
# diag.c/diag.h define the uncoded functions themselves.
DEFINERS = {'lib/base/diag.c', 'lib/base/diag.h'}


def sources(root):
    for top in ('lib', 'tools'):
        for folder, _, names in os.walk(os.path.join(root, top)):
            for name in sorted(names):
                if name.endswith(('.c', '.h')):
                    path = os.path.join(folder, name)
                    yield os.path.relpath(path, root), open(
                        path, encoding='utf-8').read()


def check_registry(entries, problems):
    for kind, column in (('name', 0), ('code', 1)):
        seen = set()
        for entry in entries:
            if entry[column] in seen:
                problems.append(f'messages.def: {kind} {entry[column]} '
                                'given twice')
            seen.add(entry[column])
    for name, code, meaning in entries:
        if not re.fullmatch(r'[a-z][a-z0-9]*(-[a-z0-9]+)*', code):
            problems.append(f'messages.def: {name}: bad code "{code}"')
        if not meaning.strip():
            problems.append(f'messages.def: {name}: no meaning')


def main(root):
    registry = open(os.path.join(root, 'lib/base/messages.def'),
                    encoding='utf-8').read()
    entries = ENTRY.findall(registry)
    problems = []
    if len(entries) < 10:
        problems.append(f'messages.def: only {len(entries)} entries read')
    check_registry(entries, problems)
    texts = dict(sources(root))
    everything = '\n'.join(texts.values())
    for name, code, _ in entries:
        if not re.search(rf'\bGP_MSG_{name}\b', everything):
            problems.append(f'messages.def: {code} ({name}) is never used')
    for path, text in sorted(texts.items()):
        if path in DEFINERS:
            continue
        calls = len(UNCODED_CALL.findall(text))
        if calls and path not in UNCODED:
            problems.append(f'{path}: {calls} error or warning calls '
                            'without a message code')
        if not calls and path in UNCODED:
            problems.append(f'{path}: every call has its code now; take '
                            'it off the UNCODED list')
    for path in sorted(UNCODED - texts.keys()):
        problems.append(f'{path}: listed in UNCODED but not found')
    for problem in problems:
        print(problem)
    print(f'{len(entries)} codes, {len(UNCODED)} files still uncoded')
    return 1 if problems else 0


if __name__ == '__main__':
    sys.exit(main(sys.argv[1]))
