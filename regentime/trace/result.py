"""One call from a trace (and optionally a cavity plan) to everything the report shows.

API for the front ends (CLI, TUI):

* :func:`regentime.trace.read_trace` (path, channel) -> :class:`~regentime.trace.reader.Trace`
* :func:`inputs_from_plan` (plan) -> :class:`~regentime.trace.fit.BuildupInputs`
* :func:`analyse_trace` (trace, inputs, injection_time=None, fit_seed=False) -> :class:`TraceResult`
* :meth:`TraceResult.to_dict` -> the JSON object (keys fixed by the issue)
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Optional

import numpy as np

from regentime.trace.analysis import PulseTrain, analyse_pulses
from regentime.trace.fit import BuildupInputs, FitResult, Rings, fit_buildup
from regentime.trace.reader import Trace

C_LIGHT = 299792458.0  # m/s, exact (SI definition; same as scipy.constants.c)

CAUTION = (
    "CAUTION: a regenerative amplifier is a Class 4 laser and its Pockels-cell driver switches "
    "kilovolts; both can kill or blind. Follow IEC 60825-1 / ANSI Z136.1 and IEC 61010-1, local "
    "laser and electrical safety rules and your laser safety officer. Apply a changed switch-out "
    "delay at low pump power first and check it on the photodiode before full power."
)


@dataclass
class TraceResult:
    """Everything measured and fitted from one trace (SI units)."""

    trace: Optional[Trace]
    train: PulseTrain
    fit: Optional[FitResult]
    inputs: BuildupInputs
    measured_round_trip_s: float
    measured_round_trip_sigma_s: float
    model_round_trip_s: Optional[float]
    length_error_m: Optional[float]
    peak_index: int
    observed_dump_index: int
    dump_offset_round_trips: int
    switch_off_shift_s: float
    peak_extrapolated: bool
    peak_source: str  # "fit" | "data"
    notes: list = field(default_factory=list)
    cautions: list = field(default_factory=lambda: [CAUTION])

    @property
    def pulses(self) -> list:
        return [{"time_s": float(t), "amplitude": float(a)}
                for t, a in zip(self.train.times, self.train.amplitudes)]

    def to_dict(self) -> dict:
        tr, f = self.train, self.fit
        d = {
            "measured_round_trip_s": self.measured_round_trip_s,
            "measured_round_trip_sigma_s": self.measured_round_trip_sigma_s,
            "model_round_trip_s": self.model_round_trip_s,
            "length_error_m": self.length_error_m,
            "amplitude_kind": "pulse area over one round trip, V*s (signal units * s)",
            "pulses": self.pulses,
            "peak_index": self.peak_index,
            "peak_extrapolated": self.peak_extrapolated,
            "peak_source": self.peak_source,
            "observed_dump_index": self.observed_dump_index,
            "switch_out_seen": tr.switch_out_seen,
            "dump_offset_round_trips": self.dump_offset_round_trips,
            "switch_off_shift_s": self.switch_off_shift_s,
            "fit": None,
            "trace": None,
            "notes": list(self.notes),
            "cautions": list(self.cautions),
        }
        if f is not None:
            d["fit"] = {
                "mode": f.mode,
                "values": dict(f.values),
                "uncertainties": dict(f.sigmas),
                "file_values": dict(f.file_values),
                "model_amplitudes": [float(v) for v in f.model],
                "peak_index_range": list(f.peak_range),
                "predicted_peak_amplitude": f.peak_amplitude,
                "predicted_peak_energy_J": f.peak_energy,
                "rms_residual_relative": f.rms_residual,
                "converged": f.success,
            }
        if self.trace is not None:
            t = self.trace
            d["trace"] = {"source": t.source, "channel": t.channel, "channels": list(t.channels),
                          "layout": t.layout, "time_unit": t.time_unit, "samples": t.n_samples,
                          "sample_interval_s": t.sample_interval}
        d["baseline"] = tr.baseline
        d["noise"] = tr.noise
        d["pulse_fwhm_s"] = tr.fwhm
        return d


def inputs_from_plan(plan) -> BuildupInputs:
    """Take the fit's fixed inputs from a :class:`regentime.planning.plan.Plan`.

    T_rt from the optics; E_sat = J_sat · π w² from the gain model; E₀ and g₀ from the first
    entry of the planned build-up; the passive round-trip transmission and its placement
    around the gain passes from the reduced round-trip path; the gain's relaxation per round
    trip e^{−T_rt/τ} towards the level the pump holds (none for a pulsed pump).
    """
    b = plan.buildup
    gm, path, res = b.gain, b.path, b.result
    t_rt = float(plan.optics.round_trip_time)
    trans = float(path.passive_transmission)
    ops = []
    for op in path.ops:
        if op == "gain":
            ops.append("gain")
        elif trans < 1.0:
            ops.append(float(np.log(op) / np.log(trans)))
    g_eq = float(gm.log_gain(gm.stored_fluence(gm.pump_rate * gm.tau))) if gm.tau > 0 else 0.0
    decay = gm.buildup_decay(t_rt) if gm.tau > 0 else 1.0  # same law as the core build-up
    grid = gm.grid
    rings = None
    if grid.rings > 1:
        area = gm.area
        j_st = b.stored_fluence_at_injection()
        j_eq = gm.stored_fluence(gm.pump_rate * gm.tau)
        rings = Rings(u=np.asarray(grid.mode) * area, v=np.asarray(grid.area) / area,
                      p=np.asarray(j_st) / gm.j_sat, o=float(gm.j_tr / gm.j_sat),
                      q=(np.asarray(j_eq) - gm.j_tr) / gm.j_sat)
    return BuildupInputs(round_trip_time=t_rt, e_sat=float(gm.j_sat * gm.area),
                         seed_energy=float(res.energy[0]), initial_log_gain=float(res.log_gain[0]),
                         round_trip_loss=1.0 - trans, ops=tuple(ops), decay=decay, g_eq=g_eq,
                         rings=rings)


def inputs_from_cavity(cavity) -> BuildupInputs:
    """:func:`inputs_from_plan` for a :class:`~regentime.model.Cavity`.

    Runs only the optics and the build-up (not switching, timing or contrast), which is all
    the fit needs and keeps ``regentime trace`` independent of the timing planner.
    """
    from types import SimpleNamespace

    from regentime.planning.optics import cavity_optics
    from regentime.planning.buildup_plan import plan_buildup

    optics = cavity_optics(cavity)
    return inputs_from_plan(SimpleNamespace(optics=optics, buildup=plan_buildup(cavity, optics)))


SIGNAL_LIMIT = 1e100  # far beyond any recorder's range, far below where squares overflow


def analyse_trace(trace: Trace, inputs: Optional[BuildupInputs] = None,
                  injection_time: Optional[float] = None, fit_seed: bool = False,
                  fit: bool = True) -> TraceResult:
    """Analyse a trace: pulses, round trip, length error, fit, switch-out correction.

    ``inputs``: numbers from the cavity file (see :func:`inputs_from_plan`); without them
    the round trip is measured but not compared and the fit works in reduced units.
    ``injection_time``: time of the seed injection on the trace's time base (s); when given,
    the fit is anchored to it (the number of round trips before the first pulse is known).
    """
    inputs = inputs or BuildupInputs()
    peak = float(np.max(np.abs(trace.signal))) if trace.signal.size else 0.0
    if peak > SIGNAL_LIMIT:
        from regentime.errors import InputError

        raise InputError(trace.channel, peak, f"signal values below {SIGNAL_LIMIT:g} in magnitude "
                         "(volts or counts of a recorder; larger ones overflow the analysis)",
                         source=trace.source)
    train = analyse_pulses(trace.signal, trace.sample_interval, trace.t0,
                           expected_period=inputs.round_trip_time, source=trace.source)
    return result_from_train(train, inputs, trace=trace, injection_time=injection_time,
                             fit_seed=fit_seed, fit=fit)


def result_from_train(train: PulseTrain, inputs: BuildupInputs, trace: Optional[Trace] = None,
                      injection_time: Optional[float] = None, fit_seed: bool = False,
                      fit: bool = True) -> TraceResult:
    notes = list(train.notes)
    t_meas = train.period
    t_model = inputs.round_trip_time
    length_error = (t_meas - t_model) * C_LIGHT / 2.0 if t_model else None
    dump = int(train.dump_index)
    observed_peak = int(np.argmax(train.amplitudes[: dump + 1]))
    result_fit = None
    anchor = None
    if injection_time is not None:
        anchor = int(round((train.times[0] - injection_time) / t_meas))
        if anchor < 0:
            notes.append("the injection time given is after the first pulse; the fit is not anchored")
            anchor = None
    if fit and dump >= 1:
        result_fit = fit_buildup(train.amplitudes, train.sigma_amplitude, inputs,
                                 anchor_round_trips=anchor, fit_seed=fit_seed, dump_index=dump)
    peak, source = observed_peak, "data"
    if result_fit is not None and result_fit.peak_index is not None:
        peak, source = int(result_fit.peak_index), "fit"
        if observed_peak < dump and abs(peak - observed_peak) > 2:
            notes.append(f"the fitted peak (pulse {peak}) and the largest measured pulse "
                         f"({observed_peak}) disagree; the model may not describe this build-up")
    elif result_fit is not None:
        notes.append("the fitted model never turns over (net gain stays above one): the largest "
                     "measured pulse is used as the peak")
    extrapolated = peak > dump
    if extrapolated:
        notes.append(f"the switch-out came before the peak: the peak (pulse {peak}) is "
                     "extrapolated by the fitted model")
    offset = peak - dump
    return TraceResult(trace=trace, train=train, fit=result_fit, inputs=inputs,
                       measured_round_trip_s=float(t_meas),
                       measured_round_trip_sigma_s=float(train.period_sigma),
                       model_round_trip_s=None if t_model is None else float(t_model),
                       length_error_m=None if length_error is None else float(length_error),
                       peak_index=int(peak), observed_dump_index=dump,
                       dump_offset_round_trips=int(offset), switch_off_shift_s=float(offset * t_meas),
                       peak_extrapolated=bool(extrapolated), peak_source=source, notes=notes)
