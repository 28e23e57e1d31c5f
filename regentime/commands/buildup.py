"""``regentime buildup FILE``: the energy build-up round trip by round trip."""

from __future__ import annotations

from regentime.commands.common import add_dump_option, add_file_argument, add_output_options, emit


def register(sub) -> None:
    p = sub.add_parser(
        "buildup", help="energy build-up per round trip with gain saturation",
        description="Energy in the cavity after every round trip (Frantz–Nodvik with gain "
                    "saturation), the output if switched out there, fluence, gain and stored energy "
                    "left, B-integral, and the sensitivity of the output to pump and seed.",
        epilog="example:\n  regentime buildup cavities/ti_sapphire_1khz.yaml --plot buildup.png",
        formatter_class=__import__("argparse").RawDescriptionHelpFormatter)
    add_file_argument(p)
    add_dump_option(p)
    add_output_options(p, plot=True)
    p.set_defaults(run=run)


def run(args) -> int:
    from regentime.commands.loading import load, parse_dump
    from regentime.planning.plan import make_plan
    from regentime.reports import buildup_report as rep

    cavity = load(args.file)
    plan = make_plan(cavity, dump=parse_dump(args.dump))
    fmt = {"text": rep.buildup_text, "md": rep.buildup_md, "csv": rep.buildup_csv, "json": rep.buildup_json}
    emit(args, fmt[args.format](plan))
    if args.plot:
        from regentime.reports.plots import plot_buildup

        plot_buildup(plan, args.plot)
    return 0
