"""``regentime stability FILE``: shot-to-shot stability map, bifurcation diagrams, noise transfer."""

from __future__ import annotations

import argparse
import sys

from regentime.commands.common import add_dump_option, add_file_argument, add_output_options, emit

EPILOG = """examples:
  regentime stability cavities/yb_100khz_cw.yaml
  regentime stability FILE --rates 10kHz:300kHz:200 --round-trips 1:200 --plot map.png
  regentime stability FILE --rates 50kHz,100kHz --round-trips 20,40,60 --format json
  regentime stability FILE --seed-energies 0.1nJ:100nJ:30log --round-trips 10:80
  regentime stability FILE --pump 10W:40W:31 --pump-noise 1% --random-seed 7

ranges: A:B:n gives n values from A to B (A:B:nlog: geometric spacing); v1,v2,... a list;
round trips a:b[:step] (inclusive) or n1,n2,....  Periods: 1, 2, 4, 8, 16, 0 irregular,
-1 the round trips take longer than the period.

Safety: a regen is a Class 4 laser and its Pockels-cell driver switches kilovolts; follow
IEC 60825-1 / ANSI Z136.1, IEC 61010-1, local rules and your laser safety officer."""


def register(sub) -> None:
    p = sub.add_parser(
        "stability", help="shot-to-shot stability map (period doubling) and noise transfer",
        description="With a continuous pump the gain does not fully recover between shots: for some "
                    "(round trips, repetition rate) the output alternates between energies or becomes "
                    "irregular.  Maps the steady state (period 1, 2, 4, …, irregular) over round trips "
                    "× repetition rate (or seed energy, or pump), gives the output energies, the "
                    "sensitivity of the output to pump and seed, and a Monte-Carlo output rms.",
        epilog=EPILOG, formatter_class=argparse.RawDescriptionHelpFormatter)
    add_file_argument(p)
    p.add_argument("--rates", metavar="RANGE", help="repetition rates, e.g. 10kHz:300kHz:200 or 50kHz,100kHz "
                                                     "(default: 0.2× to 2× the file's rate, 120 values)")
    p.add_argument("--round-trips", metavar="RANGE", help="switch-out round trips, e.g. 1:200 or 10:80:2 or "
                                                           "20,40 (default: 1 to about three times the peak)")
    sweep = p.add_mutually_exclusive_group()
    sweep.add_argument("--seed-energies", metavar="RANGE", help="sweep the seed energy instead of the rate, "
                                                                 "e.g. 0.1nJ:100nJ:30log")
    sweep.add_argument("--pump", metavar="RANGE", help="sweep the pump power (continuous) or pump energy "
                                                        "(pulsed) instead of the rate, e.g. 10W:40W:31")
    p.add_argument("--ring-memory", action="store_true",
                   help="Gaussian profile: carry the depleted radial profile from shot to shot (exact, slow; "
                        "for small maps)")
    p.add_argument("--pump-noise", metavar="RMS", help="Monte-Carlo output rms for this pump rms, e.g. 1%%")
    p.add_argument("--seed-noise", metavar="RMS", help="seed-energy rms for the Monte-Carlo (default 0)")
    p.add_argument("--random-seed", type=int, default=0, metavar="INT",
                   help="random-number seed of the Monte-Carlo (same seed, same numbers; default 0)")
    p.add_argument("--at", metavar="N", type=int, help="round trips of the bifurcation diagram against rate "
                                                      "and of the Monte-Carlo (default: the plan's switch-out)")
    add_dump_option(p)
    p.add_argument("--no-progress", action="store_true", help="no progress bar on standard error")
    add_output_options(p, plot=True)
    p.set_defaults(run=run)


def _split_range(text: str, option: str):
    from regentime.errors import InputError

    t = text.strip()
    if ":" in t and "," not in t:
        parts = t.split(":")
        if len(parts) != 3:
            raise InputError(option, text, "A:B:n (n values from A to B) or a list v1,v2,…")
        return "range", parts
    items = [s for s in t.split(",") if s.strip()]
    if not items:
        raise InputError(option, text, "A:B:n or a list v1,v2,…")
    return "list", items


def parse_values(text: str, dimension: str, option: str):
    """``A:B:n`` (linear), ``A:B:nlog`` (geometric) or ``v1,v2,…`` with units -> sorted SI array."""
    import numpy as np

    from regentime.errors import InputError
    from regentime.units import parse_quantity

    kind, parts = _split_range(text, option)
    if kind == "list":
        vals = [parse_quantity(s.strip(), dimension, option) for s in parts]
    else:
        a = parse_quantity(parts[0].strip(), dimension, option)
        b = parse_quantity(parts[1].strip(), dimension, option)
        n_text = parts[2].strip().lower()
        geometric = n_text.endswith("log")
        n_text = n_text[:-3] if geometric else n_text
        try:
            n = int(n_text)
        except ValueError:
            raise InputError(option, text, "a whole number of values after the second colon") from None
        if n < 1 or n > 5000:
            raise InputError(option, text, "between 1 and 5000 values")
        if geometric and (a <= 0 or b <= 0):
            raise InputError(option, text, "positive ends for a geometric range")
        vals = (np.geomspace(a, b, n) if geometric else np.linspace(a, b, n)).tolist()
    arr = np.unique(np.asarray(vals, dtype=float))
    if np.any(arr <= 0):
        raise InputError(option, text, "positive values")
    return arr


def parse_round_trips(text: str):
    """``a:b[:step]`` (inclusive) or ``n1,n2,…`` -> sorted unique ints ≥ 1."""
    import numpy as np

    from regentime.errors import InputError

    t = text.strip()
    try:
        if ":" in t and "," not in t:
            parts = [int(s) for s in t.split(":")]
            if len(parts) not in (2, 3) or (len(parts) == 3 and parts[2] < 1):
                raise ValueError
            a, b = parts[0], parts[1]
            step = parts[2] if len(parts) == 3 else 1
            ns = np.arange(a, b + 1, step)
        else:
            ns = np.asarray([int(s) for s in t.split(",") if s.strip()])
    except ValueError:
        raise InputError("--round-trips", text, "a:b[:step] or n1,n2,… with whole numbers") from None
    ns = np.unique(ns)
    if ns.size == 0 or ns[0] < 1 or ns[-1] > 100000:
        raise InputError("--round-trips", text, "round trips between 1 and 100000")
    return ns


def _percent(text: str, option: str) -> float:
    from regentime.errors import InputError
    from regentime.units import parse_quantity

    v = parse_quantity(text, "ratio", option)
    if not 0 <= v < 0.5:
        raise InputError(option, text, "a relative rms between 0 and 50 %, e.g. 1%")
    return v


def run(args) -> int:
    import numpy as np

    from regentime.commands.loading import load, parse_dump
    from regentime.planning import stability as st
    from regentime.planning.buildup_plan import plan_buildup
    from regentime.planning.optics import cavity_optics
    from regentime.reports import stability_report as rep

    cavity = load(args.file)
    pump_rms = _percent(args.pump_noise, "--pump-noise") if args.pump_noise else None
    seed_rms = _percent(args.seed_noise, "--seed-noise") if args.seed_noise else 0.0
    dump = parse_dump(args.dump)
    if dump is not None:
        from dataclasses import replace

        cavity = replace(cavity, dump=dump)
    f0 = cavity.repetition_rate
    continuous = cavity.pump.mode == "continuous"
    if not continuous:
        print("note: pulsed pump: each shot starts from a freshly pumped crystal (what is left of "
              "the previous shot is not carried over in this model), so there is no shot-to-shot "
              "coupling and every point of the map is period 1 by construction; the map matters "
              "for a continuous pump", file=sys.stderr)
    axis, values = "rate", None
    if args.seed_energies:
        axis, values = "seed", parse_values(args.seed_energies, "energy", "--seed-energies")
    elif args.pump:
        axis = "pump"
        values = parse_values(args.pump, "power" if continuous else "energy", "--pump")
    fixed_rate = None
    if args.rates:
        rates = parse_values(args.rates, "frequency", "--rates")
        if axis == "rate":
            values = rates
        elif rates.size == 1:
            fixed_rate = float(rates[0])
        else:
            from regentime.errors import InputError

            raise InputError("--rates", args.rates, "one rate when --seed-energies or --pump is swept")
    elif axis == "rate":
        values = np.unique(np.concatenate([np.linspace(0.2 * f0, 2.0 * f0, 120), [f0]]))
    ns = parse_round_trips(args.round_trips) if args.round_trips else None
    optics = cavity_optics(cavity)
    buildup = plan_buildup(cavity, optics)
    n_file = int(buildup.dump_round_trip)
    at = int(args.at) if args.at else n_file
    if ns is None:
        top = max(n_file, int(buildup.peak_round_trip))
        ns = np.arange(1, max(20, 3 * top) + 1)
    total = ns.size * values.size
    progress = None
    if not args.no_progress and total * max(1, int(ns[-1])) > 2e5 and sys.stderr.isatty():
        progress = _progress_bar()
    if progress is not None:
        with progress[0]:
            m = st.stability_map(cavity, ns, axis, values, rate=fixed_rate, optics=optics,
                                 ring_memory=args.ring_memory, file_round_trip=n_file, on_progress=progress[1])
    else:
        m = st.stability_map(cavity, ns, axis, values, rate=fixed_rate, optics=optics,
                             ring_memory=args.ring_memory, file_round_trip=n_file)
    noise = st.noise_transfer(cavity, optics, buildup)
    mc = None
    if pump_rms is not None or seed_rms:
        mc = st.monte_carlo(cavity, at, pump_rms or 0.0, seed_rms, args.random_seed, optics=optics,
                            buildup=buildup)
    rows = ns if noise.output.size > 1 else None
    fmt = {"text": rep.stability_text, "md": rep.stability_md, "csv": rep.stability_csv, "json": rep.stability_json}
    emit(args, fmt[args.format](m, noise, mc, rows))
    if args.plot and not m.interrupted:
        sweeps = None
        if continuous:
            rate_line = np.linspace(values.min(), values.max(), 400) if axis == "rate" else \
                np.linspace(0.2 * f0, 2.0 * f0, 400)
            n_line = np.arange(1, int(ns[-1]) + 1)
            sweeps = st.bifurcation(cavity, at, fixed_rate or f0, rate_line, n_line, optics=optics)
        rep.plot_stability(m, sweeps, args.plot)
    if m.interrupted:
        print("stopped: the output holds the points computed so far", file=sys.stderr)
        return 130
    return 0


def _progress_bar():
    from rich.console import Console
    from rich.progress import BarColumn, Progress, TextColumn, TimeRemainingColumn

    prog = Progress(TextColumn("stability map"), BarColumn(), TextColumn("{task.completed}/{task.total} points"),
                    TimeRemainingColumn(), console=Console(stderr=True), transient=True)
    task = prog.add_task("map", total=1)

    def update(done: int, total: int) -> None:
        prog.update(task, completed=done, total=total)

    return prog, update
