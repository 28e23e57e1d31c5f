"""Independent cross-check of regentime's canonical definitions (see reference.py).

Written from /work/shared/DESIGN.md and /work/shared/REFERENCES.md alone, without reading
regentime's physics/ or planning/ code; it shares only the cavity loader, the dispersion
formulas and the gain-media table with the tool.
"""
