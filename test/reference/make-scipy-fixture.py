"""Reference values from SciPy for Tailmark's scoring tests.

Run:  python3 test/reference/make-scipy-fixture.py > test/reference/scipy.json
Uses the invented data sets of r-stats.json (so both fixtures describe the same numbers).
"""
import json
import os
import sys

import numpy as np
import scipy
from scipy import stats

here = os.path.dirname(os.path.abspath(__file__))
with open(os.path.join(here, "r-stats.json")) as f:
    r = json.load(f)

zs = [0.0, 0.5, 1.0, 1.5, 1.96, 2.0, 2.5, 2.698, 3.0, 3.5, 4.0, 5.0, 6.0, 8.0, 10.0, 20.0, 30.0, -1.0, -3.5]
ps = [1e-12, 1e-6, 0.001, 0.01, 0.02425, 0.05, 0.25, 0.5, 0.75, 0.9, 0.975, 0.99, 0.999]
out = {
    "_source": f"SciPy {scipy.__version__}, NumPy {np.__version__}; script test/reference/make-scipy-fixture.py",
    "norm": [{"z": z, "sf": float(stats.norm.sf(z)), "cdf": float(stats.norm.cdf(z))} for z in zs],
    "ppf": [{"p": p, "ppf": float(stats.norm.ppf(p))} for p in ps],
    "sets": {},
}
for name, d in r.items():
    if name.startswith("_"):
        continue
    x = np.array(d["x"], dtype=float)
    out["sets"][name] = {
        "madNormal": float(stats.median_abs_deviation(x, scale="normal")),
        "madRaw": float(stats.median_abs_deviation(x)),
        "iqr": float(stats.iqr(x)),  # NumPy 'linear' interpolation = Hyndman & Fan type 7
    }
json.dump(out, sys.stdout, indent=1)
sys.stdout.write("\n")
