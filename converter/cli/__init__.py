"""Command-line interface: one module per command, each with its parser and handler.

A command module has ``NAME``, ``add_parser(subparsers)`` and ``run(args) ->
int``; this package collects them in :data:`COMMANDS` (in the order ``--help``
lists them). No geometry lives here. Every
:class:`~gradeline.errors.GradelineError` is caught once in :func:`main` and
printed as one line; exit codes are 0 (ok), 1 (findings, for review/check), 2
(bad input or usage). Heavy libraries are imported inside each ``run``, so
``gradeline --help`` starts fast.
"""

from __future__ import annotations

import importlib
import sys
from collections.abc import Sequence

from gradeline import __version__
from gradeline.cli._common import PROG, SUMMARIES, Parser
from gradeline.errors import GradelineError

__all__ = ["COMMANDS", "build_parser", "main"]

#: The option that makes each kind of choice a library error asks for.
CHOICE_OPTIONS = {
    "alignment": "--alignment NAME",
    "profile": "--profile NAME",
    "surface": "--surface NAME",
    "mapping": "--exaggeration and --datum",
    "window": "--window W",
    "at": "--at STATIONS",
    "step": "--step D",
}

#: Command modules of :mod:`gradeline.cli`, in the order of ``--help``.
COMMANDS = tuple(SUMMARIES)


def chosen_command(argv: Sequence[str]) -> str | None:
    """The command ``argv`` names, or None when it names none (``--help``, ``--version``).

    The top-level options take no value, so the command is the first word that is not
    an option.
    """
    for word in argv:
        if word == "--":
            break
        if not word.startswith("-"):
            return word if word in SUMMARIES else None
    return None


def build_parser(argv: Sequence[str] | None = None) -> Parser:
    """The argument parser of the ``gradeline`` command.

    Given ``argv``, only the command it names gets its options (and its module
    imported); the others are listed by their summary, which is all ``--help`` shows.
    Without ``argv``, every command is complete.
    """
    parser = Parser(
        prog=PROG,
        description=(
            "Compute and draft highway vertical geometry from LandXML. Computed "
            "geometry is for review: verify it against the governing agency's "
            "standards; design decisions rest with the responsible licensed engineer."
        ),
    )
    parser.add_argument("--version", action="version", version=f"{PROG} {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=Parser)
    sub.required = True
    wanted = None if argv is None else chosen_command(argv)
    for name in COMMANDS:
        if argv is None or name == wanted:
            importlib.import_module(f"gradeline.cli.{name}").add_parser(sub)
        else:
            sub.add_parser(name, help=SUMMARIES[name])
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the ``gradeline`` command; return its exit code."""
    if argv is None:
        argv = sys.argv[1:]
    parser = build_parser(argv)
    args = parser.parse_args(argv)
    try:
        return int(args.func(args))
    except GradelineError as err:
        hint = CHOICE_OPTIONS.get(err.choice or "")
        sys.stderr.write(f"{PROG}: {err}" + (f" (give {hint})" if hint else "") + "\n")
        return 2
    except BrokenPipeError:
        return 0
    except MemoryError:
        sys.stderr.write(
            f"{PROG}: out of memory: the input asks for more than this machine holds\n"
        )
        return 2
    except OSError as err:  # a full disk, a read-only folder, a permission refused
        where = f"{err.filename}: " if err.filename else ""
        sys.stderr.write(f"{PROG}: {where}{err.strerror or err}\n")
        return 2
    except KeyboardInterrupt:
        sys.stderr.write(f"{PROG}: interrupted\n")
        return 130


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
