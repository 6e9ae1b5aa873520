#!/usr/bin/python3
"""Reference results for tests/core/rolling_test.cc, computed with statsmodels.

statsmodels (the Debian package python3-statsmodels, run with /usr/bin/python3) is used
here only as an outside reference for the tests; alphatrail does not depend on it.

Usage: /usr/bin/python3 rolling_reference.py OUTDIR

Writes OUTDIR/data.csv (150 months of a strategy excess return, the market excess return and
one factor, with autocorrelated, heteroskedastic errors) and OUTDIR/results.json:
- "rolling": statsmodels.regression.rolling.RollingOLS(y, X, window=36).fit() with classic
  (nonrobust) errors: params and bse of every window, oldest window end first;
- "hac": OLS on three single windows, fit(cov_type="HAC", cov_kwds={"maxlags": L,
  "use_correction": C}) for L = 3 (the automatic rule for 36) and 6, C False and True:
  params and bse.
Every float is written with repr precision. Exits with status 3 when statsmodels is missing.
"""

import json
import os
import sys

try:
    import numpy as np
    import statsmodels
    import statsmodels.api as sm
    from statsmodels.regression.rolling import RollingOLS
except ImportError as error:  # the C++ test turns this into a failure with the fix
    sys.stderr.write("statsmodels is not importable by %s (%s); run scripts/install-deps --test\n"
                     % (sys.executable, error))
    sys.exit(3)

T = 150
WINDOW = 36
SEED = 20240607  # any fixed seed: the data only need to be reproducible
AUTO_LAGS = int(np.floor(4 * (WINDOW / 100.0) ** (2.0 / 9.0)))  # Newey & West (1994): 3 for 36
HAC_STARTS = (0, 57, T - WINDOW)  # first, a middle and the last window


def make_data():
    rng = np.random.default_rng(SEED)
    market = 0.006 + 0.045 * rng.standard_normal(T)
    size = 0.002 + 0.3 * market + 0.025 * rng.standard_normal(T)
    errors = np.zeros(T)
    innovation = 0.01 * (1 + 8 * np.abs(market)) * rng.standard_normal(T)
    for t in range(T):
        errors[t] = (0.4 * errors[t - 1] if t > 0 else 0.0) + innovation[t]
    # Beta drifts through time, which is what rolling estimates are for.
    beta = 0.8 + 0.6 * np.arange(T) / T
    strategy = 0.002 + beta * market + 0.3 * size + errors
    return strategy, market, size


def floats(values):
    return [float(v) for v in values]


def main():
    if len(sys.argv) != 2:
        sys.stderr.write("usage: rolling_reference.py OUTDIR\n")
        return 2
    outdir = sys.argv[1]
    os.makedirs(outdir, exist_ok=True)
    strategy, market, size = make_data()
    with open(os.path.join(outdir, "data.csv"), "w") as f:
        f.write("strategy,market,size\n")
        for row in zip(strategy, market, size):
            f.write(",".join(repr(float(v)) for v in row) + "\n")

    X = np.column_stack([np.ones(T), market, size])
    fit = RollingOLS(strategy, X, window=WINDOW).fit()  # nonrobust: classic errors
    params = np.asarray(fit.params)[WINDOW - 1:]
    bse = np.asarray(fit.bse)[WINDOW - 1:]
    hac = []
    for start in HAC_STARTS:
        y = strategy[start:start + WINDOW]
        x = X[start:start + WINDOW]
        for lags in (AUTO_LAGS, 6):
            for correction in (False, True):
                one = sm.OLS(y, x).fit(cov_type="HAC",
                                       cov_kwds={"maxlags": lags, "use_correction": correction})
                hac.append({"start": start, "maxlags": lags, "use_correction": correction,
                            "params": floats(one.params), "bse": floats(one.bse)})
    doc = {
        "statsmodels_version": statsmodels.__version__,
        "T": T,
        "window": WINDOW,
        "auto_lags": AUTO_LAGS,
        "names": ["alpha", "beta", "size"],
        "rolling": {"params": [floats(p) for p in params], "bse": [floats(b) for b in bse]},
        "hac": hac,
    }
    with open(os.path.join(outdir, "results.json"), "w") as f:
        json.dump(doc, f, indent=1)
    return 0


if __name__ == "__main__":
    sys.exit(main())
