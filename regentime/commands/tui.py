"""``regentime tui [FILE]``: the terminal planner (Textual), imported only when it runs."""

from __future__ import annotations

import argparse
import sys

HELP = """Open a cavity file in the terminal planner: edit values, watch the build-up, the
switch-out round trip, the Pockels-cell windows, the generator table and the contrast follow,
save the file (comments kept) and export the table or the plot.  Without FILE: the built-in
demo (an invented scenario).  F1 in the planner lists every key; ctrl+q quits.

example:
  regentime tui cavities/ti_sapphire_1khz.yaml

Safety: regens are Class 4 lasers and Pockels-cell drivers switch kilovolts; follow
IEC 60825-1 / ANSI Z136.1, IEC 61010-1, local rules and your laser safety officer, and verify
any timing at low pump power with a fast photodiode first."""


def register(subparsers) -> None:
    p = subparsers.add_parser("tui", help="interactive terminal planner",
                              description=HELP, formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("file", nargs="?", metavar="FILE",
                   help="cavity file (YAML); without it, the built-in demo cavity")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from regentime.tui.app import PlannerApp  # Textual is imported only here

    app = PlannerApp(path=args.file)
    code = app.run()
    if app.autosaved:
        print(f"regentime tui: stopped on an unexpected error; your unsaved edits are in "
              f"{app.autosaved}", file=sys.stderr)
    if app.return_code not in (None, 0):  # Textual already showed what went wrong
        return int(app.return_code)
    return int(code or 0)
