#!/usr/bin/python3
"""Reference values for complexity.Rarefy and complexity.CoverageAt.

Run with Debian's interpreter (python3-scipy 1.10.1, python3-mpmath 1.2.1):

    /usr/bin/python3 scripts/ref_scipy_rarefaction.py > testdata/complexity/rarefaction_golden.tsv

For each frequency-count table (classes "times:units") and depth m it writes

  * the rarefaction mean  E[S_m]   = sum_j n_j (1 - C(N-j,m)/C(N,m))      (Hurlbert 1971)
  * its variance          Var[S_m] = C(N,m)^-2 [ sum_i Q_i (B - Q_i)
                                   + 2 sum_{i<k} (Q_ik B - Q_i Q_k) ]     (Heck et al. 1975)
    with B = C(N,m), Q_i = C(N-N_i,m), Q_ik = C(N-N_i-N_k,m), the sums over units
  * the rarefied sample coverage of Chao & Jost (2012, Ecology 93:2533, eq. 4a)
                          C_m = 1 - sum_j (j n_j / N) C(N-j,m)/C(N-1,m)   (m < N)

method "exact": every binomial coefficient is an exact big integer from
scipy.special.comb(exact=True) and the results are exact rationals rounded once
to float64 (a true reference). method "mpmath60": tables too large for that
(N ~ 1e6 at middle depths, N = 2.2e9 beyond m = 50) use mpmath.loggamma at 60
significant digits; the covariance difference then keeps more than 45 digits.

The tables are generated here from fixed seeds (Python's random module) and
written into the output, so the Go test reads the same tables.
"""

import random
import sys
from fractions import Fraction

import mpmath
import scipy
from scipy.special import comb

mpmath.mp.dps = 60


def tables():
    """(name, {times: units}) pairs: hand-made, then seeded random ones."""
    out = [
        ("tiny", {1: 3, 2: 1, 4: 1}),
        ("singletons", {1: 12}),
        ("one-unit", {7: 1}),
        ("two-classes", {1: 5, 3: 2}),
    ]
    rng = random.Random(20261201)

    def gen(name, units, shape, scale):
        m = {}
        for _ in range(units):
            x = 0
            while x == 0:  # a gamma-mixed Poisson count, zero-truncated
                lam = rng.gammavariate(shape, scale)
                # Poisson by inversion (lam stays moderate here)
                L, k, p = pow(2.718281828459045, -lam), 0, 1.0
                while True:
                    p *= rng.random()
                    if p <= L:
                        break
                    k += 1
                x = k
            m[x] = m.get(x, 0) + 1
        out.append((name, m))

    gen("small-gamma", 25, 1.0, 2.0)         # N ~ 50
    gen("medium-gamma", 400, 0.7, 6.0)       # N ~ 2000
    gen("medium-skewed", 1500, 0.3, 40.0)    # N ~ 2e4, heavy classes
    # a large table: many singletons and a few jackpot classes
    big = {1: 300000, 2: 90000, 3: 30000, 5: 8000, 10: 2000, 40: 300, 200: 20, 5000: 2, 60000: 1}
    out.append(("large-jackpot", big))
    # a deep library (2.2e9 reads) where plain log-gamma differences fail
    out.append(("deep", {1: 10**9, 2: 2 * 10**8, 50: 10**7, 1000: 10**5, 100000: 1000}))
    return out


def depths(n):
    if n > 10**8:
        return [1, 2, 3, 17, 100, 10**4, 10**6, n // 2, n - 10**6]
    ds = {0, 1, 2, 3, n // 10, n // 3, n // 2, (2 * n) // 3, n - 3, n - 2, n - 1, n}
    return sorted(d for d in ds if 0 <= d <= n)


def exact_row(cls, n, m):
    B = comb(n, m, exact=True)
    memo = {}

    def Q(s):
        if s not in memo:
            memo[s] = comb(n - s, m, exact=True) if n - s >= m else 0
        return memo[s]

    js = sorted(cls)
    mean = sum(Fraction(cls[j] * (B - Q(j)), B) for j in js) if B else Fraction(0)
    num = 0
    for a, j in enumerate(js):
        u = cls[j]
        num += u * Q(j) * (B - Q(j))
        num += u * (u - 1) * (Q(2 * j) * B - Q(j) * Q(j))
        for l in js[a + 1:]:
            num += 2 * u * cls[l] * (Q(j + l) * B - Q(j) * Q(l))
    var = Fraction(num, B * B)
    cov = None
    if m < n:
        B1 = comb(n - 1, m, exact=True)
        s = Fraction(0)
        for j in js:
            qq = comb(n - j, m, exact=True) if n - j >= m else 0
            s += Fraction(j * cls[j] * qq, n * B1)
        cov = 1 - s
    return mean, var, cov


def mp_row(cls, n, m):
    lg = mpmath.loggamma
    base = lg(n + 1) - lg(n - m + 1)

    def q(s):
        if n - s < m:
            return mpmath.mpf(0)
        return mpmath.exp(lg(n - s + 1) - lg(n - s - m + 1) - base)

    js = sorted(cls)
    mean = sum(cls[j] * (1 - q(j)) for j in js)
    var = mpmath.mpf(0)
    for a, j in enumerate(js):
        u = cls[j]
        qj = q(j)
        var += u * qj * (1 - qj)
        var += u * (u - 1) * (q(2 * j) - qj * qj)
        for l in js[a + 1:]:
            var += 2 * u * cls[l] * (q(j + l) - qj * q(l))
    cov = None
    if m < n:
        b1 = lg(n) - lg(n - m)

        def q1(j):
            if n - j < m:
                return mpmath.mpf(0)
            return mpmath.exp(lg(n - j + 1) - lg(n - j - m + 1) - b1)

        cov = 1 - sum(mpmath.mpf(j * cls[j]) / n * q1(j) for j in js)
    return mean, var, cov


def fmt(x):
    return "" if x is None else repr(float(x))


def main():
    w = sys.stdout.write
    w("# Rarefaction mean/variance (Hurlbert 1971; Heck, van Belle & Simberloff 1975) and\n")
    w("# rarefied coverage (Chao & Jost 2012) from scripts/ref_scipy_rarefaction.py\n")
    w("# scipy %s (scipy.special.comb exact=True), mpmath %s, Python %s\n"
      % (scipy.__version__, mpmath.__version__, sys.version.split()[0]))
    w("# coverage is empty at m = N (the rarefied formula is for m < N)\n")
    w("table\tclasses\tm\tmean\tvariance\tcoverage\tmethod\n")
    for name, cls in tables():
        n = sum(j * u for j, u in cls.items())
        spec = ",".join("%d:%d" % (j, cls[j]) for j in sorted(cls))
        for m in depths(n):
            if n <= 30000 or m <= 50 or (n <= 10**7 and n - m <= 50):
                mean, var, cov = exact_row(cls, n, m)
                meth = "exact"
            else:
                mean, var, cov = mp_row(cls, n, m)
                meth = "mpmath60"
            w("%s\t%s\t%d\t%s\t%s\t%s\t%s\n" % (name, spec, m, fmt(mean), fmt(var), fmt(cov), meth))


if __name__ == "__main__":
    main()
