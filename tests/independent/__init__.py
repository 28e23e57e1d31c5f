"""Independent cross-check of regentime's canonical definitions (see reference.py).

Written from docs/definitions.md and docs/references.md alone, without reading
regentime's physics/ or planning/ code; it shares only the cavity loader, the dispersion
formulas and the gain-media table with the tool.
"""
