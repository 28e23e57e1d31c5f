"""Photodiode traces of a regen build-up: read, find the pulse train, fit the model, correct the switch-out.

Front ends use: :func:`read_trace`, :func:`inputs_from_cavity` / :func:`inputs_from_plan`,
:func:`analyse_trace` (-> :class:`TraceResult`, whose ``to_dict()`` is the JSON report), and
:mod:`regentime.trace.report` for text, Markdown and the PNG plot.
"""

from regentime.trace.reader import Trace, read_trace
from regentime.trace.result import (
    CAUTION,
    TraceResult,
    analyse_trace,
    inputs_from_cavity,
    inputs_from_plan,
    result_from_train,
)

__all__ = ["CAUTION", "Trace", "TraceResult", "analyse_trace", "inputs_from_cavity", "inputs_from_plan",
           "read_trace", "result_from_train"]
