"""Invented test cavities for the stability tests (not a real instrument, not measured data).

A continuously pumped Nd:YVO4 regen with a flat-top mode and strong gain (single-pass log gain
about 1.6 at full storage), so that period doubling appears at tens of kHz; and the same with a
Gaussian mode; and a pulsed variant.  Safety: a regen is a Class 4 laser and its Pockels-cell
driver switches kilovolts; follow IEC 60825-1 / ANSI Z136.1, IEC 61010-1, local rules and the
laser safety officer.
"""

from __future__ import annotations

CW_FLAT = """\
format: regentime/1
name: Nd:YVO4 regen, continuous pump (invented test scenario)
wavelength: 1064 nm
repetition_rate: 50 kHz
seed:
  energy: 1 nJ
  duration: 100 ps
  train_rate: 80 MHz
  arrival: 5 ns
gain:
  material: nd_yvo4
  mode_radius: 0.5 mm
  profile: flat-top
pump:
  mode: continuous
  power: 30 W
  wavelength: 808 nm
  absorbed_fraction: 0.9
  overlap: 0.8
cavity:
  - mirror: {name: end-A, reflectivity: 99.9 %}
  - space: 200 mm
  - pockels_cell: {name: cell, crystal: bbo, length: 20 mm, half_wave_voltage: 3.5 kV, contrast: 1000, transmission: 99 %}
  - space: 150 mm
  - polarizer: {name: tfp, extinction_ratio: 500, transmission_p: 98 %, reflection_s: 99.5 %}
  - space: 600 mm
  - gain_medium: {name: crystal, length: 8 mm}
  - space: 50 mm
  - mirror: {name: end-B, reflectivity: 99.8 %}
switch:
  scheme: half-wave
  rise_time: 5 ns
  on_latency: 35 ns
  off_latency: 38 ns
  jitter: 50 ps
  max_gate: 5 us
dump: auto
"""

CW_GAUSS = CW_FLAT.replace("  profile: flat-top\n", "  profile: gaussian\n  pump_radius: 0.55 mm\n"
                           "  pump_profile: gaussian\n  rings: 16\n")

PULSED = CW_FLAT.replace("""pump:
  mode: continuous
  power: 30 W
""", """pump:
  mode: pulsed
  energy: 2 mJ
  lead: 50 ns
  latency: 100 ns
""")


def load(text: str, tmp_path, name: str = "cavity.yaml"):
    from regentime.fileformat import load_cavity

    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return load_cavity(str(p))
