"""``regentime plan [FILE]``: the whole plan and the printable setup card.

Front end only: the plan comes from :func:`regentime.planning.plan.make_plan`; text and
Markdown from :mod:`regentime.reports.setup_card`, JSON from
:func:`regentime.reports.plan_json.plan_to_dict`, CSV is the delay-generator table.
Exit code 3 when the plan cannot be met (the plan is still printed).
"""

from __future__ import annotations

import argparse
import sys

from regentime.commands.common import add_dump_option, add_file_argument, add_output_options, emit, plan_exit

EPILOG = """examples:
  regentime plan cavities/ti_sapphire_1khz.yaml
  regentime plan cavities/ti_sapphire_1khz.yaml --format md --output setup-card.md
  regentime plan cavities/ti_sapphire_1khz.yaml --format json --output plan.json
  regentime plan cavities/yb_100khz_cw.yaml --format csv        (the generator table only)
  regentime plan                                                 (the built-in demo cavity)

exit codes: 0 ok (warnings printed), 2 input wrong, 3 plan cannot be met (printed anyway).
Safety: Class 4 laser and kilovolt switch driver: follow IEC 60825-1 / ANSI Z136.1,
IEC 61010-1, local rules and your laser safety officer; verify the timing at low pump power
with a fast photodiode before full power."""


def register(sub) -> None:
    p = sub.add_parser(
        "plan", help="round trip, build-up, switch-out, switching windows and the delay-generator table",
        description="Plan a regenerative amplifier from a cavity file: round-trip time, build-up and "
                    "switch-out round trip, Pockels-cell switching windows and margins, the "
                    "delay-generator table and the contrast summary, as a printable setup card "
                    "(text or Markdown), JSON or the generator table as CSV.",
        epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter)
    add_file_argument(p, optional=True)
    add_dump_option(p)
    add_output_options(p, plot=True)
    p.set_defaults(run=run)


def render(plan, fmt: str) -> str:
    if fmt == "json":
        import json

        from regentime.reports.plan_json import plan_to_dict

        return json.dumps(plan_to_dict(plan), indent=2, ensure_ascii=False)
    from regentime.reports import setup_card

    if fmt == "md":
        return setup_card.setup_card_md(plan)
    if fmt == "csv":
        return setup_card.timing_csv(plan)
    return setup_card.setup_card_text(plan)


def run(args) -> int:
    from regentime.commands.loading import load, parse_dump
    from regentime.planning.plan import make_plan

    cavity = load(args.file, allow_demo=True)
    plan = make_plan(cavity, dump=parse_dump(args.dump))
    emit(args, render(plan, args.format))
    if args.format == "csv":  # the table stays machine-readable; the caution goes to the terminal
        from regentime.safety import CAUTION_SHORT

        print(CAUTION_SHORT, file=sys.stderr)
    if args.plot:
        from regentime.reports.plots import plot_buildup

        plot_buildup(plan, args.plot)
        if plan.spectrum is not None:  # the spectra beside it: <name>_spectrum.png
            from regentime.reports.spectrum_report import plot_spectrum

            stem, dot, ext = args.plot.rpartition(".")
            plot_spectrum(plan, f"{stem}_spectrum.{ext}" if dot else f"{args.plot}_spectrum")
    if plan.cannot_be_met and not args.quiet:
        errors = [c for c in plan.checks if c.level == "error"]
        from regentime.errors import safe_line

        print(f"cannot be met: {len(errors)} error(s) in the plan (each below; all in the checks)",
              file=sys.stderr)
        for c in errors[:3]:
            print(safe_line(f"  [{c.name}] {c.message}"), file=sys.stderr)
    return plan_exit(args, plan)
