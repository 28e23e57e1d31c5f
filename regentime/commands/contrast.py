"""``regentime contrast FILE``: pre-pulses, post-pulses, seed leakage and the pulse cleaner.

Front end only: the plan comes from :func:`regentime.planning.plan.make_plan`, the satellites
from :mod:`regentime.planning.contrast`, the text from :mod:`regentime.reports.contrast_report`.
"""

from __future__ import annotations

import argparse
import sys

from regentime.atomic_write import write_atomic
from regentime.commands.common import add_dump_option, add_file_argument, add_output_options, emit

EPILOG = """examples:
  regentime contrast cavities/ti_sapphire_1khz.yaml
  regentime contrast cavities/nd_ylf_ps_10hz.yaml --plot contrast.png
  regentime contrast cavities/ti_sapphire_1khz.yaml --target 1e4        (or --target 40dB)
  regentime contrast cavities/ti_sapphire_1khz.yaml --span 200ns --format csv -o satellites.csv

Ratios are E_main / E_satellite (larger is cleaner); JSON writes an infinite ratio as null.
Safety: Class 4 laser and kilovolt switch drivers: follow IEC 60825-1 / ANSI Z136.1,
IEC 61010-1, local rules and your laser safety officer; check contrast with a fast
photodiode at low pump power before full power."""


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "contrast", help="pre- and post-pulse contrast, seed leakage and the pulse cleaner",
        description="Satellite pulses around the regen's output pulse: round-trip leakage pre-pulses "
                    "(polarizer extinction ratio and cell contrast), post-pulses from imperfect "
                    "switch-out, seed pulses the cavity sends back; the gate and effect of an "
                    "external cleaning cell (cleaner: section); --target answers what extinction "
                    "ratio or cell contrast a pre-pulse ratio needs.",
        epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter)
    add_file_argument(p)
    p.add_argument("--target", metavar="RATIO",
                   help="pre-pulse contrast ratio to reach (e.g. 1e5 or '50 dB'): reports the polarizer "
                        "extinction ratio and cell contrast needed, the rest of the file held")
    p.add_argument("--span", metavar="TIME",
                   help="half-width of the window around the main pulse for the listed seed pulses and "
                        "the summed satellite energy (e.g. '150 ns'; default 10 round trips)")
    add_dump_option(p)
    add_output_options(p, plot=True)
    p.set_defaults(run=run)


def parse_ratio(text: str) -> float:
    """A contrast ratio: a plain number (1e5) or decibels ('50 dB', '50dB')."""
    from regentime.errors import InputError

    raw = str(text).strip()
    try:
        if raw.lower().endswith("db"):
            value = 10.0 ** (float(raw[:-2].strip()) / 10.0)
        else:
            value = float(raw)
    except ValueError:
        raise InputError("--target", text, "a ratio such as 1e5 or '50 dB'") from None
    if not (value > 1.0 and value < float("inf")):
        raise InputError("--target", text, "a finite ratio greater than 1 (E_main / E_pre-pulse)")
    return value


def parse_span(text: str) -> float:
    from regentime.errors import InputError
    from regentime.units import parse_quantity

    value = parse_quantity(text, "time", "--span")
    if not value > 0:
        raise InputError("--span", text, "a positive time")
    return float(value)


def run(args: argparse.Namespace) -> int:
    from regentime.errors import PlanError
    from regentime.commands.loading import parse_dump
    from regentime.fileformat import load_cavity
    from regentime.planning.contrast import plan_contrast
    from regentime.planning.contrast_target import required_for_target
    from regentime.planning.plan import make_plan
    from regentime.reports import contrast_report as rep

    target = parse_ratio(args.target) if args.target is not None else None
    span = parse_span(args.span) if args.span is not None else None
    cavity = load_cavity(args.file)
    plan = make_plan(cavity, dump=parse_dump(args.dump))
    if span is not None:  # the contrast over the user's span instead of the default one
        plan = plan.with_contrast(plan_contrast(plan.cavity, plan.optics, plan.buildup,
                                                plan.switching, span=span))
    targets = None
    if target is not None:
        targets = [required_for_target(cavity, plan.optics, plan.contrast, target, which)
                   for which in ("nearest", "worst")]
    text = rep.render(plan, args.format, targets)
    emit(args, text)
    if args.format == "csv":
        from regentime.safety import CAUTION_SHORT

        print(CAUTION_SHORT, file=sys.stderr)
    if args.plot:
        write_atomic(args.plot, rep.plot_png(plan))  # a missing folder is its exit-2 error
    errors = [c for c in plan.contrast.checks if c.level == "error"]
    if errors:
        raise PlanError("; ".join(c.message for c in errors))
    return 0
