#!/usr/bin/python3
"""Reference results for tests/core/statsmodels_test.cc, computed with statsmodels.

statsmodels (the Debian package python3-statsmodels, run with /usr/bin/python3) is used
here only as an outside reference for the tests; alphatrail does not depend on it.

Usage: /usr/bin/python3 statsmodels_reference.py OUTDIR

Writes OUTDIR/data.csv (a reproducible single-index + two-factor sample with autocorrelated,
heteroskedastic errors) and OUTDIR/results.json (the OLS fits of that sample with every
covariance kind). Every float is written with repr precision (shortest round-trip form).
Exits with status 3 and a message when statsmodels cannot be imported.
"""

import json
import os
import sys

try:
    import numpy as np
    import statsmodels
    import statsmodels.api as sm
except ImportError as error:  # the C++ test turns this into a failure with the fix
    sys.stderr.write("statsmodels is not importable by %s (%s); run scripts/install-deps --test\n"
                     % (sys.executable, error))
    sys.exit(3)

T = 240          # twenty years of monthly returns
SEED = 20240521  # any fixed seed: the data only need to be reproducible
AUTO_LAGS = int(np.floor(4 * (T / 100.0) ** (2.0 / 9.0)))  # Newey & West (1994): 4 for T = 240


def make_data():
    rng = np.random.default_rng(SEED)
    market = 0.006 + 0.045 * rng.standard_normal(T)  # market excess return
    size = 0.002 + 0.3 * market + 0.025 * rng.standard_normal(T)
    value = 0.003 - 0.2 * market + 0.030 * rng.standard_normal(T)
    # AR(1) errors whose innovation scale grows with the size of the market move.
    errors = np.zeros(T)
    innovation = 0.01 * (1 + 8 * np.abs(market)) * rng.standard_normal(T)
    for t in range(T):
        errors[t] = (0.45 * errors[t - 1] if t > 0 else 0.0) + innovation[t]
    strategy = 0.002 + 1.15 * market + 0.35 * size - 0.25 * value + errors
    return strategy, market, size, value


def summary(fit, with_f):
    out = {
        "params": [float(v) for v in fit.params],
        "bse": [float(v) for v in fit.bse],
        "tvalues": [float(v) for v in fit.tvalues],
        "pvalues": [float(v) for v in fit.pvalues],
        "conf_int": [[float(lo), float(hi)] for lo, hi in np.asarray(fit.conf_int(alpha=0.05))],
        "cov": [[float(v) for v in row] for row in np.asarray(fit.cov_params())],
        "rsquared": float(fit.rsquared),
        "rsquared_adj": float(fit.rsquared_adj),
        "ssr": float(fit.ssr),
        "df_resid": float(fit.df_resid),
    }
    if with_f:  # statsmodels' robust fits test F with the robust covariance; ours is classic
        out["fvalue"] = float(fit.fvalue)
        out["f_pvalue"] = float(fit.f_pvalue)
    return out


def fits(y, X):
    model = sm.OLS(y, X)
    results = {"classic": summary(model.fit(), True)}
    for kind in ("HC0", "HC1", "HC2", "HC3"):
        results[kind.lower()] = summary(model.fit(cov_type=kind, use_t=True), False)
    for lags in (AUTO_LAGS, 12):
        for correction in (False, True):
            fit = model.fit(cov_type="HAC", cov_kwds={"maxlags": lags, "use_correction": correction},
                            use_t=True)
            name = "newey-west-%d%s" % (lags, "-corrected" if correction else "")
            results[name] = summary(fit, False)
    return results


def main():
    if len(sys.argv) != 2:
        sys.stderr.write("usage: statsmodels_reference.py OUTDIR\n")
        return 2
    outdir = sys.argv[1]
    os.makedirs(outdir, exist_ok=True)
    strategy, market, size, value = make_data()

    with open(os.path.join(outdir, "data.csv"), "w") as f:
        f.write("strategy,market,size,value\n")
        for row in zip(strategy, market, size, value):
            f.write(",".join(repr(float(v)) for v in row) + "\n")

    with_intercept = np.column_stack([np.ones(T), market, size, value])
    without_intercept = np.column_stack([market, size, value])
    doc = {
        "statsmodels_version": statsmodels.__version__,
        "T": T,
        "auto_lags": AUTO_LAGS,
        "with_intercept": {"names": ["alpha", "market", "size", "value"],
                           "fits": fits(strategy, with_intercept)},
        "without_intercept": {"names": ["market", "size", "value"],
                              "fits": fits(strategy, without_intercept)},
    }
    with open(os.path.join(outdir, "results.json"), "w") as f:
        json.dump(doc, f, indent=1)  # json writes floats with repr precision
    return 0


if __name__ == "__main__":
    sys.exit(main())
