"""The cavity as the rest of the program sees it: plain frozen dataclasses in SI units.

This module is the contract between the input layer (``regentime.fileformat``), which
builds a :class:`Cavity` from a YAML file, and everything downstream (physics, planning,
reports, front ends), which only reads it.  No I/O and no unit strings here: every float
is SI (m, s, J, W, Hz, m^2, rad); ratios are plain fractions (99.8 % -> 0.998).

``path`` fields hold the key path of the value in the cavity file (``cavity[2].pockels_cell``)
so that a later stage can still name the place a problem comes from.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Literal, Mapping, Optional, Union

from regentime.materials.gain_media import GainMedium

Profile = Literal["flat-top", "gaussian"]


@dataclass(frozen=True)
class Seed:
    energy: float  # J per pulse arriving at the polarizer
    duration: float  # s, stretched FWHM inside the amplifier
    train_rate: float  # Hz, oscillator pulse rate
    arrival: float  # s, first seed pulse at the polarizer after the generator trigger
    bandwidth: Optional[float] = None  # m, FWHM spectral width (optional, gain narrowing)


@dataclass(frozen=True)
class ThermalLens:
    """The gain medium's thermal lens: a given focal length, or the data to compute it."""

    focal_length: Optional[float] = None  # m at the operating pump power (given directly)
    heat_fraction: Optional[float] = None  # share of the absorbed pump turned to heat; None: quantum defect
    dn_dt: Optional[float] = None  # 1/K; None: the library's value
    conductivity: Optional[float] = None  # W/(m K); None: the library's value
    pump_radius: Optional[float] = None  # m; None: gain.pump_radius (end) or required (side: rod radius)
    pumping: Literal["end", "side"] = "end"


@dataclass(frozen=True)
class Gain:
    medium: GainMedium
    mode_radius: Optional[float]  # m, 1/e^2 radius in the crystal; None: computed from the cavity mode
    profile: Profile = "flat-top"
    pump_radius: Optional[float] = None  # m, 1/e^2 (gaussian) or edge (flat-top) radius; None: = mode_radius
    pump_profile: Profile = "gaussian"  # used only when profile == "gaussian"
    rings: int = 64  # radial rings for the gaussian extraction
    thermal_lens: Optional[ThermalLens] = None


@dataclass(frozen=True)
class Pump:
    mode: Literal["pulsed", "continuous"]
    wavelength: float  # m
    absorbed_fraction: float
    overlap: float
    energy: Optional[float] = None  # J per pump pulse (pulsed)
    power: Optional[float] = None  # W (continuous)
    lead: float = 0.0  # s, seed injection after the pump light (pulsed)
    latency: float = 0.0  # s, pump trigger input to light out (pulsed)
    duration: float = 0.0  # s, rectangular pump pulse length (pulsed); 0 = instantaneous


# ----- cavity elements -------------------------------------------------------------------


@dataclass(frozen=True)
class Element:
    index: int  # position in the file's cavity list (0-based)
    path: str  # "cavity[3].pockels_cell"
    name: str  # user's name or a generated one ("space 2")
    aperture: Optional[float] = None  # m, clear aperture diameter (cell: electrode gap)

    kind = "element"

    @property
    def thickness(self) -> float:
        """Length of material (m) the beam crosses; 0 for thin elements."""
        return 0.0

    @property
    def transmission(self) -> float:  # pragma: no cover - overridden
        return 1.0


@dataclass(frozen=True)
class Mirror(Element):
    reflectivity: float = 1.0
    radius_of_curvature: float = math.inf  # m, concave positive; inf: flat
    angle_of_incidence: float = 0.0  # rad (fold mirrors)
    kind = "mirror"

    @property
    def transmission(self) -> float:
        return self.reflectivity


@dataclass(frozen=True)
class Space(Element):
    length: float = 0.0  # m
    material: str = "air"  # dispersion key; "vacuum" allowed
    group_index: Optional[float] = None  # explicit override
    kind = "space"

    @property
    def thickness(self) -> float:
        return self.length

    @property
    def transmission(self) -> float:
        return 1.0


@dataclass(frozen=True)
class Plate(Element):
    """A window, rod or any plate of material (Brewster plate, compensator ...)."""

    length: float = 0.0
    material: str = "fused_silica"
    group_index: Optional[float] = None
    axis: str = "o"
    single_pass_transmission: float = 1.0
    brewster: bool = False  # Brewster-cut: reduced distance L/n³ tangential, L/n sagittal
    kind = "plate"

    @property
    def thickness(self) -> float:
        return self.length

    @property
    def transmission(self) -> float:
        return self.single_pass_transmission


@dataclass(frozen=True)
class PockelsCell(Element):
    crystal: str = "bbo"
    length: float = 0.0  # m, crystal length
    quarter_wave_voltage: Optional[float] = None  # V
    half_wave_voltage: Optional[float] = None  # V
    voltage: Optional[float] = None  # V actually applied (None: the scheme's nominal voltage)
    aperture: Optional[float] = None  # m, electrode gap (transverse cells)
    electro_optic_coefficient: Optional[float] = None  # m/V (override of the library value)
    contrast: float = 1000.0  # static contrast (depolarisation 1/contrast); common practice
    single_pass_transmission: float = 1.0
    group_index: Optional[float] = None
    axis: str = "o"
    kind = "pockels_cell"

    @property
    def thickness(self) -> float:
        return self.length

    @property
    def transmission(self) -> float:
        return self.single_pass_transmission


@dataclass(frozen=True)
class Waveplate(Element):
    retardance: float = 0.25  # waves (quarter = 0.25, half = 0.5)
    axis_angle: float = 0.7853981633974483  # rad, fast axis to the polarizer's P direction
    single_pass_transmission: float = 1.0
    material: str = "quartz"
    length: float = 0.0  # m (thin zero-order plates: 0 or a measured thickness)
    group_index: Optional[float] = None
    kind = "waveplate"

    @property
    def thickness(self) -> float:
        return self.length

    @property
    def transmission(self) -> float:
        return self.single_pass_transmission


@dataclass(frozen=True)
class Polarizer(Element):
    extinction_ratio: float = 1000.0  # R_s/R_p of the reflected port
    transmission_p: float = 1.0
    reflection_s: float = 1.0
    length: float = 0.0  # optical thickness crossed in transmission (m of material)
    material: str = "fused_silica"
    group_index: Optional[float] = None
    kind = "polarizer"

    @property
    def thickness(self) -> float:
        return self.length

    @property
    def transmission(self) -> float:
        return self.transmission_p


@dataclass(frozen=True)
class GainElement(Element):
    """The gain crystal's place in the cavity (its material comes from ``gain:``)."""

    length: float = 0.0
    group_index: Optional[float] = None
    single_pass_transmission: float = 1.0  # passive loss (coatings, scatter)
    brewster: bool = False  # Brewster-cut: reduced distance L/n³ tangential, L/n sagittal
    kind = "gain_medium"

    @property
    def thickness(self) -> float:
        return self.length

    @property
    def transmission(self) -> float:
        return self.single_pass_transmission


@dataclass(frozen=True)
class Lens(Element):
    """A thin lens (or any element acting as one) of focal length ``focal_length``."""

    focal_length: float = math.inf  # m, positive converging
    kind = "lens"

    @property
    def transmission(self) -> float:
        return 1.0


AnyElement = Union[Mirror, Space, Plate, PockelsCell, Waveplate, Polarizer, GainElement, Lens]


# ----- electronics ------------------------------------------------------------------------


@dataclass(frozen=True)
class Switch:
    scheme: Literal["quarter-wave", "half-wave"]
    rise_time: float  # s, 10-90 %
    fall_time: float  # s, 90-10 %
    on_latency: float  # s, trigger input to 50 % of the rising HV edge
    off_latency: float  # s
    jitter: float  # s rms
    max_gate: float  # s
    edge: Literal["linear", "erf"] = "linear"
    inputs: Literal["separate", "gate"] = "separate"  # two trigger inputs, or one gate input
    min_margin_sigma: float = 3.0  # a window margin below this many rms jitters is "marginal"


@dataclass(frozen=True)
class Cable:
    length: float  # m
    velocity_factor: float

    @property
    def delay(self) -> float:
        """Signal delay of the cable, s: length / (velocity_factor * c)."""
        c = 299_792_458.0  # m/s, exact (SI); equals scipy.constants.c
        return self.length / (self.velocity_factor * c)


@dataclass(frozen=True)
class Generator:
    resolution: Optional[float] = None  # s; None: no rounding
    insertion_delay: float = 0.0  # s, trigger input to the first output edge at zero delay


@dataclass(frozen=True)
class Scope:
    lead: Optional[float] = None  # s before the switch-out; None: one build-up earlier


@dataclass(frozen=True)
class Cleaner:
    """An external pulse-cleaning Pockels cell with its own polarizer."""

    extinction_ratio: float
    transmission: float
    rise_time: float
    fall_time: float
    latency: float
    cable: Optional[Cable] = None
    output: str = "out5"
    path_delay: float = 0.0  # s, regen output port to the cleaner cell


@dataclass(frozen=True)
class Checks:
    damage_intensity: Optional[float] = None  # W/m^2, user-given damage intensity
    b_integral_limit: float = 1.0  # rad (common practice where contrast matters; 3-5 rad is a CPA chain's total)


@dataclass(frozen=True)
class DumpRule:
    """Which round trip to switch out after: ``auto`` (the largest output), ``steady`` (the
    quietest round trip within 90 % of the largest output) or ``given`` (``round_trip``)."""

    rule: Literal["auto", "steady", "given"]
    round_trip: Optional[int] = None  # the given N >= 1 (rule "given" only)

    def __post_init__(self) -> None:
        if self.rule not in ("auto", "steady", "given"):
            raise ValueError(f"dump rule {self.rule!r}: expected auto, steady or given")
        if (self.rule == "given") != (self.round_trip is not None):
            raise ValueError("a given dump rule needs a round trip, and only it")

    @classmethod
    def of(cls, value: Union["DumpRule", str, int]) -> "DumpRule":
        """``auto`` / ``steady`` / a round trip N >= 1 (int) / a DumpRule -> DumpRule."""
        if isinstance(value, DumpRule):
            return value
        if isinstance(value, str) and value in ("auto", "steady"):
            return cls(value)
        if isinstance(value, int) and not isinstance(value, bool) and value >= 1:
            return cls("given", int(value))
        raise ValueError(f"dump {value!r}: expected auto, steady or a round trip number >= 1")

    def __str__(self) -> str:
        return str(self.round_trip) if self.rule == "given" else self.rule


@dataclass(frozen=True)
class Cavity:
    name: str
    wavelength: float  # m
    repetition_rate: float  # Hz
    seed: Seed
    gain: Gain
    pump: Pump
    elements: tuple  # tuple[AnyElement, ...], end mirror to end mirror
    switch: Switch
    cables: Mapping[str, Cable] = field(default_factory=dict)  # switch_on, switch_off, pump, gate, scope
    outputs: Mapping[str, str] = field(default_factory=dict)  # drives -> generator output name
    dump: DumpRule = field(default_factory=lambda: DumpRule("auto"))
    generator: Generator = field(default_factory=Generator)
    scope: Scope = field(default_factory=Scope)
    cleaner: Optional[Cleaner] = None
    checks: Checks = field(default_factory=Checks)
    air: Literal["air", "vacuum"] = "air"  # medium of spaces unless a space says otherwise
    source: Optional[str] = None  # file path it was read from (None: built-in demo)
    content_hash: Optional[str] = None  # short hash of the file's bytes

    def __post_init__(self) -> None:
        # ``auto``/``steady``/N given where a DumpRule is expected (e.g. ``replace(cavity, dump=12)``)
        if not isinstance(self.dump, DumpRule):
            object.__setattr__(self, "dump", DumpRule.of(self.dump))

    def with_dump(self, dump: Union["DumpRule", str, int]) -> "Cavity":
        return replace(self, dump=DumpRule.of(dump))

    def elements_of(self, cls) -> list:
        return [e for e in self.elements if isinstance(e, cls)]
