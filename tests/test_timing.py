"""The delay-generator table (sources named beside each check)."""

from __future__ import annotations

import math

import pytest
from scipy.constants import c as C  # general-purpose reference library

import _switch_cavity as tc  # noqa: E402

from regentime.model import Cable  # noqa: E402
from regentime.planning.plan import make_plan  # noqa: E402


def test_coax_delay_5_05_ns_per_metre_at_velocity_factor_0_66():
    # Amateur-radio handbook tables: solid-polyethylene coax, VF 0.66 → 5.05 ns/m (±3 %);
    # the model's formula length/(VF·c) with scipy.constants.c.
    assert Cable(1.0, 0.66).delay == pytest.approx(5.05e-9, rel=0.03)
    assert Cable(1.5, 0.66).delay == pytest.approx(1.5 / (0.66 * C), rel=1e-12)


@pytest.mark.parametrize("inputs,pump", [("separate", "pulsed"), ("gate", "continuous")])
def test_each_delay_is_edge_minus_latency_minus_cable(inputs, pump):
    # docs/definitions.md "Delay-generator settings": delay = event − latency − length/(VF·c).
    plan = make_plan(tc.load(inputs=inputs, pump=pump))
    sp, rows = plan.switching, plan.timing.rows
    cab = 1.5 if inputs == "separate" else 1.0
    cable = cab / (0.66 * C)
    on = plan.timing.row("switch_on" if inputs == "separate" else "gate")
    assert on.delay == pytest.approx(sp.on_edge - 48e-9 - cable, abs=1e-13)
    if inputs == "separate":
        off = plan.timing.row("switch_off")
        assert off.delay == pytest.approx(sp.off_edge - 52e-9 - cable, abs=1e-13)
    else:  # falling gate edge → switch-off after the off latency
        assert on.delay + on.width == pytest.approx(sp.off_edge - 52e-9 - cable, abs=1e-13)
    for r in rows:
        assert r.delay >= 0.0 and r.problem is None
    if pump == "pulsed":
        p = plan.timing.row("pump")
        # the pump light leads the seed pulse by exactly pump.lead (docs/definitions.md)
        assert p.delay + 210e-9 + 3.0 / (0.66 * C) == pytest.approx(sp.seed_time - 150e-9, abs=1e-13)
    else:
        assert plan.timing.row("pump") is None


def test_first_seed_pulse_with_all_delays_non_negative():
    # docs/definitions.md: the first m = 0, 1, … for which every delay is ≥ 0; seed t_m = arrival + m/f.
    plan = make_plan(tc.load())
    m = plan.switching.seed_pulse_index
    assert plan.switching.seed_time == pytest.approx(7.3e-9 + m / 80e6)
    # one seed pulse earlier, the pump channel would need a negative delay
    pump = plan.timing.row("pump")
    assert pump.delay - 1 / 80e6 < 0 <= pump.delay
    # by hand: the pump needs t_m ≥ lead + latency + cable = 150 + 210 + 15.16 ns
    need = 150e-9 + 210e-9 + 3.0 / (0.66 * C)
    assert m == math.ceil((need - 7.3e-9) * 80e6)


def test_delays_rounded_to_the_generator_step_and_shown():
    plan = make_plan(tc.load(resolution="5 ps"))
    for r in plan.timing.rows:
        k = r.delay / 5e-12
        assert k == pytest.approx(round(k), abs=1e-6)
        assert abs(r.rounding) <= 2.5e-12 + 1e-18
        assert "rounded to the 5 ps step" in r.note


def test_scope_trigger_default_one_buildup_before_switch_out():
    # Brief: scope trigger one build-up's worth (N·T_rt) before the switch-out by default.
    plan = make_plan(tc.load())
    n, t_rt = plan.switching.dump_round_trip, plan.round_trip_time
    assert plan.timing.row("scope").event == pytest.approx(plan.switching.off_edge - n * t_rt)
    plan2 = make_plan(tc.load(scope_lead="500 ns"))
    assert plan2.timing.row("scope").event == pytest.approx(plan2.switching.off_edge - 500e-9)


def test_gate_longer_than_max_gate_is_a_problem_row_and_error():
    # N = 40 round trips of ≈ 11.26 ns (hand times) give a 439 ns gate > 200 ns max_gate.
    plan = make_plan(tc.load(dump=40, max_gate="200 ns"))
    off = plan.timing.row("switch_off")
    assert off.problem and "max_gate" in off.problem
    assert plan.cannot_be_met
    assert any(c.level == "error" and "max_gate" in c.message for c in plan.checks)


def test_json_rows_have_the_design_keys():
    plan = make_plan(tc.load())
    rows = plan.timing.to_rows_dicts()
    assert {r["drives"] for r in rows} == {"pump", "switch_on", "switch_off", "scope"}
    for r in rows:
        for key in ("output", "drives", "delay_s", "width_s", "note", "problem"):
            assert key in r
    assert {r["output"] for r in rows} == {"out1", "out2", "out3", "out4"}
