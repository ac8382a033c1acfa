#!/usr/bin/python3
"""Calibrate the adaptive interval of headroom on the calibration data.

Usage:
  FIT=1 /usr/bin/python3 scripts/realdata/calibrate.py FILE[:BUILD] ...
  /usr/bin/python3 scripts/realdata/calibrate.py SIM.csv REAL.csv [KAPPA ...]

SIM.csv: `go run ./scripts/accuracy -seed 2 -boot 100 -csv SIM.csv` (the
simulated calibration set); REAL.csv: `go run ./scripts/realdata -seed 2
-csv REAL.csv` (only its tuning sources are used). Both must come from a
headroom whose intervals use the knots OLD_KNOTS below, so that the
bootstrap part of each interval can be recovered from its lower end:
lo = D + Δ·exp(−z·s), s² = s_boot² + s_old(m)² + (κ_old(m)·|b|)².

The adaptive interval (complexity/adapt.go) is, on the log of the new units,

  s_lo² = s_boot² + s_model(m)², s_hi² = s_lo² + (κ(m)·|b|)²
  (lower end D + Δ·exp(−z·s_lo), upper end D + Δ·exp(z·s_hi)),

b the sample's self-backtest error (a 10x extrapolation of its own 10%
thinning). With FIT=1 it prints the knots of complexity.ModelErrorKnots and
BacktestKnots by the rule of fit_knots (the one in use). Without it, for
each κ given (one weight for all multiples), exploratory: the knots for
95% coverage (simulated and real tuning cells weighted equally; with
KNOTS_FROM=sim the simulated alone), the lowest per-family and per-source
coverage and the median width.
"""
import csv
import math
import os
import sys
from collections import defaultdict

Z = 1.959963984540054
MULTS = [2.0, 10.0, 30.0, 100.0]
OLD_KNOTS = [(1, 0), (2, 0.015), (10, 0.083), (30, 0.192), (100, 0.269)]
# The knots of the build that wrote the CSVs (default: those before the
# adaptive term, commit 7a33e1a; to recalibrate from a later build, put its
# complexity.ModelErrorKnots and BacktestKnots here).
OLD_BT_KNOTS = [(1, 0)]
BT_MISSING = 0.1  # complexity.backtestMissing


def knot_interp(knots, m):
    if m <= 1:
        return 0.0
    if m >= knots[-1][0]:
        return knots[-1][1]
    for (m0, s0), (m1, s1) in zip(knots, knots[1:]):
        if m <= m1:
            f = (math.log(m) - math.log(m0)) / (math.log(m1) - math.log(m0))
            return s0 + f * (s1 - s0)
    return knots[-1][1]


def adapt(b, m):
    if b is None or not math.isfinite(b):
        return BT_MISSING
    return abs(b)


BUILDS = {
    # knots of the build that wrote a CSV: (ModelErrorKnots, BacktestKnots)
    "old": (OLD_KNOTS, OLD_BT_KNOTS),  # before the adaptive term (commit 7a33e1a)
    "none": ([(1, 0)], [(1, 0)]),      # scripts/accuracy -calibrate (bootstrap-only)
}
KNOTS = BUILDS["old"]


def row(group, name, m, d, pred, lo, truth, b):
    """One calibration cell: (group, name, m, s_boot, e) with e the
    |log| error of the new units; None when unusable."""
    delta = pred - d
    if not (delta > 0 and lo > d and truth > d):
        return (group, name, m, 0.0, math.inf, b)  # a miss whatever the width
    s = -math.log((lo - d) / delta) / Z
    bb = abs(b) if b is not None and math.isfinite(b) else BT_MISSING
    sb2 = s * s - knot_interp(KNOTS[0], m) ** 2 - (knot_interp(KNOTS[1], m) * bb) ** 2
    sb = math.sqrt(max(sb2, 0.0))
    e = math.log((truth - d) / delta)  # signed: > 0 when the truth is above
    return (group, name, m, sb, e, b)


def num(x):
    try:
        v = float(x)
    except ValueError:
        return None
    return v if math.isfinite(v) else None


def load_files(args):
    """args: SIM.csv or REAL.csv, each optionally followed by :old or :none
    (the knots of the build that wrote it; default old). A file whose
    header has "family" is simulated, else real (tuning sources only)."""
    global KNOTS
    cells = []
    for a in args:
        path, _, build = a.partition(":")
        KNOTS = BUILDS[build or "old"]
        with open(path) as f:
            sim = "family" in f.readline()
        cells += load(path if sim else None, None if sim else path)
    return cells


def load(sim_path, real_path):
    cells = []
    if sim_path is not None:
        load_csv(sim_path, "sim", "family", "headroom_lo", None, cells)
    if real_path is not None:
        load_csv(real_path, "real", "source", "lo", "tune", cells)
    return cells


def load_csv(path, group, name_col, lo_col, only_set, cells):
    """Append the cells of one CSV (only rows of set only_set, if given)."""
    with open(path) as f:
        for r in csv.DictReader(f):
            if only_set is not None and r["set"] != only_set:
                continue
            pred, lo = num(r["headroom"]), num(r[lo_col])
            if pred is None or lo is None:
                cells.append((group, r[name_col], float(r["mult"]), 0.0, math.inf, None))
                continue
            cells.append(row(group, r[name_col], float(r["mult"]), float(r["distinct"]), pred, lo,
                             float(r["truth"]), num(r["backtest"])))
    return cells


def covered(c, sm, kappa):
    """The interval holds the truth: below by s_lo² = s_boot² + s_model²,
    above by s_hi² = s_lo² + s_fit² (the adaptive term widens the upper
    side only, complexity/adapt.go)."""
    _, _, m, sb, e, b = c
    if e < 0:
        return -e <= Z * math.sqrt(sb * sb + sm * sm)
    return e <= Z * math.sqrt(sb * sb + sm * sm + (kappa * adapt(b, m)) ** 2)


GROUPS = ("sim", "real")


def coverage(cs, sm, kappa):
    """Equal weight to the groups in GROUPS (simulated, real tuning)."""
    out = []
    for g in GROUPS:
        gc = [c for c in cs if c[0] == g]
        if gc:
            out.append(sum(covered(c, sm, kappa) for c in gc) / len(gc))
    return sum(out) / len(out)


def calibrate(cells, kappa, target=0.95):
    knots = [(1, 0.0)]
    for m in MULTS:
        cs = [c for c in cells if c[2] == m]
        lo, hi = 0.0, 5.0
        for _ in range(50):
            mid = (lo + hi) / 2
            if coverage(cs, mid, kappa) >= target:
                hi = mid
            else:
                lo = mid
        knots.append((m, hi))
    return knots


def report(cells, kappa, knots):
    print(f"kappa {kappa}: knots " + ", ".join(f"{{{m:g}, {s:.3f}}}" for m, s in knots))
    by = defaultdict(lambda: [0, 0])
    widths = []
    for c in cells:
        g, name, m, sb, e, b = c
        sm = dict(knots)[m]
        ok = covered(c, sm, kappa)
        by[(g, name)][0] += ok
        by[(g, name)][1] += 1
        by[(g, "ALL")][0] += ok
        by[(g, "ALL")][1] += 1
        if math.isfinite(e):
            widths.append(math.sqrt(sb * sb + sm * sm + (kappa * adapt(b, m)) ** 2))
    widths.sort()
    low = sorted(((v[0] / v[1], k) for k, v in by.items()))
    print("  median s %.3f; lowest coverage: " % widths[len(widths) // 2]
          + "; ".join(f"{k[1]} {100 * v:.0f}%" for v, k in low[:6]))
    print("  sim all %.1f%%, real tuning all %.1f%%" % (
        100 * by[("sim", "ALL")][0] / by[("sim", "ALL")][1], 100 * by[("real", "ALL")][0] / by[("real", "ALL")][1]))


def main():
    global GROUPS
    if os.environ.get("FIT") == "1":
        fit_knots(load_files(sys.argv[1:]))
        return
    if os.environ.get("KNOTS_FROM") == "sim":
        GROUPS = ("sim",)  # knots from the simulated set alone, the weight judged on both
    cells = load(sys.argv[1], sys.argv[2])
    kappas = [float(x) for x in sys.argv[3:]] or [0, 0.5, 1, 2, 3, 4, 6]
    for k in kappas:
        report(cells, k, calibrate(cells, k))



def sim_knot(sim, kappa):
    """The smallest s_model (bisection to 5/2^50) giving 95% coverage of
    the simulated cells sim at weight kappa."""
    lo, hi = 0.0, 5.0
    for _ in range(50):
        mid = (lo + hi) / 2
        if sum(covered(c, mid, kappa) for c in sim) / len(sim) >= 0.95:
            hi = mid
        else:
            lo = mid
    return hi


def per_multiple(cells, kappas):
    """For each multiple and weight: the sim-calibrated knot, the coverage
    of the simulated and the real tuning cells, their median widths s."""
    import statistics
    for m in MULTS:
        cs = [c for c in cells if c[2] == m]
        for k in kappas:
            sim = [c for c in cs if c[0] == "sim"]
            real = [c for c in cs if c[0] == "real"]
            hi = sim_knot(sim, k)
            def w(g):
                return statistics.median(math.sqrt(c[3] ** 2 + hi ** 2 + (k * adapt(c[5], m)) ** 2) for c in g)
            fam = defaultdict(list)
            for c in cs:
                fam[c[1]].append(covered(c, hi, k))
            worst = sorted((sum(v) / len(v), n) for n, v in fam.items())[:3]
            print(f"m={m:g} kappa={k:g}: knot {hi:.3f}; sim {100 * sum(covered(c, hi, k) for c in sim) / len(sim):.0f}% "
                  f"real {100 * sum(covered(c, hi, k) for c in real) / len(real):.0f}%; width sim {w(sim):.3f} real {w(real):.3f}; worst "
                  + ", ".join(f"{n} {100 * v:.0f}%" for v, n in worst))


REAL_TARGET = float(os.environ.get("REAL_TARGET", "0.95"))


def fit_knots(cells, grid=None):
    """The rule used for complexity.ModelErrorKnots and BacktestKnots: for
    each multiple m and weight κ on a grid, the knot s_model(m) is the
    smallest giving 95% coverage on the simulated calibration set; κ(m) is
    the smallest weight whose real tuning coverage reaches 95% while the
    simulated coverage stays at most 97%; where none does, the weight with
    the highest real coverage under that cap."""
    grid = grid or [float(k) for k in range(0, 31)]
    model, weight = [(1, 0.0)], [(1, 0.0)]
    for m in MULTS:
        cs = [c for c in cells if c[2] == m]
        sim = [c for c in cs if c[0] == "sim"]
        real = [c for c in cs if c[0] == "real"]
        best = None
        tried = []
        for k in grid:
            hi = sim_knot(sim, k)
            cs_ = sum(covered(c, hi, k) for c in sim) / len(sim)
            cr = sum(covered(c, hi, k) for c in real) / len(real)
            tried.append((k, hi, cr, cs_))
            if cs_ > 0.97:
                continue
            if best is None or cr > best[2] + 1e-12:
                best = (k, hi, cr, cs_)
            if cr >= REAL_TARGET:
                break
        if best[2] < REAL_TARGET and len(weight) > 1:
            # Target out of reach: more weight buys little coverage at a
            # large cost in width; keep the previous multiple's weight.
            k = weight[-1][1]
            best = next(b for b in tried if b[0] == k)
        k, sm, cr, cs_ = best
        print(f"m={m:g}: kappa {k:g}, s_model {sm:.3f}: simulated {100 * cs_:.1f}%, real tuning {100 * cr:.1f}%")
        model.append((m, sm))
        weight.append((m, k))
    print("defaultKnots = []Knot{" + ", ".join(f"{{{m:g}, {v:.3f}}}" for m, v in model) + "}")
    print("defaultFitKnots = []Knot{" + ", ".join(f"{{{m:g}, {v:g}}}" for m, v in weight) + "}")
    return model, weight


if __name__ == "__main__":
    main()
