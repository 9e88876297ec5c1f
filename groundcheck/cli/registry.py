"""The commands' registry: each command is one function, decorated with :func:`command`, that
declares there its help, its options and the formats it writes (taken from the format registry,
``groundcheck.renderers.formats``); the parser is built from the registry.

Commands are listed in ``groundcheck --help`` in the order they are registered (the order in which
``cli/__init__.py`` imports the modules that hold them).
"""

from __future__ import annotations

import argparse
from dataclasses import dataclass, field
from typing import Callable

from ..core.version import __version__
from .common import Parser

__all__ = ["Command", "COMMANDS", "FORMAT", "FormatOption", "build_parser", "command", "opt"]

#: the exit statuses of the commands that judge a plan
EPILOG = (
    "Exit status: 0 clean, 1 findings at or above --fail-on, 2 the plan or the command could not "
    "be used."
)


@dataclass(frozen=True)
class Option:
    """One option or argument, as ``argparse`` takes it."""

    flags: tuple[str, ...]
    settings: dict = field(default_factory=dict)

    def add(self, parser, command: Command) -> None:
        parser.add_argument(*self.flags, **self.settings)


def opt(*flags: str, **settings) -> Option:
    """An option or argument of a command: ``opt("-o", "--output", metavar="FILE", help=...)``."""
    return Option(flags, settings)


@dataclass(frozen=True)
class FormatOption(Option):
    """The option choosing the output format: its choices are the command's formats, the first its
    default."""

    flags: tuple[str, ...] = ("--format",)

    def add(self, parser, command: Command) -> None:
        names = tuple(command.formats)
        settings = {"default": names[0], "help": f"output format (default {names[0]})"}
        parser.add_argument(*self.flags, choices=names, **(settings | self.settings))


#: ``--format``, with the command's formats as its choices
FORMAT = FormatOption()


@dataclass(frozen=True)
class Command:
    """A command: its name, the function that runs it, its help and what it accepts."""

    name: str
    run: Callable[[argparse.Namespace], int]
    help: str
    description: str
    epilog: str | None = None
    #: each an :class:`Option`, or a function adding a group of options to the parser
    options: tuple = ()
    #: the formats it writes (names of the format registry), its default first
    formats: tuple[str, ...] = ()

    def add_to(self, sub) -> None:
        parser = sub.add_parser(
            self.name,
            help=self.help,
            description=self.description,
            formatter_class=argparse.RawDescriptionHelpFormatter,
            epilog=self.epilog,
        )
        for item in self.options:
            item.add(parser, self) if isinstance(item, Option) else item(parser)


#: every command, by name, in the order of ``groundcheck --help``
COMMANDS: dict[str, Command] = {}


def command(
    name: str,
    *,
    help: str,  # noqa: A002 - argparse's own word
    description: str,
    epilog: str | None = None,
    options: tuple = (),
    formats=(),
):
    """Register the decorated function as the command ``name``; it takes the parsed arguments and
    returns the exit status."""

    def register(run):
        COMMANDS[name] = Command(name, run, help, description, epilog, options, tuple(formats))
        return run

    return register


def build_parser() -> argparse.ArgumentParser:
    """The command line's parser, every registered command a subcommand of it."""
    p = Parser(
        prog="groundcheck",
        description="Audit the ground (earthing) wiring plan of mains-powered audio "
        "equipment before anyone solders.",
        epilog=EPILOG,
    )
    p.add_argument("--version", action="version", version=f"groundcheck {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=Parser)
    for c in COMMANDS.values():
        c.add_to(sub)
    return p
