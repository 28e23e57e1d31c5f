"""One module per command; each has ``register(subparsers)`` and ``run(args) -> int``."""
