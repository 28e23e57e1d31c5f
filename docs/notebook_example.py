# %% [markdown]
# # A notebook session with regentime (run as a plain script, or cell by cell in Jupyter)
#
# The invented Ti:sapphire demo cavity: plan it, look at the build-up, try a higher pump
# energy, then sweep pump and seed energy and draw the output energy.  The cell markers
# (`# %%`) are understood by Jupyter's text-notebook tools and by most editors.

# %%
from pathlib import Path

import matplotlib

matplotlib.use("Agg")  # a script has no screen; drop this line in a notebook
import matplotlib.pyplot as plt

import regentime

ti = Path(__file__).resolve().parent.parent / "cavities" / "ti_sapphire_1khz.yaml"  # the repository's example
out = Path(__file__).resolve().parent

# %% one plan: the numbers the CLI prints, as SI floats
p = regentime.plan(ti)
d = p.to_dict()
print(f"round trip {p.round_trip_time * 1e9:.3f} ns, switch out after {p.dump_round_trip} "
      f"round trips, {d['dump']['output_energy_J'] * 1e3:.3f} mJ")

# %% the same cavity at 10 mJ of pump
q = regentime.plan(ti, overrides={"pump.energy": "10 mJ"})
print(f"10 mJ pump: {q.dump_round_trip} round trips, "
      f"{q.to_dict()['dump']['output_energy_J'] * 1e3:.3f} mJ")

# %% build-up of both, one Axes each
fig, (a, b) = plt.subplots(1, 2, figsize=(11, 4))
p.plot_buildup(a)
q.plot_buildup(b)
fig.tight_layout()

# %% a sweep over two keys, and its picture
s = regentime.sweep(ti, {"pump.energy": ["6 mJ", "8 mJ", "10 mJ", "12 mJ"],
                         "seed.energy": ["0.3 nJ", "0.7 nJ"]},
                    outputs=["dump_round_trip", "output_energy_J", "nearest_pre_ratio"])
print(s.to_text())
ax = s.plot("output_energy_J")
plt.close("all")
