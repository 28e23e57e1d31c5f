"""``regentime trace FILE SCOPE``: measure the round trip and the build-up from a photodiode trace."""

from __future__ import annotations

import argparse

from regentime.commands.common import add_output_options

EPILOG = """examples:
  regentime trace cavities/ti_sapphire_1khz.yaml scope.csv
  regentime trace cavity.yaml scope.txt --channel pd --format json --output trace.json
  regentime trace cavity.yaml scope.npz --plot trace.png

SCOPE: delimited text (comma, semicolon, tab or spaces; header and metadata lines are found
automatically; time in the first column, seconds unless the header names ms/us/ns/ps) or
.npy/.npz.  Pulse amplitudes are pulse areas over one round trip.
dump_offset_round_trips = peak index - observed switch-out index (negative: switch out earlier);
switch_off_shift_s = that many measured round trips, to add to the switch-off delay."""


def register(sub) -> None:
    p = sub.add_parser(
        "trace", help="read a photodiode trace: real round trip, fitted build-up, switch-out correction",
        description="Read the photodiode trace of a build-up, measure the round-trip time and compare "
                    "it with the cavity file (length error), fit the build-up model (Frantz–Nodvik) to "
                    "the pulse envelope and say how many round trips earlier or later to switch out.",
        epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("file", metavar="FILE", help="cavity file (YAML)")
    p.add_argument("scope", metavar="SCOPE", help="trace file (.csv/.txt/.dat/.npy/.npz)")
    p.add_argument("--channel", metavar="NAME|N", help="signal column by name or number (1 = first "
                   "signal column); default: a column named like a photodiode, else the first")
    p.add_argument("--injection-time", metavar="TIME", help="time of the seed injection on the trace's "
                   "time axis (e.g. '12.5 ns'); anchors the fit to the file's seed energy")
    p.add_argument("--fit-seed", action="store_true", help="also fit the seed energy (with --injection-time)")
    p.add_argument("--no-fit", action="store_true", help="measure only; do not fit the build-up")
    add_output_options(p, plot=True)
    p.set_defaults(run=run)


def run(args) -> int:
    from regentime.commands.common import emit
    from regentime.commands.loading import load
    from regentime.trace import analyse_trace, inputs_from_cavity, read_trace
    from regentime.trace import report as rep

    cavity = load(args.file)
    inputs = inputs_from_cavity(cavity)
    injection = None
    if args.injection_time:
        from regentime.units import parse_quantity

        injection = parse_quantity(args.injection_time, "time", "--injection-time")
    trace = read_trace(args.scope, channel=args.channel)
    result = analyse_trace(trace, inputs, injection_time=injection, fit_seed=args.fit_seed,
                           fit=not args.no_fit)
    fmt = {"text": rep.format_text, "md": rep.format_markdown, "json": rep.format_json,
           "csv": rep.format_csv}
    emit(args, fmt[args.format](result))
    if args.plot:
        rep.plot_png(result, args.plot)
    return 0
