#!/usr/bin/python3
"""Independent check of `headroom ... --plan --plan-goal most`: the split of a
budget that maximises the pool's expected distinct units, found by a
general-purpose optimiser (Debian's python3-scipy, scipy.optimize.minimize
with method SLSQP) on the fitted curves that headroom exports with --curve.

    /usr/bin/python3 scripts/ref_scipy_plan.py CURVE.tsv COUNTS.tsv BUDGET > testdata/plan/scipy_most.tsv

CURVE.tsv is `headroom counts --bootstrap 0 --curve CURVE.tsv COUNTS.tsv`
(every sample's curve up to 100x its reads); COUNTS.tsv the frequency-count
table it came from (for each sample's observed reads N). Each curve is
interpolated monotonically (scipy.interpolate.PchipInterpolator on log
depth) between its points from N upward; the optimiser maximises
sum_i D_i(N_i + x_i) subject to sum_i x_i = BUDGET, 0 <= x_i <= BUDGET
(every read bought is usable: frequency-count tables carry no filtering),
from ten starting points (the even split and nine random ones, seed 1),
keeping the best. Output: one row per sample with the optimiser's reads
and the pool's optimal objective.
"""

import csv
import sys

import numpy as np
from scipy.interpolate import PchipInterpolator
from scipy.optimize import minimize


def main():
    curve_path, counts_path, budget = sys.argv[1], sys.argv[2], float(sys.argv[3])
    reads = {}
    order = []
    with open(counts_path) as f:
        for row in csv.DictReader(f, delimiter="\t"):
            s = row["sample"]
            if s not in reads:
                reads[s] = 0
                order.append(s)
            reads[s] += int(row["times_seen"]) * int(row["units"])
    pts = {s: ([], []) for s in order}
    with open(curve_path) as f:
        for row in csv.DictReader(f, delimiter="\t"):
            if row["kind"] in ("observed", "extrapolated"):
                pts[row["sample"]][0].append(float(row["reads"]))
                pts[row["sample"]][1].append(float(row["distinct"]))
    curves = []
    for s in order:
        t, d = np.array(pts[s][0]), np.array(pts[s][1])
        curves.append(PchipInterpolator(np.log(t), d, extrapolate=False))
    n = np.array([reads[s] for s in order], dtype=float)
    scale = budget  # optimise shares of the budget (well-conditioned)

    def total(y):
        return sum(float(c(np.log(n[i] + y[i] * scale))) for i, c in enumerate(curves))

    cons = [{"type": "eq", "fun": lambda y: np.sum(y) - 1.0}]
    bounds = [(0.0, 1.0)] * len(order)
    rng = np.random.default_rng(1)
    starts = [np.full(len(order), 1.0 / len(order))] + [rng.dirichlet(np.ones(len(order))) for _ in range(9)]
    best = None
    for y0 in starts:
        r = minimize(lambda y: -total(y), y0, method="SLSQP", bounds=bounds, constraints=cons,
                     options={"ftol": 1e-12, "maxiter": 1000})
        y = np.clip(r.x, 0, 1)
        y /= y.sum()
        v = total(y)
        if best is None or v > best[0]:
            best = (v, y)
    v, y = best
    print("# scipy %s SLSQP on the PCHIP-interpolated --curve of %s, budget %.0f" % (__import__("scipy").__version__, counts_path, budget))
    print("sample\treads_now\treads_next\tdistinct_after")
    for i, s in enumerate(order):
        print("%s\t%d\t%.0f\t%.1f" % (s, n[i], y[i] * scale, float(curves[i](np.log(n[i] + y[i] * scale)))))
    print("TOTAL\t%d\t%.0f\t%.1f" % (n.sum(), scale, v))


main()
