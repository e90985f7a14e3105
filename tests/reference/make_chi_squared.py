#!/usr/bin/env python3
"""Chi-squared quantiles from SciPy for the confidence intervals of the stability statistics
(src/stability/chi-squared.ts, README "Stability statistics").

The equivalent degrees of freedom of ADEV, MDEV and TDEV are rarely whole numbers, so the grid
holds non-integer degrees of freedom from 0.37 to 5000 and probabilities from 1e-6 to 1 - 1e-6,
including the one-sigma tails (0.158655..., 0.841344...). scipy.stats.chi2.ppf shares no code
with the TypeScript implementation. Floats are written with repr, so they read back bit for bit.

Run by hand (not by CI):  python3 tests/reference/make_chi_squared.py
"""

import json
import math
import os

import scipy
from scipy.stats import chi2

HERE = os.path.dirname(os.path.abspath(__file__))

ONE_SIGMA_LOW = 0.5 * math.erfc(1 / math.sqrt(2))  # 0.1586552539...
PROBABILITIES = [1e-6, 0.001, 0.025, ONE_SIGMA_LOW, 0.5, 1 - ONE_SIGMA_LOW, 0.975, 0.999, 1 - 1e-6]
DEGREES = [0.37, 0.87, 1.0, 1.5, 2.7, 3.25, 7.3, 12.9, 41.6, 128.4, 666.2, 5000.0]


def main():
    rows = [{"p": p, "nu": nu, "quantile": float(chi2.ppf(p, nu))} for nu in DEGREES for p in PROBABILITIES]
    out = {"source": "scipy.stats.chi2.ppf", "scipy": scipy.__version__, "rows": rows}
    path = os.path.join(HERE, "chi-squared.scipy.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print(f"wrote {len(rows)} quantiles to {path} (SciPy {scipy.__version__})")


if __name__ == "__main__":
    main()
