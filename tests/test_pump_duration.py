"""Pulsed pump of finite length and the generator's insertion delay."""

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from regentime.physics.gain import pulsed_stored_energy


def test_storage_factor_nd_ylf_closed_form():
    # closed-form integral of dE/dt = R − E/τ over a rectangular pump (Koechner ch. 3):
    # (τ/T_p)(1 − e^{−T_p/τ}) = 0.78 for τ = 480 µs, T_p = 250 µs
    e = pulsed_stored_energy(1.0, 1.0, 1.0, 1.0, 1.0, 0.0, 480e-6, 250e-6)
    assert e == pytest.approx(480 / 250 * (1 - math.exp(-250 / 480)), rel=1e-12)
    assert e == pytest.approx(0.78, abs=0.005)


def test_storage_against_solve_ivp():
    # independent: scipy.integrate.solve_ivp of the rate equation, then decay over the lead
    tau, tp, lead, e_pump = 480e-6, 250e-6, 30e-6, 45e-3
    r = e_pump * 0.9 * 0.5 * (806 / 1053) / tp
    sol = solve_ivp(lambda t, y: [r - y[0] / tau], (0, tp), [0.0], rtol=1e-10, atol=1e-15)
    expect = sol.y[0, -1] * np.exp(-lead / tau)
    got = pulsed_stored_energy(e_pump, 0.9, 0.5, 806e-9, 1053e-9, lead, tau, tp)
    assert got == pytest.approx(expect, rel=1e-6)


def test_insertion_delay_and_pump_width():
    from dataclasses import replace

    from regentime.commands.loading import load
    from regentime.planning.plan import make_plan

    cav = load("cavities/nd_ylf_ps_10hz.yaml")
    base = make_plan(cav)
    ins = 85e-9
    cav2 = replace(cav, generator=replace(cav.generator, insertion_delay=ins, resolution=None))
    cav1 = replace(cav, generator=replace(cav.generator, resolution=None))
    p1, p2 = make_plan(cav1), make_plan(cav2)
    for r1 in p1.timing.rows:
        if r1.drives == "cleaner":
            continue
        r2 = p2.timing.row(r1.drives)
        # hand arithmetic: delay = event − latency − cable − insertion delay
        assert r2.delay == pytest.approx(r2.event - r2.latency - r2.cable_delay - ins, abs=1e-15)
        if p1.timing.seed_time == p2.timing.seed_time:
            assert r2.delay == pytest.approx(r1.delay - ins, abs=1e-15)
    pump = base.timing.row("pump")
    assert pump.width == pytest.approx(500e-6)
    # pump start = seed arrival − lead − T_p
    assert pump.event == pytest.approx(base.timing.seed_time - 0.0 - 500e-6, abs=1e-12)


def test_card_lines_nd_ylf():
    # exact bench-card rows for the shipped Nd:YLF example (outputs order, µs from 1 µs up)
    from regentime.commands.loading import load
    from regentime.planning.plan import make_plan
    from regentime.reports.setup_card import setup_card_text

    text = setup_card_text(make_plan(load("cavities/nd_ylf_ps_10hz.yaml")))
    assert "  out1    cell switch-on   519.9627 µs            —  520.0328 µs  ok" in text
    assert "  out3    pump laser         12.338 ns  500.0000 µs   20.0275 µs  ok" in text
    assert text.index("  out1    cell switch-on") < text.index("  out3    pump laser")
