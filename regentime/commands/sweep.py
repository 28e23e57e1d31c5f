"""``regentime sweep FILE KEY=VALUES ...``: plan every combination of the swept keys.

VALUES: ``START:STOP:COUNT`` (units on START and STOP, both ends included, linear steps),
``log:START:STOP:COUNT`` (logarithmic steps), a list ``8mJ,9mJ,11mJ`` or one value.  Keys
are the file's key paths (``pump.energy``, ``cavity[7].length``; indices 0-based).  The
planning is :func:`regentime.sweeps.sweep`; this module parses, reports progress and emits.
"""

from __future__ import annotations

import argparse
import sys

from regentime.commands.common import add_dump_option, add_file_argument, add_output_options, emit

HELP = "plan every combination of values of one or more keys and tabulate the key figures"
EPILOG = """examples:
  regentime sweep cavities/ti_sapphire_1khz.yaml pump.energy=6mJ:12mJ:7
  regentime sweep cavities/ti_sapphire_1khz.yaml pump.energy=8mJ:12mJ:5 seed.energy=0.3nJ:0.7nJ:3 --format csv
  regentime sweep cavities/ti_sapphire_1khz.yaml seed.energy=log:10pJ:10nJ:7 --plot sweep.png
  regentime sweep cavities/ti_sapphire_1khz.yaml pump.energy=8mJ,9mJ,11mJ --figure nearest_pre_ratio

Ctrl-C stops the sweep and prints the rows done so far (exit 130).
exit codes: 0 ok, 2 input wrong (the key is named), 130 interrupted.
Safety: Class 4 laser and kilovolt switch driver: follow IEC 60825-1 / ANSI Z136.1,
IEC 61010-1, local rules and your laser safety officer."""


def register(sub) -> None:
    p = sub.add_parser("sweep", help=HELP, description=HELP + ".", epilog=EPILOG,
                       formatter_class=argparse.RawDescriptionHelpFormatter)
    add_file_argument(p)
    p.add_argument("settings", nargs="+", metavar="KEY=VALUES",
                   help="a key path and START:STOP:COUNT, log:START:STOP:COUNT or V1,V2,...")
    add_dump_option(p)
    p.add_argument("--figure", default="output_energy_J", metavar="NAME",
                   help="the figure drawn by --plot (default output_energy_J)")
    p.add_argument("--outputs", metavar="NAME,NAME", help="the figures to tabulate (default all)")
    p.add_argument("--workers", type=int, metavar="N", help="processes (default: by sweep size)")
    p.add_argument("--no-progress", action="store_true", help="no progress line on stderr")
    add_output_options(p, plot=True)
    p.set_defaults(run=run)


def _number_unit(text: str, key: str):
    from regentime.errors import InputError
    from regentime.units import _NUMBER

    m = _NUMBER.fullmatch(text)
    if not m:
        raise InputError(key, text, "a number with its unit, e.g. 8mJ")
    return float(m.group(1)), m.group(2).strip()


def expand(key: str, spec: str, dimension: str) -> list:
    """The values of one ``KEY=VALUES`` argument, as file text (``"8 mJ"``) or numbers."""
    from regentime.errors import InputError
    from regentime.units import DIMENSIONS, _trim, parse_quantity

    spec = spec.strip()
    if "," in spec:
        items = [s.strip() for s in spec.split(",")]
        if any(not s for s in items):
            raise InputError(key, spec, "a list of values separated by commas, e.g. 8mJ,9mJ,11mJ")
        return items
    parts = spec.split(":")
    log = parts[0].strip().lower() == "log"
    if log:
        parts = parts[1:]
    if len(parts) != 3:
        if log:
            raise InputError(key, spec, "log:START:STOP:COUNT")
        if not spec:
            raise InputError(key, spec, "START:STOP:COUNT, log:START:STOP:COUNT or V1,V2,...")
        return [spec]
    start, stop, count = (p.strip() for p in parts)
    try:
        n = int(count)
    except ValueError:
        n = 0
    if n < 1:
        raise InputError(key, spec, f"a whole COUNT ≥ 1 at the end of START:STOP:COUNT (got '{count}')")
    if dimension not in DIMENSIONS or dimension == "ratio_or_db":
        raise InputError(key, spec, "a list V1,V2,... (this key takes no numeric range)")
    dim = DIMENSIONS[dimension]
    a = parse_quantity(start, dimension, key) if dim.vector is not None or "%" in start else float(
        parse_quantity(start, dimension, key))
    b = parse_quantity(stop, dimension, key) if dim.vector is not None or "%" in stop else float(
        parse_quantity(stop, dimension, key))
    if n == 1 and a != b:
        raise InputError(key, spec, "COUNT ≥ 2 when START and STOP differ")
    if log and (a <= 0 or b <= 0):
        raise InputError(key, spec, "START and STOP above zero for log: steps")
    import numpy as np

    si = np.geomspace(a, b, n) if log else np.linspace(a, b, n)
    if dimension == "count":
        if not np.allclose(si, np.round(si)):
            raise InputError(key, spec, "whole-number steps (choose COUNT so that (STOP − START)/(COUNT − 1) is whole)")
        return [int(round(v)) for v in si]
    num, unit = _number_unit(start, key)
    if not unit or num == 0:
        num, unit = _number_unit(stop, key)
    scale = (parse_quantity(f"1 {unit}", dimension, key) if unit else 1.0)
    if dim.vector is None and not unit:
        return [float(_trim(float(v), 12)) for v in si]
    return [f"{_trim(float(v) / scale, 12)} {unit}" for v in si]


def parse_settings(doc, settings: list[str]) -> dict:
    """``["pump.energy=8mJ:12mJ:5", ...]`` -> ``{"pump.energy": ["8 mJ", ...]}`` (keys checked)."""
    from regentime.errors import InputError

    axes: dict = {}
    for item in settings:
        key, sep, spec = item.partition("=")
        key = key.strip()
        if not sep or not key:
            raise InputError("KEY=VALUES", item, "KEY=START:STOP:COUNT, KEY=log:START:STOP:COUNT "
                             "or KEY=V1,V2,... (e.g. pump.energy=8mJ:12mJ:5)")
        if key in axes:
            raise InputError(key, item, "each key swept once")
        axes[key] = expand(key, spec, doc.spec(key).dimension)
    return axes


def run(args) -> int:
    from regentime.api import source_text
    from regentime.errors import InputError
    from regentime.fileformat import CavityDocument
    from regentime.fileformat.loader import load_cavity
    from regentime.safety import CAUTION_SHORT
    from regentime.sweeps import FIGURES, sweep

    load_cavity(args.file)  # the file itself is valid before anything is swept
    text, name = source_text(args.file)
    axes = parse_settings(CavityDocument.from_text(text, name), args.settings)
    outputs = None
    if args.outputs:
        outputs = [o.strip() for o in args.outputs.split(",") if o.strip()]
    if args.plot and args.figure not in (outputs or FIGURES):
        raise InputError("--figure", args.figure, f"one of {', '.join(outputs or FIGURES)}")
    if len(axes) > 2 and args.plot:
        raise InputError("--plot", args.plot, "one or two swept keys to draw against")
    if args.workers is not None and args.workers < 1:
        raise InputError("--workers", args.workers, "a number of processes ≥ 1")
    quiet = getattr(args, "quiet", False)
    show = not (args.no_progress or quiet) and sys.stderr.isatty()

    def progress(done: int, total: int) -> None:
        if show:
            print(f"\rsweep: {done}/{total} planned", end="", file=sys.stderr, flush=True)

    result = sweep(args.file, axes, outputs=outputs, dump=args.dump, workers=args.workers,
                   progress=progress)
    if show:
        print(file=sys.stderr)
    if not quiet or result.interrupted:
        print(f"sweep: {len(result.rows)} of {result.total} combinations planned"
              + (" (interrupted: the rows done so far)" if result.interrupted else ""), file=sys.stderr)
    if args.format == "json":
        import json

        body = json.dumps({**result.to_dict(), "cautions": [CAUTION_SHORT]}, indent=2,
                          ensure_ascii=False)
    elif args.format == "csv":
        body = result.to_csv()
    elif args.format == "md":
        body = result.to_markdown() + "\n\n> " + CAUTION_SHORT
    else:
        body = result.to_text() + "\n\n" + CAUTION_SHORT
    emit(args, body)
    if args.format in ("json", "csv"):
        print(CAUTION_SHORT, file=sys.stderr)
    if args.plot and result.rows:
        from regentime.reports.plots import _pyplot, save_figure

        plt = _pyplot(args.plot)
        fig, ax = plt.subplots(figsize=(8, 4.5))
        result.plot(args.figure, ax)
        ax.set_title(f"{args.figure} against {', '.join(result.keys)}", fontsize=10)
        fig.tight_layout()
        save_figure(fig, args.plot)
        plt.close(fig)
    return 130 if result.interrupted else 0
