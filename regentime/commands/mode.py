"""``regentime mode FILE``: the TEM00 cavity mode, its radius at every element and the pump range.

Front end only: the mode comes from :func:`regentime.planning.mode_plan.plan_mode`; text and
the picture from :mod:`regentime.reports.mode_report`.  An unstable cavity is an input error
(exit 2) naming the half trace and the elements.
"""

from __future__ import annotations

import argparse

from regentime.commands.common import add_file_argument, add_output_options, emit

HELP = "TEM00 cavity mode: radius at every element, thermal lens, stable pump range"

EPILOG = """examples:
  regentime mode cavities/yb_100khz_cw.yaml
  regentime mode cavities/nd_yvo4_cw_200khz.yaml --format json
  regentime mode cavities/ti_sapphire_1khz.yaml --plot mode.png

exit codes: 0 ok (warnings printed), 2 input wrong (an unstable cavity included).
Safety: Class 4 laser: follow IEC 60825-1 / ANSI Z136.1, local rules and your laser safety
officer."""


def register(sub) -> None:
    p = sub.add_parser("mode", help=HELP, description="The TEM00 cavity mode from ABCD matrices: the 1/e² radius at every element, the thermal lens and the stable range of absorbed pump power.", epilog=EPILOG,
                       formatter_class=argparse.RawDescriptionHelpFormatter)
    add_file_argument(p, optional=True)
    add_output_options(p, plot=True, formats=("text", "json"))
    p.set_defaults(run=run)


def render(cavity, mode, fmt: str) -> str:
    from regentime.safety import CAUTION_SHORT

    if fmt == "json":
        import json

        from regentime.reports.plan_json import _clean

        body = mode.to_dict() | {"name": cavity.name, "source": cavity.source,
                                 "checks": [c.to_dict() for c in mode.checks],
                                 "cautions": [CAUTION_SHORT]}
        return json.dumps(_clean(body), indent=2, ensure_ascii=False)
    from regentime.reports import mode_report as r

    lines = [f"CAVITY MODE — {cavity.name}", ""] + r.mode_lines(mode) + ["", r.element_table(mode)]
    if mode.pump_table:
        lines += ["", "RADIUS AT THE CRYSTAL AGAINST ABSORBED PUMP POWER", r.pump_table(mode)]
    marks = {"error": "ERROR", "warning": "warning"}
    lines += [""] + [f"{marks[c.level]} [{c.name}]: {c.message}" for c in mode.checks
                     if c.level in marks]
    lines += ["", CAUTION_SHORT]
    return "\n".join(lines) + "\n"


def run(args) -> int:
    from regentime.commands.loading import load
    from regentime.errors import InputError
    from regentime.planning.mode_plan import plan_mode

    cavity = load(args.file, allow_demo=True)
    mode = plan_mode(cavity)
    if mode is None:
        raise InputError("cavity", None, "mirror radius_of_curvature, lenses or "
                         "gain.thermal_lens: nothing here sets a mode (gain.mode_radius is typed)")
    emit(args, render(cavity, mode, args.format))
    if args.plot:
        from regentime.reports.mode_report import plot_mode

        plot_mode(cavity, mode, args.plot)
    return 0
