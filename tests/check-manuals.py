#!/usr/bin/env python3
"""The manuals cannot drift from the code.

Reads what list-keys prints (every command and its options from the tool's
own table, every key the description's readers accept, every output file)
and fails when
  - glassplot(5) lacks a subsection (.SS) for a top-level section, or a key
    of a section is not set in bold in that section's subsection;
  - glassplot(1) does not show a command with exactly its own options in
    the SYNOPSIS, lacks an entry under OPTIONS for an option, an entry
    under COMMANDS for a command, an entry under OUTPUTS for an output
    file, or the three exit codes;
  - the bash completion does not offer each command exactly its own
    options (run in bash, as a shell would) or does not offer the commands;
  - README's usage block does not show a command with exactly its options;
  - a page's .TH date is not a date (it comes from the build).

usage: check-manuals.py LIST_KEYS MAN1 MAN5 COMPLETION SOURCE_ROOT
"""
import os
import re
import shlex
import subprocess
import sys

failures = []


def fail(message):
    failures.append(message)


# Descriptions the readers are run on: every one the project has.
FOLDERS = ['samples', 'tests/checks', 'tests/drive', 'tests/errors',
           'tests/fuzz/corpus-build', 'tests/fuzz/corpus-load',
           'tests/fuzz/regressions', 'tests/options', 'tests/data']
BUILT = ['samples/panel-2x16.yaml']


def read_listing(list_keys, root):
    commands, options, keys, outputs = [], {}, {}, set()
    args = [list_keys] + [os.path.join(root, f) for f in FOLDERS
                          if os.path.isdir(os.path.join(root, f))]
    args += ['--build'] + [os.path.join(root, f) for f in BUILT]
    out = subprocess.run(args, capture_output=True, text=True, check=True)
    for line in out.stdout.splitlines():
        kind, *rest = line.split()
        if kind == 'command':
            commands.append(rest[0])
            options.setdefault(rest[0], [])
        elif kind == 'option':
            name, short, long, argument = rest
            options.setdefault(name, []).append(
                (None if short == '-' else short, long,
                 None if argument == '-' else argument))
        elif kind == 'key':
            keys.setdefault(rest[0], set()).add(rest[1])
        elif kind == 'output':
            outputs.add(rest[0])
    return commands, options, keys, outputs


BOLD_FIRST = {'.B': None, '.BR': 0, '.BI': 0, '.RB': 1, '.IB': 1}


def unescape(text):
    text = re.sub(r'\\f[BIRP]', ' ', text)
    return text.replace('\\-', '-').replace('\\&', '').replace('\\e', '\\')


def bold_words(lines):
    """Words set in bold: by .B/.BR/.RB/.BI/.IB and by \\fB...\\fP."""
    words = set()
    for line in lines:
        parts = line.split(None, 1)
        if parts and parts[0] in BOLD_FIRST and len(parts) > 1:
            try:
                args = shlex.split(parts[1].replace('\\', '\\\\'))
            except ValueError:
                args = parts[1].split()
            first = BOLD_FIRST[parts[0]]
            for i, arg in enumerate(args):
                if first is None or i % 2 == first:
                    words.update(re.findall(r'[-\w.]+', unescape(arg)))
        for span in re.findall(r'\\fB(.*?)\\f[RPI]', line):
            words.update(re.findall(r'[-\w.]+', unescape(span)))
    # "--output" also as "output", "front-ito.gbr" whole and in parts
    return words | {w.lstrip('-') for w in words}


def sections(lines, macro):
    """Chunks of lines by heading macro (.SH or .SS): heading -> lines."""
    chunks, name = {}, None
    for line in lines:
        if line.startswith(macro + ' '):
            name = unescape(line[len(macro) + 1:].strip().strip('"'))
            chunks[name] = []
        elif name is not None:
            chunks[name].append(line)
    return chunks


def check_date(lines, page):
    th = [l for l in lines if l.startswith('.TH ')]
    if not th or not re.search(r'"\d{4}-\d{2}-\d{2}"', th[0]):
        fail(f'{page}: the .TH line carries no date YYYY-MM-DD: {th[:1]}')


def check_man5(path, keys):
    lines = open(path, encoding='utf-8').read().splitlines()
    check_date(lines, path)
    top = sections(lines, '.SH')
    subsections = sections(top.get('SECTIONS', []), '.SS')
    chunks = {}
    for heading, body in subsections.items():
        for name in re.split(r'[,\s]+', heading):
            if name:
                chunks[name] = body
    for section in sorted(keys.get('-', ())):
        if section not in chunks:
            fail(f'glassplot(5): no subsection (.SS) for the section '
                 f"'{section}'")
    for section, names in sorted(keys.items()):
        if section == '-' or section not in chunks:
            continue
        words = bold_words(chunks[section])
        for key in sorted(names - words):
            fail(f"glassplot(5): key '{key}' of '{section}' is not "
                 f'documented (in bold) in its subsection')


def option_words(option):
    short, long, _ = option
    return {long} | ({short} if short else set())


def check_synopsis_block(where, command, text_words, options, all_options):
    own = set().union(*(option_words(o) for o in options[command]))
    own.discard('--help')
    own.discard('-h')
    for option in options[command]:
        if option[1] == '--help':
            continue
        if not option_words(option) & text_words:
            fail(f"{where}: '{command}' does not show {option[1]}")
    for word in text_words & all_options - own:
        fail(f"{where}: '{command}' shows {word}, which it does not take")


def check_man1(path, commands, options, outputs):
    lines = open(path, encoding='utf-8').read().splitlines()
    check_date(lines, path)
    top = sections(lines, '.SH')
    all_options = set().union(*(option_words(o) for c in options
                                for o in options[c]))
    # SYNOPSIS: one block per command, from ".B glassplot NAME" to ".br"
    blocks, name = {}, None
    for line in top.get('SYNOPSIS', []):
        m = re.match(r'\.B glassplot (\w+)$', line)
        if m:
            name = m.group(1)
            blocks[name] = []
        elif line == '.br':
            name = None
        elif name:
            blocks[name].append(line)
    for command in commands:
        if command not in blocks:
            fail(f"glassplot(1): SYNOPSIS lacks 'glassplot {command}'")
            continue
        words = {'-' + w if not w.startswith('-') and len(w) == 1 else
                 ('--' + w if not w.startswith('-') else w)
                 for w in bold_words(blocks[command])}
        words = {w for w in words if w in all_options}
        check_synopsis_block('glassplot(1) SYNOPSIS', command, words,
                             options, all_options)
    documented = set()
    for line in top.get('OPTIONS', []):
        documented |= {w for w in re.findall(r'\\?-\\?-?[\w-]+', line)}
    documented = {unescape(w) for w in documented}
    for option in sorted({o for c in options for o in options[c]},
                         key=lambda o: o[1]):
        if not option_words(option) <= documented:
            fail(f'glassplot(1): OPTIONS lacks an entry for {option[1]}'
                 + (f' ({option[0]})' if option[0] else ''))
    command_words = bold_words(top.get('COMMANDS', []))
    for command in commands:
        if command not in command_words:
            fail(f"glassplot(1): COMMANDS lacks an entry for '{command}'")
    output_words = bold_words(top.get('OUTPUTS', []))
    for output in sorted(outputs - output_words):
        fail(f"glassplot(1): OUTPUTS lacks an entry for '{output}'")
    status = ' '.join(top.get('EXIT STATUS', []))
    for code in '012':
        if not re.search(r'(^|\s)' + code + r':', status):
            fail(f'glassplot(1): EXIT STATUS does not explain {code}')


def complete(completion, words):
    """COMPREPLY of the completion for the words, the last being typed."""
    script = (f'source {shlex.quote(completion)}\n'
              f'COMP_WORDS=({" ".join(shlex.quote(w) for w in words)})\n'
              f'COMP_CWORD={len(words) - 1}\n'
              '_glassplot\nprintf "%s\\n" "${COMPREPLY[@]}"\n')
    out = subprocess.run(['bash', '-c', script], capture_output=True,
                         text=True, check=True).stdout
    return set(out.split())


def check_completion(path, commands, options):
    offered = complete(path, ['glassplot', ''])
    for word in commands + ['help', '--help', '--version']:
        if word not in offered:
            fail(f"completion: does not offer '{word}' as a command")
    for word in sorted(offered - set(commands) -
                       {'help', '--help', '--version'}):
        fail(f"completion: offers '{word}', which is no command")
    for command in commands:
        offered = complete(path, ['glassplot', command, 'x.yaml', '-'])
        wanted = {o[1] for o in options[command]}
        wanted |= {o[0] for o in options[command] if o[0]}
        for word in sorted(wanted - offered):
            fail(f"completion: does not offer {word} to '{command}'")
        for word in sorted(offered - wanted):
            fail(f"completion: offers {word} to '{command}', which does "
                 'not take it')
    offered = complete(path, ['glassplot', 'help', ''])
    if offered != set(commands) | {'messages'}:
        fail(f"completion: 'glassplot help' offers {sorted(offered)}, "
             f"not the commands and 'messages'")


def check_readme(path, commands, options):
    text = open(path, encoding='utf-8').read()
    usage = text.split('## Using it', 1)[-1].split('```', 2)[1]
    all_options = set().union(*(option_words(o) for c in options
                                for o in options[c]))
    blocks, name = {}, None
    for line in usage.splitlines():
        m = re.match(r'glassplot (\S+)', line)
        if m:
            name = m.group(1) if m.group(1) in commands else None
            if name:
                blocks[name] = set()
        if name and line.startswith(('glassplot ', ' ')):
            blocks[name] |= set(re.findall(r'--?[\w-]+', line))
    for command in commands:
        if command not in blocks:
            fail(f"README usage: lacks 'glassplot {command}'")
            continue
        check_synopsis_block('README usage', command,
                             blocks[command] & all_options, options,
                             all_options)


def main():
    list_keys, man1, man5, completion, root = sys.argv[1:6]
    readme = os.path.join(root, 'README.md')
    commands, options, keys, outputs = read_listing(list_keys, root)
    if not commands or not keys or not outputs:
        fail('the listing is empty: list-keys found nothing')
    for page in ('glassplot.1', 'glassplot.5'):
        source = os.path.join(root, 'tools', page)
        th = open(source, encoding='utf-8').readline()
        if '"@DATE@"' not in th:
            fail(f'tools/{page}: the .TH date must be @DATE@, filled in by '
                 f'the build, not {th.split()[3:4]}')
    check_man5(man5, keys)
    check_man1(man1, commands, options, outputs)
    check_completion(completion, commands, options)
    check_readme(readme, commands, options)
    for message in failures:
        print('FAIL:', message)
    print(f'{len(failures)} problems')
    return 1 if failures else 0


if __name__ == '__main__':
    sys.exit(main())
