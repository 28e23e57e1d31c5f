"""Spectrally resolved build-up: gain narrowing, narrowband limit, shift, transform limit."""

import math
from pathlib import Path

import numpy as np
import pytest
import scipy.constants as sc

from regentime.fileformat import load_cavity
from regentime.physics import spectrum as sp
from regentime.physics.buildup import GainModel, RoundTripPath, simulate_buildup
from regentime.physics.gain import radial_grid
from regentime.planning.plan import make_plan

ROOT = Path(__file__).resolve().parents[1] / "cavities"
NU0 = sc.c / 800e-9


def test_transform_limited_gaussian_tbp():
    # transform-limited Gaussian: Δν·Δt = 2 ln2/π = 0.441 (Siegman, Lasers, ch. 9)
    dnu = 5e12
    nu = np.linspace(NU0 - 4 * dnu, NU0 + 4 * dnu, 401)
    t = sp.transform_limited_fwhm(nu, sp.gaussian_line(nu, NU0, dnu))
    assert t * dnu == pytest.approx(2 * math.log(2) / math.pi, rel=2e-3)
    assert 2 * math.log(2) / math.pi == pytest.approx(0.441, abs=5e-4)


def test_small_signal_gain_narrowing_parabolic_formula():
    # small signal: S_out = S_in exp(lnG · ℓ(ν)); with ℓ ≈ 1 − 4 ln2 δν²/Δν_g² the output is a
    # Gaussian with 1/Δν_out² = 1/Δν_in² + lnG/Δν_g² (derived from the Gaussian line shape of
    # Siegman, Lasers, ch. 7 — the parabolic approximation, valid for Δν_in ≪ Δν_g)
    dnu_in, dnu_g = 2e12, 40e12
    nu = np.linspace(NU0 - 4 * dnu_in, NU0 + 4 * dnu_in, 321)
    g_pass, passes = 0.25, 40  # lnG = 10
    res = sp.spectral_buildup(("gain",), (), g_pass, 0.0, 1e9, 1e-6, 1e-18, nu,
                              sp.gaussian_line(nu, NU0, dnu_in), NU0, dnu_g, passes)
    out = sp.fwhm_of(nu, res.spectra[-1])
    expected = 1 / math.sqrt(1 / dnu_in ** 2 + g_pass * passes / dnu_g ** 2)
    assert out == pytest.approx(expected, rel=0.01)
    assert out < dnu_in


def test_narrowband_limit_equals_monochromatic_buildup():
    # one narrow slice on the line centre: the chirped model is the ordinary Frantz–Nodvik
    # build-up (Frantz & Nodvik 1963), here against regentime's own monochromatic build-up
    grid = radial_grid(1e-3, "flat-top")
    j_sat = 0.9e4
    gm = GainModel(j_sat=j_sat, j_tr=0.0, tau=3.2e-6, grid=grid, stored_energy=8e-3,
                   relax_in_buildup=False)
    path = RoundTripPath(ops=(0.95, "gain", 0.97, "gain"), out_ops=(0.98,), reflection_s=0.99,
                         dt=10e-9)
    ref = simulate_buildup(gm, path, 1e-9, 8e-3, 30, track=False)
    g0 = float(gm.log_gain(gm.stored_fluence(8e-3)))
    nu = np.array([NU0])
    res = sp.spectral_buildup(path.ops, path.out_ops, g0, 0.0, j_sat, gm.area, 1e-9 * 0.99, nu,
                              np.ones(1), NU0, 1e14, 30)
    np.testing.assert_allclose(res.energy, ref.energy, rtol=1e-9)


def _saturated(positive_chirp=True):
    dnu_in, dnu_g = 10e12, 100e12
    nu = np.linspace(NU0 - 3 * dnu_in, NU0 + 3 * dnu_in, 121)
    seed = sp.gaussian_line(nu, NU0, dnu_in)
    area, j_sat = 1e-6, 0.9e4
    res = sp.spectral_buildup((0.9, "gain", "gain"), (), 2.0, 0.0, j_sat, area, 1e-9, nu, seed,
                              NU0, dnu_g, 25, positive_chirp=positive_chirp)
    return nu, res, area, j_sat


def test_red_shift_for_positive_chirp_in_saturation():
    # the leading (red, positive chirp) part sees the undepleted gain: centroid moves to lower ν
    # (Le Blanc, Curley & Salin 1996)
    nu, res, _, _ = _saturated(True)
    s = res.spectra[-1]
    assert (nu * s).sum() / s.sum() < NU0
    nu, res, _, _ = _saturated(False)
    s = res.spectra[-1]
    assert (nu * s).sum() / s.sum() > NU0


def test_energy_conservation_on_every_round_trip():
    # output ≤ seed + stored: stored = g0·J_sat·area (four-level, pulsed, no pump in the build-up)
    nu, res, area, j_sat = _saturated(True)
    stored = 2.0 * j_sat * area
    assert np.all(res.energy <= 1e-9 + stored * 1.0000001)


def test_plan_spectrum_ti_sapphire_example():
    # shipped example: output narrower than the input, centre near 800 nm, TL width ≈ 0.441 λ²/(cΔλ)
    plan = make_plan(load_cavity(ROOT / "ti_sapphire_1khz.yaml"))
    s = plan.spectrum
    assert s is not None and s.output_fwhm_m < s.input_fwhm_m and s.output_fwhm_m > 0.3 * s.input_fwhm_m
    assert abs(s.output_center_m - 800e-9) < 10e-9
    tl = 0.441 * s.output_center_m ** 2 / (sc.c * s.output_fwhm_m)
    assert s.transform_limited_fwhm_s == pytest.approx(tl, rel=0.05)
    assert len(s.by_round_trip) == plan.dump_round_trip


def test_plan_plot_writes_the_spectra_and_the_card_says_it(tmp_path, capsys):
    pytest.importorskip("matplotlib")
    from regentime.cli import main

    target = tmp_path / "b.png"
    code = main(["plan", str(ROOT / "ti_sapphire_1khz.yaml"), "--plot", str(target)])
    out = " ".join(capsys.readouterr().out.split())  # the card wraps its lines
    assert code == 0 and target.exists()
    assert (tmp_path / "b_spectrum.png").read_bytes()[:4] == b"\x89PNG"
    assert "shortest compressed pulse" in out and "self-lasing: no self-lasing" in out
