"""regentime: plan the timing, build-up and contrast of a regenerative amplifier."""

__version__ = "0.1.0"

__all__ = ["__version__", "plan", "sweep"]


def __getattr__(name: str):
    """``regentime.plan`` and ``regentime.sweep``, imported on first use (keeps import cheap)."""
    if name == "plan":
        from regentime.api import plan

        return plan
    if name == "sweep":
        from regentime.sweeps import sweep

        return sweep
    raise AttributeError(f"module 'regentime' has no attribute {name!r}")
