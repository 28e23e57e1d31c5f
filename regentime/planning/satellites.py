"""Satellite pulses at the output port and their summary (the contrast planners' result types).

A satellite is a pre-pulse (round-trip leakage), a post-pulse or a seed pulse sent back to
the port; its ratio is E_main / E_satellite (> 1 for a satellite weaker than the main pulse,
``inf`` for one of zero energy, written ``null`` in JSON).  Definitions: docs/contrast.md.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from regentime.numfmt import json_float
from regentime.physics import contrast as pc


@dataclass(frozen=True)
class Satellite:
    """One satellite pulse at the output port.

    kind: "pre" (round-trip leakage), "post" or "seed"; index: k (round trips before the main
    pulse), j (after it) or m (seed pulse number from the file's arrival); time: s from the
    main pulse; time_from_trigger: s from the generator's trigger input (at the regen's port;
    at the cleaner for cleaned lists); energy: J; ratio: E_main/E.
    """

    kind: str
    index: int
    time: float
    time_from_trigger: float
    energy: float
    ratio: float
    note: str = ""

    @property
    def db(self) -> float:
        return pc.decibels(self.ratio)

    def to_dict(self) -> dict:
        return {"time_s": self.time, "energy_J": self.energy, "ratio": json_float(self.ratio),
                "time_from_trigger_s": self.time_from_trigger, "dB": json_float(self.db),
                "kind": self.kind, "index": self.index, "note": self.note}


@dataclass
class Summary:
    """The numbers users ask for first, from one set of satellites."""

    main_energy: float
    nearest_pre_ratio: float
    worst_pre_ratio: float
    worst_post_ratio: float
    worst_seed_ratio: float
    energy_within: float  # J in all satellites with |t| ≤ span
    span: float

    @property
    def energy_within_ratio(self) -> float:
        return pc.ratio(self.main_energy, self.energy_within)

    def to_dict(self) -> dict:
        return {"nearest_pre_ratio": json_float(self.nearest_pre_ratio),
                "worst_pre_ratio": json_float(self.worst_pre_ratio),
                "worst_post_ratio": json_float(self.worst_post_ratio),
                "worst_seed_ratio": json_float(self.worst_seed_ratio),
                "energy_within_J": self.energy_within, "energy_within_ratio": json_float(self.energy_within_ratio),
                "span_s": self.span}


def summarize(main: float, pre: list, post: list, seeds: list, span: float) -> Summary:
    """The summary of one set of satellites: nearest pre-pulse (k = 1), the worst of each
    kind, and the energy of all satellites within ±``span`` (s) of the main pulse."""
    nearest = next((s.ratio for s in pre if s.index == 1), math.inf)
    worst_pre = min((s.ratio for s in pre), default=math.inf)
    worst_post = min((s.ratio for s in post), default=math.inf)
    worst_seed = min((s.ratio for s in seeds), default=math.inf)
    within = sum(s.energy for s in pre + post + seeds if abs(s.time) <= span * (1 + 1e-12))
    return Summary(main, nearest, worst_pre, worst_post, worst_seed, within, span)


__all__ = ["Satellite", "Summary", "summarize"]
