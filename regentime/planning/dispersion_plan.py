"""The dispersion the regen adds: per element, per round trip, at the switch-out and near it.

Counting (docs/physics.md, "Round trip"): every element between the end mirrors is crossed
twice per round trip (the polarizer twice in transmission); E₀ is just past the polarizer,
so injection adds nothing; the pulse switched out after round trip N makes one more
cell-arm double pass and leaves by reflection at the polarizer.  Material per element as
for the group index: a space its gas (``air: vacuum`` → nothing), the gain crystal the
gain medium's host on its axis (Ti:sapphire: extraordinary), a Pockels cell its crystal
on its ``axis`` (default ordinary), a plate its ``axis``, a waveplate the mean of o and e.
An element without a material or length adds nothing.
"""

from __future__ import annotations

from dataclasses import dataclass

from regentime.errors import InputError
from regentime.model import Cavity, GainElement, PockelsCell, Space, Waveplate
from regentime.physics.gdd import Dispersion, material_dispersion


@dataclass(frozen=True)
class ElementDispersion:
    name: str
    kind: str
    material: str
    length_m: float
    gdd_s2: float
    tod_s3: float
    fod_s4: float


@dataclass(frozen=True)
class DispersionResult:
    wavelength_m: float
    per_round_trip: Dispersion
    cell_arm_double_pass: Dispersion
    elements: tuple  # tuple[ElementDispersion, ...], single pass, file order
    dump_round_trip: int

    def after(self, round_trips: int) -> Dispersion:
        """Dispersion of the pulse switched out after ``round_trips`` round trips."""
        return self.per_round_trip.scaled(round_trips) + self.cell_arm_double_pass

    @property
    def at_dump(self) -> Dispersion:
        return self.after(self.dump_round_trip)

    def to_dict(self) -> dict:
        """The ``dispersion`` block of the plan JSON (SI; element figures per single pass)."""
        def orders(d: Dispersion) -> dict:
            return {"gdd_s2": d.gdd, "tod_s3": d.tod, "fod_s4": d.fod}
        return {
            "wavelength_m": self.wavelength_m,
            "per_round_trip": orders(self.per_round_trip),
            "at_dump": {"round_trip": self.dump_round_trip, **orders(self.at_dump)},
            "elements": [dict(vars(e)) for e in self.elements],
            "by_round_trip": [{"round_trip": k, **orders(d)} for k, d in self.by_round_trip()],
        }

    def by_round_trip(self) -> list[tuple[int, Dispersion]]:
        n = self.dump_round_trip
        return [(k, self.after(k)) for k in range(max(1, n - 2), n + 3)]


def _material_axis(element, cavity: Cavity) -> tuple[str, str]:
    if isinstance(element, Space):
        material = element.material
        if material == "air" and cavity.air == "vacuum":
            material = "vacuum"
        return material, "o"
    if isinstance(element, GainElement):
        return cavity.gain.medium.host, cavity.gain.medium.axis
    if isinstance(element, PockelsCell):
        return element.crystal, element.axis
    if isinstance(element, Waveplate):
        return element.material, "mean"
    return getattr(element, "material", "vacuum"), getattr(element, "axis", "o")


def plan_dispersion(cavity: Cavity, optics, dump_round_trip: int) -> DispersionResult:
    """Per-element, per-round-trip and switch-out dispersion of ``cavity`` (SI)."""
    lam = cavity.wavelength
    per: dict[int, Dispersion] = {}
    rows = []
    for e in cavity.elements:
        material, axis = _material_axis(e, cavity)
        if e.thickness == 0.0 or material == "vacuum":
            d = Dispersion()
        else:
            try:
                d = material_dispersion(material, lam, e.thickness, axis)
            except ValueError as exc:
                raise InputError(e.path, material, f"a material with a dispersion formula ({exc})") from None
        per[id(e)] = d
        rows.append(ElementDispersion(e.name, e.kind, material, e.thickness, d.gdd, d.tod, d.fod))
    total = Dispersion()
    for d in per.values():
        total = total + d
    cell = Dispersion()
    for e in optics.cell_arm:
        cell = cell + per[id(e)]
    return DispersionResult(lam, total.scaled(2.0), cell.scaled(2.0), tuple(rows), dump_round_trip)
