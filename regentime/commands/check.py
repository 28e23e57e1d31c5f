"""``regentime check FILE``: validate the file and run every check (damage, B-integral, timing)."""

from __future__ import annotations

from regentime.commands.common import add_file_argument, add_output_options, emit, plan_exit


def register(sub) -> None:
    p = sub.add_parser(
        "check", help="validate a cavity file and run the damage, B-integral and timing checks",
        description="Load and validate the cavity file, plan it, and list every check with its "
                    "numbers. Exit 0 when nothing is an error (warnings are printed), 2 when the "
                    "file is wrong, 3 when the plan cannot be met.",
        epilog="example:\n  regentime check cavities/yb_100khz_cw.yaml",
        formatter_class=__import__("argparse").RawDescriptionHelpFormatter)
    add_file_argument(p)
    add_output_options(p)
    p.set_defaults(run=run)


def run(args) -> int:
    import json

    from regentime.commands.loading import load
    from regentime.planning.plan import CAUTION, make_plan
    from regentime.reports.buildup_report import checks_text
    from regentime.reports.tables import csv_table, md_table

    cavity = load(args.file)
    plan = make_plan(cavity)
    rows = [(c.level, c.name, c.message) for c in plan.checks]
    if args.format == "json":
        text = json.dumps({"file": cavity.source, "valid": True, "cannot_be_met": plan.cannot_be_met,
                           "checks": [c.to_dict() for c in plan.checks], "cautions": [CAUTION]},
                          indent=2, ensure_ascii=False)
    elif args.format == "csv":
        text = csv_table(("level", "name", "message"), rows)
    elif args.format == "md":
        text = f"# Checks: {cavity.name}\n\n" + md_table(("level", "check", "message"), rows, align="lll") + f"\n\n{CAUTION}"
    else:
        verdict = "the plan cannot be met (see the errors)" if plan.cannot_be_met else "file valid; plan can be met"
        text = f"{cavity.source or 'built-in demo'}: {verdict}\n{checks_text(plan)}\n\n{CAUTION}"
    emit(args, text)
    return plan_exit(args, plan)
