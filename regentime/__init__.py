"""regentime: plan the timing, build-up and contrast of a regenerative amplifier."""

__version__ = "0.1.0"
