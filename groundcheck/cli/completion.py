"""Shell completion, written from the command line's own parser so that it never disagrees with it:
every command, its options, the choices of each option and plan files for the rest.  Bash, and zsh
through its bash compatibility (``autoload -U bashcompinit && bashcompinit``)."""

from __future__ import annotations

import argparse
import sys

from .registry import build_parser, command, opt

__all__ = ["bash_completion", "cmd_completion"]


def _commands(parser: argparse.ArgumentParser) -> dict[str, argparse.ArgumentParser]:
    for action in parser._actions:  # argparse keeps its subcommands here, and only here
        if isinstance(action, argparse._SubParsersAction):
            return dict(action.choices)
    return {}


def bash_completion(parser: argparse.ArgumentParser) -> str:
    """The bash completion script for ``parser`` (a function and its ``complete`` line)."""
    commands = _commands(parser)
    options, choices = [], []
    for name, sub in sorted(commands.items()):
        flags = [f for a in sub._actions for f in a.option_strings]
        options.append(f'    {name}) opts="{" ".join(sorted(flags))}" ;;')
        for a in sub._actions:
            if a.choices and a.option_strings:
                words = " ".join(str(c) for c in a.choices)
                for flag in a.option_strings:
                    choices.append(
                        f'    {name}:{flag}) COMPREPLY=( $(compgen -W "{words}" -- "$cur") ); '
                        "return ;;"
                    )
    lines = [
        "# groundcheck shell completion (bash; zsh with bashcompinit). Load it with:",
        '#   eval "$(groundcheck completion bash)"',
        "_groundcheck() {",
        '    local cur="${COMP_WORDS[COMP_CWORD]}" prev="${COMP_WORDS[COMP_CWORD-1]}" '
        'cmd="${COMP_WORDS[1]}" opts=""',
        '    if [ "$COMP_CWORD" -eq 1 ]; then',
        f'        COMPREPLY=( $(compgen -W "{" ".join(sorted(commands))} --help --version" -- '
        '"$cur") ); return',
        "    fi",
        '    case "$cmd:$prev" in',
        *choices,
        "    esac",
        '    case "$cmd" in',
        *options,
        "    esac",
        '    if [[ "$cur" == -* ]]; then',
        '        COMPREPLY=( $(compgen -W "$opts" -- "$cur") )',
        "    else",
        '        COMPREPLY=( $(compgen -f -- "$cur") )',
        "    fi",
        "}",
        "complete -o filenames -F _groundcheck groundcheck",
    ]
    return "\n".join(lines) + "\n"


@command(
    "completion",
    help="print a shell completion script",
    description='Example:\n  eval "$(groundcheck completion bash)"   (zsh: run '
    "'autoload -U bashcompinit && bashcompinit' first)",
    options=(
        opt(
            "shell", choices=("bash", "zsh"), help="bash, or zsh (through its bash compatibility)"
        ),
    ),
)
def cmd_completion(args) -> int:
    sys.stdout.write(bash_completion(build_parser()))
    return 0
