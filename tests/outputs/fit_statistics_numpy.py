#!/usr/bin/python3
"""Checks the hand-worked fit-statistics case of tests/reporting/fit_statistics_test.cpp with
numpy (np.corrcoef, np.std, np.trapz), from the published definitions: Nash & Sutcliffe (1970),
J. Hydrol. 10(3), 282-290; Gupta et al. (2009), J. Hydrol. 377, 80-91, eq. 9. The numbers the
C++ test expects are repeated here; a difference fails with both values."""
import sys

import numpy as np

o = np.array([1.0, 3.0, 5.0, 3.0, 1.0])
s = np.array([2.0, 3.0, 4.0, 4.5, 1.0])
t = np.arange(5) * 3600.0
nse = 1.0 - ((s - o) ** 2).sum() / ((o - o.mean()) ** 2).sum()
r = np.corrcoef(s, o)[0, 1]
alpha = s.std() / o.std()
beta = s.mean() / o.mean()
kge = 1.0 - np.sqrt((r - 1) ** 2 + (alpha - 1) ** 2 + (beta - 1) ** 2)
trapezoid = getattr(np, "trapezoid", None) or np.trapz  # numpy 2 renamed it
volume = trapezoid(s, t) / trapezoid(o, t) - 1.0
expected = {"nse": (nse, 0.6205357), "r": (r, 0.8139143), "alpha": (alpha, 0.8556535),
            "beta": (beta, 1.1153846), "kge": (kge, 0.7377455), "volume": (volume, 1 / 12)}
bad = [f"{k}: numpy {v[0]:.7f}, test {v[1]:.7f}" for k, v in expected.items()
       if abs(v[0] - v[1]) > 1e-7]
if bad:
    print("fit_statistics_numpy: " + "; ".join(bad))
    sys.exit(1)
print("fit_statistics_numpy: NSE, KGE (r, alpha, beta) and volume error agree to 1e-7")
