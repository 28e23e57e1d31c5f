"""The inverse contrast question: which polarizer extinction ratio and which cell contrast
give a wanted pre-pulse ratio (the nearest or the worst pre-pulse)."""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Optional

from regentime.errors import InputError
from regentime.model import Cavity, PockelsCell, Polarizer
from regentime.numfmt import json_float
from regentime.planning import cell_model
from regentime.planning.optics import CavityOptics
from regentime.planning.contrast import ContrastResult


@dataclass
class TargetAnswer:
    """Polarizer extinction ratio and cell contrast needed for a pre-pulse ratio target."""

    target: float
    which: str  # "nearest" | "worst"
    now: float  # the ratio with the file as it is
    leak_needed: float
    extinction_needed: Optional[float]  # with the file's cell contrast (None: not reachable)
    contrast_needed: Optional[float]  # with the file's extinction ratio
    extinction_now: float
    contrast_now: float
    limit_by_contrast: float  # best ratio with a perfect polarizer and the file's contrast
    limit_by_extinction: float  # best ratio with a perfect cell and the file's polarizer
    both_factor: Optional[float] = None  # improve ER and contrast both by this factor

    @property
    def met(self) -> bool:
        return self.now >= self.target

    def to_dict(self) -> dict:
        return {"target_ratio": self.target, "which": self.which, "ratio_now": json_float(self.now),
                "met": self.met, "leak_needed": self.leak_needed,
                "extinction_ratio_needed": json_float(self.extinction_needed or math.inf)
                if self.extinction_needed is not None else None,
                "contrast_needed": json_float(self.contrast_needed or math.inf)
                if self.contrast_needed is not None else None,
                "extinction_ratio_now": json_float(self.extinction_now), "contrast_now": json_float(self.contrast_now),
                "best_ratio_with_perfect_polarizer": json_float(self.limit_by_contrast),
                "best_ratio_with_perfect_cell": json_float(self.limit_by_extinction),
                "both_improved_by": json_float(self.both_factor) if self.both_factor is not None else None}


def cavity_with(cavity: Cavity, extinction: Optional[float] = None, contrast: Optional[float] = None) -> Cavity:
    """The same cavity with the polarizer's extinction ratio and/or the cell's contrast replaced."""
    els = []
    for e in cavity.elements:
        if extinction is not None and isinstance(e, Polarizer):
            e = replace(e, extinction_ratio=extinction)
        if contrast is not None and isinstance(e, PockelsCell):
            e = replace(e, contrast=contrast)
        els.append(e)
    return replace(cavity, elements=tuple(els))


def leak_with(cavity: Cavity, optics: CavityOptics, extinction=None, contrast=None) -> float:
    """ℓ with the polarizer's ER and/or the cell's contrast replaced (the rest held)."""
    cav = cavity_with(cavity, extinction, contrast)
    pol = replace(optics.polarizer, extinction_ratio=extinction) if extinction is not None else optics.polarizer
    cell = replace(optics.cell, contrast=contrast) if contrast is not None else optics.cell
    arm = tuple(cell if a is optics.cell else (pol if a is optics.polarizer else a) for a in optics.cell_arm)
    return float(cell_model.leak_per_return(cav, replace(optics, polarizer=pol, cell=cell, cell_arm=arm)))


def required_for_target(cavity: Cavity, optics: CavityOptics, result: ContrastResult, target: float,
                        which: str = "nearest") -> TargetAnswer:
    """Extinction ratio (cell contrast held) and cell contrast (ER held) for a pre-pulse ratio.

    Pre-pulse ratios scale as 1/ℓ with everything else held (the build-up does not depend on
    the leak in this model), so the target needs ℓ* = ℓ·r_now/r_target; each parameter is
    then found by bisection on log ER (or log C) of the Jones model's ℓ, which falls
    monotonically with both.  ``None`` when the other parameter alone already limits the
    ratio below the target.
    """
    if not (target > 1 and math.isfinite(target)):
        raise InputError("--target", target, "a finite contrast ratio greater than 1 (e.g. 1e6 or 60 dB)")
    now = result.nearest_pre_ratio if which == "nearest" else result.worst_pre_ratio
    leak = result.leak_per_return
    pol, cell = optics.polarizer, optics.cell
    if not math.isfinite(now) or leak <= 0:
        return TargetAnswer(target, which, now, 0.0, pol.extinction_ratio, cell.contrast, pol.extinction_ratio,
                            cell.contrast, math.inf, math.inf)
    need = leak * now / target
    perfect = 1e15  # stands for "infinite" in the bisection (ℓ is then limited by the other part)
    leak_c = leak_with(cavity, optics, extinction=perfect)
    leak_e = leak_with(cavity, optics, contrast=perfect)

    er0, c0 = pol.extinction_ratio, cell.contrast

    def solve(kind):
        floor = {"extinction": leak_c, "contrast": leak_e, "both": 0.0}[kind]
        if need <= floor * (1 + 1e-9):
            return None
        f = {"extinction": lambda x: leak_with(cavity, optics, extinction=x),
             "contrast": lambda x: leak_with(cavity, optics, contrast=x),
             "both": lambda x: leak_with(cavity, optics, extinction=max(1.0 + 1e-9, er0 * x), contrast=c0 * x)}[kind]
        lo, hi = (0.0, math.log10(perfect)) if kind != "both" else (-6.0, 12.0)  # log10 of the parameter
        if f(10 ** lo) <= need:
            return 10 ** lo
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            if f(10 ** mid) > need:
                lo = mid
            else:
                hi = mid
        return 10 ** hi

    return TargetAnswer(target, which, now, need, solve("extinction"), solve("contrast"), pol.extinction_ratio,
                        cell.contrast, now * leak / leak_c if leak_c > 0 else math.inf,
                        now * leak / leak_e if leak_e > 0 else math.inf, solve("both"))


__all__ = ["TargetAnswer", "cavity_with", "leak_with", "required_for_target"]
