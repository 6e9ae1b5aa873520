#!/usr/bin/python3
"""Reference for the evaluate benchmark: the same regressions with pandas + statsmodels.

Reads the files bench_make_data writes (strategies.csv wide, benchmark.csv, rate.csv,
factors.csv), and for every strategy fits

    r_s - rf = alpha + beta (r_m - rf) + b_size size + b_value value + e

by OLS with Newey-West (HAC, Bartlett) standard errors, L = floor(4 (T/100)^(2/9)) lags and
no small-sample factor -- what `alphatrail evaluate ... --errors newey-west` does by default.

The risk-free rate follows alphatrail's daily convention with compound basis and start timing:
rf_t = (1 + y_{t-1}/100)^(1/252) - 1 with y_{t-1} the previous business day's yield, so the
first day has no rate and is dropped.

    /usr/bin/python3 bench/evaluate_reference.py DATA_FOLDER [--out results.csv]

Prints the time taken (reading and fitting) and variant-0000's estimates.
"""
import argparse
import math
import os
import time

import pandas as pd
import statsmodels.api as sm


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("folder", help="folder written by bench_make_data")
    parser.add_argument("--out", help="write every strategy's estimates to this CSV")
    args = parser.parse_args()

    start = time.perf_counter()
    read = lambda name: pd.read_csv(os.path.join(args.folder, name), index_col="date",
                                    parse_dates=["date"])
    strategies = read("strategies.csv")
    benchmark = read("benchmark.csv")["bench-index"]
    yields = read("rate.csv")["1M"]
    factors = read("factors.csv")[["size-spread", "value-spread"]]
    loaded = time.perf_counter()

    # The yield known at the start of each day is the previous business day's.
    rf = (1 + yields.shift(1) / 100) ** (1 / 252) - 1
    X = pd.concat([(benchmark - rf).rename("beta"), factors], axis=1).dropna()
    X = sm.add_constant(X).rename(columns={"const": "alpha"})
    excess = strategies.sub(rf, axis=0).loc[X.index]
    T = len(X)
    lags = math.floor(4 * (T / 100) ** (2 / 9))

    rows = []
    for name in excess.columns:
        fit = sm.OLS(excess[name], X).fit(cov_type="HAC", cov_kwds={"maxlags": lags})
        rows.append({"strategy": name, "alpha": fit.params["alpha"], "beta": fit.params["beta"],
                     "alpha_t": fit.tvalues["alpha"], "beta_t": fit.tvalues["beta"]})
    results = pd.DataFrame(rows).set_index("strategy")
    done = time.perf_counter()

    if args.out:
        results.to_csv(args.out, float_format="%.17g")
    first = results.iloc[0]
    print(f"python reference: {len(results)} strategies x {T} days, {lags} Newey-West lags")
    print(f"  read CSVs {loaded - start:.2f} s, fit {done - loaded:.2f} s, total {done - start:.2f} s")
    print(f"  {results.index[0]}: alpha {first['alpha']:.17g} (t {first['alpha_t']:.6f}), "
          f"beta {first['beta']:.17g} (t {first['beta_t']:.6f})")


if __name__ == "__main__":
    main()
