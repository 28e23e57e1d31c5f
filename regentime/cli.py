"""Command-line entry point: ``regentime COMMAND ...``.

Each command lives in ``regentime/commands/<name>.py`` with ``register(subparsers)`` and
``run(args) -> int``, listed once in :data:`COMMAND_HELP`; only the command being run is
imported.  This module only builds the parser and turns the library's errors into
one clean line and the documented exit code (docs/definitions.md): 0 ok, 2 input wrong, 3 plan cannot be
met, 1 internal error.  Nothing heavy is imported here.
"""

from __future__ import annotations

import argparse
import importlib
import sys

#: One entry per command: its one-line help for ``regentime --help``.  The module
#: ``regentime.commands.<name>`` is imported only when that command runs (or its own
#: ``--help`` is asked for), so start-up does not pay for the other commands' imports.
#: A new command is one line here plus its module.
COMMAND_HELP: dict[str, str] = {
    "plan": "round trip, build-up, switch-out, switching windows and the delay-generator table",
    "buildup": "energy build-up per round trip with gain saturation",
    "check": "validate a cavity file and run the damage, B-integral and timing checks",
    "contrast": "pre- and post-pulse contrast, seed leakage and the pulse cleaner",
    "stability": "shot-to-shot stability map (period doubling) and noise transfer",
    "trace": "read a photodiode trace: real round trip, fitted build-up, switch-out correction",
    "mode": "TEM00 cavity mode: radius at every element, thermal lens, stable pump range",
    "sweep": "plan every combination of values of one or more keys and tabulate the key figures",
    "materials": "list the built-in material library and its sources",
    "tui": "interactive terminal planner",
}
COMMANDS = tuple(COMMAND_HELP)

EPILOG = """examples:
  regentime plan cavities/ti_sapphire_1khz.yaml
  regentime plan cavities/ti_sapphire_1khz.yaml --format json --output plan.json
  regentime materials

exit codes: 0 ok (warnings are printed), 2 input wrong, 3 plan cannot be met, 1 internal error.
Safety: regens are Class 4 lasers and Pockels-cell drivers switch kilovolts; follow IEC 60825-1 /
ANSI Z136.1, IEC 61010-1, local rules and your laser safety officer."""


def _chosen_command(argv: list[str] | None) -> str | None:
    """The command named on the line: the first word that is not an option (the top-level
    parser has only ``-h`` and ``--version``, which take no value)."""
    words = sys.argv[1:] if argv is None else argv
    for word in words:
        if not word.startswith("-"):
            return word if word in COMMAND_HELP else None
    return None


def build_parser(argv: list[str] | None = None, *, every: bool = False) -> argparse.ArgumentParser:
    """The parser.  Only the command named in *argv* gets its module imported and its full
    options registered; the others are listed by name and help (enough for ``--help`` and for
    argparse's "invalid choice" message).  ``every=True`` registers every command fully."""
    from regentime import __version__

    parser = argparse.ArgumentParser(
        prog="regentime",
        description="Plan a regenerative amplifier from a cavity file: round-trip time, build-up, "
        "switch-out round trip, Pockels-cell timing, delay-generator table and contrast.",
        epilog=EPILOG,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"regentime {__version__}")
    from regentime.commands.common import add_global_options

    add_global_options(parser, top=True)
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    chosen = _chosen_command(argv)
    for name in COMMANDS:
        if not every and name != chosen:
            sub.add_parser(name, help=COMMAND_HELP[name])
            continue
        try:
            module = importlib.import_module(f"regentime.commands.{name}")
        except ModuleNotFoundError as exc:  # a command still being written
            if exc.name != f"regentime.commands.{name}":
                raise
            sub.add_parser(name, help=COMMAND_HELP[name])
            continue
        module.register(sub)
    for command_parser in sub.choices.values():  # -q/-v/--strict also after the command
        add_global_options(command_parser)
    return parser


def main(argv: list[str] | None = None) -> int:
    from regentime.errors import InputError, InputErrors, PlanError, RegentimeError, safe_line

    parser = build_parser(argv)
    args = parser.parse_args(argv)
    if not getattr(args, "run", None):
        parser.print_help()
        return 2
    try:
        return int(args.run(args) or 0)
    except InputErrors as exc:
        for err in exc.errors:
            print(safe_line(f"error: {err.one_line()}"), file=sys.stderr)
        return 2
    except InputError as exc:
        print(safe_line(f"error: {exc.one_line()}"), file=sys.stderr)
        return 2
    except PlanError as exc:
        for line in str(exc).splitlines() or [""]:
            print(safe_line(f"cannot plan: {line}"), file=sys.stderr)
        return 3
    except RegentimeError as exc:
        print(safe_line(f"error: {exc}"), file=sys.stderr)
        return exc.exit_code
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return 0
    except Exception as exc:  # noqa: BLE001 - the one place that turns a bug into exit 1
        import traceback

        print(
            f"internal error (a bug in regentime): {type(exc).__name__}: {exc}\n"
            "Please report it with the cavity file and the command line; "
            "add -v (or set REGENTIME_DEBUG=1) to see the traceback.",
            file=sys.stderr,
        )
        import os

        if getattr(args, "verbose", False) or os.environ.get("REGENTIME_DEBUG"):
            traceback.print_exc()
        return 1


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
