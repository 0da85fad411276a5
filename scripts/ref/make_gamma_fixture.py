#!/usr/bin/python3
"""Generate reference values for pkg/gamma from the Debian-packaged SciPy.

Run from the repository root with the system interpreter (not a pyenv one):

    /usr/bin/python3 scripts/ref/make_gamma_fixture.py

It writes testdata/gamma/scipy_cases.json. Every case holds a deterministic
gamma sample x and, for the fit k, loc=0, theta = scipy.stats.gamma.fit(x, floc=0):

  shape, scale  the maximum-likelihood fit
  ppf           {p: scipy.stats.gamma.ppf(p, k, 0, theta)}
  cdf           [[x, scipy.stats.gamma.cdf(x, k, 0, theta)], ...]
  sf            [[x, scipy.stats.gamma.sf(x, k, 0, theta)], ...]
  ks            scipy.stats.kstest(x, 'gamma', args=(k, 0, theta)).statistic
"""

import json
import os
import sys

import numpy as np
import scipy
from scipy import stats

PS = [1e-6, 0.001, 0.01, 0.1, 0.5, 0.9, 0.99, 0.999, 0.9999]
OUT = os.path.join("testdata", "gamma", "scipy_cases.json")

# name, true shape, true scale, sample size, seed
SPECS = [
    ("k0.8_n200", 0.8, 2.5, 200, 11),
    ("k2_n500", 2.0, 0.7, 500, 12),
    ("k9_n1000", 9.0, 0.05, 1000, 13),
    ("k40_n300", 40.0, 0.001, 300, 14),
    ("k3_n12", 3.0, 1.0, 12, 15),
    ("k0.3_n400", 0.3, 10.0, 400, 16),
]


def main():
    result = {
        "source": "scipy %s (Debian python3-scipy), numpy %s"
        % (scipy.__version__, np.__version__),
        "generator": "scripts/ref/make_gamma_fixture.py",
        "cases": [],
    }
    for name, k, theta, n, seed in SPECS:
        rng = np.random.default_rng(seed)
        x = rng.gamma(k, theta, n)
        a, loc, scale = stats.gamma.fit(x, floc=0)
        assert loc == 0
        d = stats.gamma(a, 0, scale)
        points = sorted(
            {float(np.min(x)), float(np.median(x)), float(np.mean(x)), float(np.max(x)),
             float(d.ppf(0.999))}
        )
        result["cases"].append(
            {
                "name": name,
                "x": [float(v) for v in x],
                "shape": float(a),
                "scale": float(scale),
                "ppf": {repr(p): float(d.ppf(p)) for p in PS},
                "cdf": [[p, float(d.cdf(p))] for p in points],
                "sf": [[p, float(d.sf(p))] for p in points],
                "ks": float(stats.kstest(x, "gamma", args=(a, 0, scale)).statistic),
            }
        )
    with open(OUT, "w") as f:
        json.dump(result, f, indent=1)
        f.write("\n")
    print("wrote %s: %d cases, %s" % (OUT, len(result["cases"]), result["source"]))


if __name__ == "__main__":
    sys.exit(main())
