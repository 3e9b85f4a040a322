#!/usr/bin/python3
"""Man pages and bash completion from the built programs' own help, so they cannot drift.

  generate_docs.py --cli PATH [--gui PATH] --version VERSION --out DIR

Runs `contrast-bench-cli --help` (the commands), `contrast-bench-cli COMMAND --help` (each
command's options) and `contrast-bench --help`, and writes DIR/contrast-bench-cli.1,
DIR/contrast-bench.1 (with --gui) and DIR/contrast-bench-cli.bash. The value choices that the
completion offers come from the option descriptions ("Output format: csv, cpp, r." or a value
name such as <coding|hypotheses>); a value name that looks like a file name completes file names.
"""
import argparse
import os
import re
import subprocess
import sys


def run_help(program, *args):
    out = subprocess.run([program, *args, '--help'], capture_output=True, text=True)
    if out.returncode != 0:
        sys.exit(f'generate_docs: {os.path.basename(program)} {" ".join(args)} --help failed '
                 f'(status {out.returncode}): {out.stderr.strip()}')
    return out.stdout


def sections(text):
    """{'Options': [(names, description)], 'Arguments': [...], 'Commands': [...]} of a help text.
    An entry starts two spaces in; lines indented further continue its description."""
    found, current = {}, None
    for line in text.splitlines():
        heading = re.match(r'^(\w+):$', line)
        if heading:
            current = found.setdefault(heading.group(1), [])
            continue
        if current is None or not line.strip():
            if not line.strip():
                current = None
            continue
        entry = re.match(r'^  (\S(?:.*?\S)?)(?: {2,}(\S.*))?$', line)
        if entry and not line.startswith('   '):
            current.append([entry.group(1), entry.group(2) or ''])
        elif current:
            current[-1][1] = (current[-1][1] + ' ' + line.strip()).strip()
    return found


class Option:
    def __init__(self, names, description):
        value = re.search(r'\s<([^>]*)>$', names)
        self.value = value.group(1) if value else None
        names = names[:value.start()] if value else names
        self.names = [n.strip() for n in names.split(',') if n.strip()]
        self.description = description

    def choices(self):
        if self.value and '|' in self.value:
            return self.value.split('|')
        # "...: a, b, c." or "...: a, b or c (default a)."
        word = r'[a-z0-9][a-z0-9-]*'
        listed = re.search(rf':\s*({word}(?:(?:,\s*(?:or\s+)?|\s+or\s+){word})+)\s*(?:\([^)]*\))?\.?\s*$',
                           self.description)
        return re.split(r',\s*(?:or\s+)?|\s+or\s+', listed.group(1)) if listed else []

    def takes_file(self):
        return bool(self.value) and not self.choices() and (
            re.search(r'\.\w+$', self.value) is not None or self.value.lower() in ('file', 'path'))


def options_of(text):
    return [Option(names, description) for names, description in sections(text).get('Options', [])]


# --- man pages -----------------------------------------------------------------------------------

def roff(text):
    """Plain text as roff: backslashes, hyphens and leading dots or quotes escaped."""
    text = text.replace('\\', '\\e').replace('-', '\\-')
    return re.sub(r'^([.\'])', r'\\&\1', text)


def option_item(option):
    names = ', '.join(f'\\fB{roff(n)}\\fR' for n in option.names)
    if option.value:
        names += f' \\fI{roff(option.value)}\\fR'
    return f'.TP\n{names}\n{roff(option.description)}\n'


def header(name, version, summary):
    return (f'.TH {name.upper()} 1 "" "Contrast Bench {version}" "User Commands"\n'
            f'.SH NAME\n{roff(name)} \\- {roff(summary)}\n')


def cli_page(cli, version):
    usage = sections(run_help(cli))
    commands = usage.get('Commands', [])
    if not commands:
        sys.exit('generate_docs: contrast-bench-cli --help lists no commands')
    page = header('contrast-bench-cli', version, 'the command line of Contrast Bench')
    page += ('.SH SYNOPSIS\n.B contrast-bench-cli\n.I COMMAND\n[\\fIoptions\\fR]\n.br\n'
             '.B contrast-bench-cli\n\\fB\\-\\-help\\fR | \\fB\\-\\-version\\fR\n')
    page += ('.SH DESCRIPTION\nContrast Bench designs and checks contrast codings of categorical predictors '
             'for regression. Each command reads a factor and a coding (from \\fB\\-\\-levels\\fR with '
             '\\fB\\-\\-scheme\\fR or \\fB\\-\\-columns\\fR, or from a saved study with \\fB\\-\\-file\\fR) '
             'and writes a report, or one JSON object with \\fB\\-\\-json\\fR.\n')
    page += '.SH OPTIONS\n' + ''.join(option_item(Option(n, d)) for n, d in usage.get('Options', []))
    page += '.SH COMMANDS\n'
    for name, summary in commands:
        page += f'.SS {roff(name)}\n{roff(summary)}.\n'
        page += ''.join(option_item(o) for o in options_of(run_help(cli, name)))
    page += ('.SH EXIT STATUS\n.TP\n0\nsuccess\n.TP\n1\nthe work could not be done (for example, a file could '
             'not be written)\n.TP\n2\nbad arguments or input; a message on standard error names the argument '
             'or the place in the file and what was expected\n')
    page += ('.SH FILES\n.TP\n/usr/share/contrast\\-bench/demos/*.json\ndemo studies, to try with '
             '\\fB\\-\\-file\\fR\n.SH SEE ALSO\n.BR contrast\\-bench (1)\n')
    return page


def gui_page(gui, version):
    text = run_help(gui)
    found = sections(text)
    description = next((line.strip() for line in text.splitlines()[1:] if line.strip()), '')
    page = header('contrast-bench', version, 'the Contrast Bench workbench window')
    arguments = found.get('Arguments', [])
    page += '.SH SYNOPSIS\n.B contrast-bench\n[\\fIoptions\\fR]'
    page += ''.join(f' [\\fI{roff(name)}\\fR]' for name, _ in arguments) + '\n'
    page += f'.SH DESCRIPTION\n{roff(description)}\n'
    page += ('It opens a saved study (a one-factor scheme or a design of crossed factors); '
             'every change can be undone, and unsaved work is kept in a recovery file.\n')
    if arguments:
        page += '.SH ARGUMENTS\n' + ''.join(f'.TP\n\\fI{roff(n)}\\fR\n{roff(d)}\n' for n, d in arguments)
    page += '.SH OPTIONS\n' + ''.join(option_item(o) for o in options_of(text))
    page += ('.SH FILES\n.TP\n/usr/share/contrast\\-bench/demos/*.json\ndemo studies, listed under '
             'File \\(-> Demo studies and opened with \\fB\\-\\-demo\\fR \\fINAME\\fR\n'
             '.SH SEE ALSO\n.BR contrast\\-bench\\-cli (1)\n')
    return page


# --- bash completion -----------------------------------------------------------------------------

def completion(cli):
    usage = sections(run_help(cli))
    commands = [name for name, _ in usage.get('Commands', [])]
    top = [n for names, d in usage.get('Options', []) for n in Option(names, d).names]
    cases = []
    for command in commands:
        options = options_of(run_help(cli, command))
        words = ' '.join(n for o in options for n in o.names)
        values, free = [], []
        for o in options:
            if not o.value:
                continue
            pattern = '|'.join(o.names)
            if o.choices():
                values.append(f'                {pattern}) COMPREPLY=($(compgen -W "{" ".join(o.choices())}" -- "$cur")); return ;;')
            elif o.takes_file():
                values.append(f'                {pattern}) compopt -o filenames 2>/dev/null; COMPREPLY=($(compgen -f -- "$cur")); return ;;')
            else:
                free.append(pattern)  # a value of the user's own: nothing to offer
        if free:
            values.append(f'                {"|".join(free)}) COMPREPLY=(); return ;;')
        cases.append(f'        {command})\n'
                     f'            case "$prev" in\n' + '\n'.join(values) + '\n'
                     f'            esac\n'
                     f'            COMPREPLY=($(compgen -W "{words}" -- "$cur")) ;;')
    return f'''# bash completion for contrast-bench-cli (generated from its --help; do not edit)
_contrast_bench_cli()
{{
    local cur=${{COMP_WORDS[COMP_CWORD]}} prev=
    (( COMP_CWORD > 0 )) && prev=${{COMP_WORDS[COMP_CWORD-1]}}
    # --option=value: bash splits at '=', so the option is two words back.
    if [[ $cur == = ]]; then cur=; prev=${{COMP_WORDS[COMP_CWORD-1]}};
    elif [[ $prev == = ]] && (( COMP_CWORD > 1 )); then prev=${{COMP_WORDS[COMP_CWORD-2]}}; fi
    if (( COMP_CWORD == 1 )); then
        COMPREPLY=($(compgen -W "{' '.join(commands + top)}" -- "$cur"))
        return
    fi
    case "${{COMP_WORDS[1]}}" in
{chr(10).join(cases)}
        *) COMPREPLY=() ;;
    esac
}}
complete -F _contrast_bench_cli contrast-bench-cli
'''


def write(path, text):
    with open(path, 'w', encoding='utf-8') as f:
        f.write(text)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument('--cli', required=True)
    parser.add_argument('--gui')
    parser.add_argument('--version', required=True)
    parser.add_argument('--out', required=True)
    a = parser.parse_args()
    write(os.path.join(a.out, 'contrast-bench-cli.1'), cli_page(a.cli, a.version))
    write(os.path.join(a.out, 'contrast-bench-cli.bash'), completion(a.cli))
    if a.gui:
        write(os.path.join(a.out, 'contrast-bench.1'), gui_page(a.gui, a.version))


if __name__ == '__main__':
    main()
