#!/usr/bin/env python3
"""The command line, case by case: tests/options/cases.txt holds one case a
line, "EXIT STREAM :: FIRST LINE :: ARGUMENTS" (STREAM out or err: where
the first line is read; ARGUMENTS split as a shell would).  In arguments
and first lines @small, @panel and @static stand for descriptions, @out for
a fresh folder, @file for a fresh file name and @dir for a folder that
exists; a first line ending in "..." need only start with the rest;
leading NAME=VALUE words set the environment.  Fails too when some command or option of the tool's own table
(from list-keys) has no case.

usage: run-options.py GLASSPLOT LIST_KEYS SOURCE_ROOT
"""
import os
import re
import shlex
import subprocess
import sys
import tempfile


def options_of(list_keys):
    out = subprocess.run([list_keys], capture_output=True, text=True,
                         check=True).stdout
    table = {}
    for line in out.splitlines():
        kind, *rest = line.split()
        if kind == 'command':
            table.setdefault(rest[0], set())
        elif kind == 'option':
            table.setdefault(rest[0], set()).add(
                (None if rest[1] == '-' else rest[1], rest[2]))
    return table


def main():
    glassplot, list_keys, root = sys.argv[1:4]
    cases = os.path.join(root, 'tests', 'options', 'cases.txt')
    scratch = tempfile.mkdtemp(prefix='gp-options-')
    names = {
        '@small': os.path.join(root, 'tests', 'options', 'small.yaml'),
        '@panel': os.path.join(root, 'samples', 'panel-2x16.yaml'),
        '@static': os.path.join(root, 'samples', 'timer-4digit-static.yaml'),
        '@dir': scratch,
    }
    table = options_of(list_keys)
    covered = set()
    failed = passed = 0
    env = dict(os.environ)
    env.pop('SOURCE_DATE_EPOCH', None)
    for number, line in enumerate(open(cases, encoding='utf-8'), 1):
        if not line.strip() or line.startswith('#'):
            continue
        head, first, arguments = (p.strip() for p in line.split('::', 2))
        status, stream = head.split()
        case = os.path.join(scratch, str(number))
        values = dict(names, **{'@out': case + '.out',
                                '@file': case + '.file'})
        args = shlex.split(arguments)
        for name, value in sorted(values.items(), key=lambda i: -len(i[0])):
            args = [a.replace(name, value) for a in args]
            first = first.replace(name, value)
        # leading NAME=VALUE words set the environment, as in a shell
        case_env = dict(env)
        while args and re.match(r'[A-Z_]+=', args[0]):
            name, value = args.pop(0).split('=', 1)
            case_env[name] = value
        result = subprocess.run([glassplot] + args, capture_output=True,
                                text=True, env=case_env)
        text = result.stdout if stream == 'out' else result.stderr
        got = text.splitlines()[0] if text else ''
        same = (got.startswith(first[:-3]) if first.endswith('...')
                else got == first)
        if result.returncode != int(status) or not same:
            failed += 1
            print(f'FAIL cases.txt:{number}: {arguments}\n'
                  f'    expected {status} {stream}: {first}\n'
                  f'    got      {result.returncode} {stream}: {got}')
            if result.stderr and stream == 'out':
                print('    stderr:', result.stderr.splitlines()[0])
        else:
            passed += 1
        words = [w for w in shlex.split(arguments)
                 if not re.match(r'[A-Z_]+=', w)]
        if words and words[0] in table:
            for option in table[words[0]]:
                if any(w == option[1] or w.startswith(option[1] + '=') or
                       (option[0] and w.startswith(option[0]))
                       for w in words[1:]):
                    covered.add((words[0], option[1]))
        if len(words) == 2 and words[0] == 'help':
            covered.add(('help', words[1]))
    for command, options in sorted(table.items()):
        if ('help', command) not in covered:
            failed += 1
            print(f"FAIL: no case runs 'glassplot help {command}'")
        for option in sorted(options, key=lambda o: o[1]):
            if (command, option[1]) not in covered:
                failed += 1
                print(f'FAIL: no case gives {command} {option[1]}')
    subprocess.run(['rm', '-rf', scratch])
    print(f'{passed} passed, {failed} failed')
    return 1 if failed else 0


if __name__ == '__main__':
    sys.exit(main())
