#!/usr/bin/env python3
"""match-messages.py EXPECTED ACTUAL: do the tool's message lines (ACTUAL)
match the expected ones?  An expected line that is only a place and a code,
"FILE:LINE:COL: [code]" (or "warning: [code]", or "glassplot: [code]"),
matches any line with that place, kind and code, whatever its wording; any
other expected line must be equal to the actual one.  Exit 1 with a diff."""
import re
import sys

SHORT = re.compile(r'^(?P<head>.*?)\[(?P<code>[a-z0-9-]+)\]$')


def matches(expected, actual):
    if expected == actual:
        return True
    short = SHORT.match(expected)
    if not short or not actual.endswith(f' [{short["code"]}]'):
        return False
    return actual.startswith(short['head'])


def main(expected_path, actual_path):
    expected = open(expected_path, encoding='utf-8').read().splitlines()
    actual = open(actual_path, encoding='utf-8',
                  errors='replace').read().splitlines()
    if len(expected) == len(actual) and all(map(matches, expected, actual)):
        return 0
    for line in expected:
        print(f'    - {line}')
    for line in actual:
        print(f'    + {line}')
    return 1


if __name__ == '__main__':
    sys.exit(main(*sys.argv[1:]))
