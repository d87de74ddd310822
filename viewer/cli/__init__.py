"""The ``perifocal`` command: argument parsing, exit codes and messages.

Each subcommand lives in its own module here with ``add_parser(subparsers)`` and
``run(args) -> int``; modules import their heavy dependencies (GL, windowing) inside
``run`` so that ``perifocal check`` starts fast and works with no GL at all.

Exit codes: 0 success; 2 bad input (the first line on stderr names the file or flag,
then one line per problem); 1 internal error (a traceback and how to report it).
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Sequence
from typing import Any

from .. import __version__
from ..errors import UserInputError
from .options import NEGATIVE_NUMBER

#: Subcommand name -> module in this package. A command is listed only once it works.
COMMANDS: dict[str, str] = {
    "demo": "demo",
    "open": "open",
    "check": "check",
    "render": "render",
    "missing": "missing",
    "convert": "convert",
    "timing": "timing",
    "transfer": "transfer",
    "lambert": "lambert",
    "porkchop": "porkchop",
    "plot": "plot",
    "import": "import_",
    "ephemeris": "ephemeris",
    "bench": "bench",
}

from ..mission.cautions import CAUTION  # noqa: E402  (one home, below both front ends)

REPORT = (
    "This is a bug in Perifocal. Please report it with the command you ran and the "
    "traceback above."
)


class _Parser(argparse.ArgumentParser):
    """argparse with a flag error that follows the contract: exit 2, one clear line."""

    def __init__(self, *args: Any, **kwargs: Any) -> None:
        super().__init__(*args, **kwargs)
        # "-1e3" and "-1.3356e7" are values, not flags (argparse knows only "-1" and "-.5").
        self._negative_number_matcher = NEGATIVE_NUMBER

    def error(self, message: str) -> None:  # type: ignore[override]
        sys.stderr.write(f"{self.prog}: {message}\n  (see '{self.prog} --help')\n")
        raise SystemExit(2)


def build_parser(command: str | None = None) -> argparse.ArgumentParser:
    """The parser of every command; given a known ``command``, of that one only, so a
    command imports no other command's module (``perifocal check`` starts faster)."""
    parser = _Parser(
        prog="perifocal",
        description="Orbital elements in, correct orbit pictures out: check, render, edit.",
        epilog="example:\n  perifocal convert --center earth --unit km "
        "--r 7000 0 0 --v 0 7.5 1\n\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"perifocal {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name in [command] if command in COMMANDS else list(COMMANDS):
        importlib.import_module(f"{__name__}.{COMMANDS[name]}").add_parser(sub)
    return parser


def report_input_error(err: UserInputError) -> None:
    lines = [f"perifocal: error in {err.source}"] + [f"  {p}" for p in err.problems]
    sys.stderr.write("\n".join(lines) + "\n")


def main(argv: Sequence[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    parser = build_parser(argv[0] if argv else None)
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help()
        return 2
    try:
        return int(args.run(args) or 0)
    except UserInputError as err:
        report_input_error(err)
        return 2
    except KeyboardInterrupt:
        sys.stderr.write("perifocal: interrupted\n")
        return 130
    except BrokenPipeError:
        return 0
    except Exception:  # an internal error: show everything, say how to report it
        import traceback

        traceback.print_exc()
        sys.stderr.write(REPORT + "\n")
        return 1
