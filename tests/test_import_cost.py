"""`import regentime` stays cheap: no heavy or UI module is pulled in at import.

Checked in a fresh interpreter through sys.modules (Python language reference,
"The import system": sys.modules holds every module imported so far).
"""

import subprocess
import sys

HEAVY = ("textual", "scipy", "matplotlib", "pandas")


def test_import_regentime_loads_no_heavy_module():
    code = (
        "import sys, regentime\n"
        f"print(','.join(m for m in {HEAVY!r} if m in sys.modules))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True,
                         text=True, check=True)
    assert out.stdout.strip() == "", f"heavy modules loaded at import: {out.stdout}"
