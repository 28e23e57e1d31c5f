"""Test cavities for the switching and timing tests (invented test scenarios, not real
instruments).  Spaces are vacuum and every crystal has an explicit group index, so crossing
times and round-trip times can be computed by hand from the lengths."""

from __future__ import annotations

from scipy.constants import c as C  # general-purpose reference library

TEMPLATE = """\
format: regentime/1
name: test cavity for switching (invented)
wavelength: 800 nm
repetition_rate: {rep}
air: vacuum
seed: {{energy: 2 nJ, duration: {pulse}, train_rate: 80 MHz, arrival: 7.3 ns}}
gain: {{material: ti_sapphire, mode_radius: 0.75 mm}}
pump: {pump}
cavity:
  - mirror: {{name: end-A, reflectivity: 99.8 %}}
  - space: {a} mm
  - pockels_cell: {{name: cell, crystal: bbo, length: {lc} mm, group_index: {nc}, {volts}contrast: {contrast}}}
  - space: {b} mm
{plate}  - polarizer: {{name: tfp, extinction_ratio: {er}, transmission_p: 98 %, reflection_s: 99.5 %}}
  - space: {d} mm
  - gain_medium: {{name: xtal, length: {lg} mm, group_index: {ng}}}
  - space: {e} mm
  - mirror: {{name: end-B, reflectivity: 99.9 %}}
switch: {{scheme: {scheme}, rise_time: {rise}, fall_time: {fall}, on_latency: 48 ns, off_latency: 52 ns,
          jitter: 100 ps, max_gate: {max_gate}, edge: {edge}{inputs}}}
cables:
{cables}
{extra}dump: {dump}
"""

PULSED = "{mode: pulsed, energy: 9 mJ, wavelength: 527 nm, absorbed_fraction: 0.85, overlap: 0.9, lead: 150 ns, latency: 210 ns}"
CONTINUOUS = "{mode: continuous, power: 20 W, wavelength: 527 nm, absorbed_fraction: 0.85, overlap: 0.9}"
QWP = "  - waveplate: {name: qwp, retardance: quarter, axis: 45 deg}\n  - space: {c} mm\n"
SEPARATE_CABLES = ("  switch_on: {length: 1.5 m, velocity_factor: 0.66}\n"
                   "  switch_off: {length: 1.5 m, velocity_factor: 0.66}\n")
PUMP_CABLE = "  pump: {length: 3 m, velocity_factor: 0.66}\n"
GATE_CABLE = "  gate: {length: 1 m, velocity_factor: 0.66}\n"


def yaml_text(scheme: str = "quarter-wave", a=250.0, lc=25.0, nc=1.67, b=60.0, c=100.0, d=500.0,
              lg=20.0, ng=1.78, e=700.0, rise="3.5 ns", fall=None, edge="linear", pulse="150 ps",
              contrast=1000, er=500, dump=12, pump="pulsed", inputs="separate", resolution=None,
              max_gate="2 us", rep="1 kHz", plate=None, voltage=None, scope_lead=None) -> str:
    if plate is None:
        plate = QWP.replace("{c}", f"{c:g}") if scheme == "quarter-wave" else f"  - space: {c:g} mm\n"
    cables = (GATE_CABLE if inputs == "gate" else SEPARATE_CABLES) + (PUMP_CABLE if pump == "pulsed" else "")
    extra = ""
    if resolution:
        extra += f"generator: {{resolution: {resolution}}}\n"
    if scope_lead:
        extra += f"scope: {{lead: {scope_lead}}}\n"
    return TEMPLATE.format(
        rep=rep, pulse=pulse, pump=PULSED if pump == "pulsed" else CONTINUOUS, a=f"{a:g}", lc=f"{lc:g}",
        nc=nc, volts=voltage or "", contrast=contrast, b=f"{b:g}", plate=plate, er=er, d=f"{d:g}",
        lg=f"{lg:g}", ng=ng, e=f"{e:g}", scheme=scheme, rise=rise, fall=fall or rise,
        max_gate=max_gate, edge=edge, inputs=", inputs: gate" if inputs == "gate" else "",
        cables=cables.rstrip("\n"), extra=extra, dump=dump)


def load(**kw):
    from regentime.fileformat import load_cavity_text

    return load_cavity_text(yaml_text(**kw), source="test-cavity.yaml")


def hand_times(a=250.0, lc=25.0, nc=1.67, b=60.0, c=100.0, d=500.0, lg=20.0, ng=1.78, e=700.0,
               **_):
    """(t_out, t_back, T_rt) by hand, in s: the cell arm runs polarizer → c → (plate) → b →
    cell → a → end-A, thin plate and polarizer, vacuum spaces (lengths in mm)."""
    mm = 1e-3
    t_out = (c + b + nc * lc / 2) * mm / C
    t_back = t_out + 2 * (nc * lc / 2 + a) * mm / C
    t_rt = 2 * (a + nc * lc + b + c + d + ng * lg + e) * mm / C
    return t_out, t_back, t_rt
