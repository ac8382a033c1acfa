package complexity

import (
	"math"
	"sort"
)

// rarefy returns the expected number of distinct units, and its variance,
// in a subsample of m reads drawn without replacement from the N reads of
// c (rarefaction).
//
// With n_j units seen exactly j times, N = sum_j j n_j and
//
//	q_j(m) = C(N-j, m) / C(N, m)
//
// the probability that a given unit of j reads is absent from the
// subsample, the expectation is (Hurlbert 1971)
//
//	E[S_m] = sum_j n_j (1 - q_j(m))
//
// and the variance is (Heck, van Belle & Simberloff 1975), written
// per frequency class (the n_j units of one class share q_j, so a pair of
// units is a pair of classes, or two units of one class):
//
//	Var[S_m] = sum_j n_j q_j (1 - q_j)
//	         + sum_j n_j (n_j - 1) (q_2j - q_j^2)
//	         + 2 sum_{j<l} n_j n_l (q_{j+l} - q_j q_l)
//
// Every q is evaluated as a logarithm, never as a ratio of factorials or of
// binomial coefficients: directly as sum_i log1p(-m/(N-i)) when j or m is at
// most 16, otherwise from log-gamma in Loader's (2000) saddle-point form
// (Stirling remainders and the deviance bd0), which avoids the loss of
// about eps*N*log(N) absolute that a plain difference of math.Lgamma values
// suffers (~4e-6 at N = 1e9, far more than q's distance from 1 when m is
// small). 1 - q is formed with expm1, and each covariance
// q_{j+l} - q_j q_l as q_j q_l expm1(Δ), Δ = log q_{j+l} - log q_j - log q_l,
// with Δ (about j l m/N^2, so N/l times smaller than log q_j) obtained
// without that cancellation: summed directly when min(j, l) or m is at
// most 16, else as a second difference of the log-gamma form whose
// leading terms are differenced in closed form (see hgLogCovRatio).
//
// Work: the mean is O(K) for K frequency classes. The pairwise variance
// term skips pairs whose total contribution is provably below
// 1e-16 of the diagonal term (|q_{j+l} - q_j q_l| <= q_j q_l, since sampling
// without replacement makes absences negatively associated), so at large m
// only a few pairs remain. When more than rarefyPairBudget (2^20) pairs would
// still be needed it uses instead the binomial-thinning approximation
// conditioned on the subsample size (each read kept with p = m/N, units
// then independent, and Var[S | M = m] = Var[S] - Cov[S,M]^2/Var[M]):
//
//	Var[S_m] ~= sum_j n_j b_j (1 - b_j) - (sum_j n_j j p b_j)^2 / (N p (1-p)),
//	b_j = (1-p)^j
//
// which is asymptotically exact as N grows. Measured against the exact sum
// on 2000 classes and 7.2e7 reads (TestRarefyVarianceApprox): 0.8% off at
// m = 100 (0.4% in the standard deviation), 4e-5 at m = 1000, below 2e-7
// from m = N/100 on. Pruning removes most pairs at large m, so in practice
// the approximation is reached only at small m.
//
// m must lie in [0, N]; outside it (and for an empty table with m != 0)
// both results are NaN. rarefy(c, 0) = (0, 0) and rarefy(c, N) = (D, 0).
// The mean is accurate to a few eps relative. The variance is a difference
// of terms as large as the mean, so its error is best stated in absolute
// terms: a few eps times the mean, which is relatively larger where the
// variance is far below the mean (against exact values, N up to 2.2e9, the
// worst relative error is 3.5e-11, at m = 3 of N = 2.2e9 where the
// variance is 6.9e-6 and the mean 3).
//
// References:
//
//	Hurlbert, S. H. (1971). The nonconcept of species diversity: a critique
//	and alternative parameters. Ecology 52:577-586.
//	Heck, K. L., van Belle, G. & Simberloff, D. (1975). Explicit calculation
//	of the rarefaction diversity measurement and the determination of
//	sufficient sample size. Ecology 56:1459-1461.
//	Loader, C. (2000). Fast and accurate computation of binomial
//	probabilities. Technical report, Bell Labs.
func rarefy(c Counts, m int64) (mean, variance float64) {
	if m < 0 || m > c.Reads() {
		return math.NaN(), math.NaN()
	}
	return rarefyAt(c, float64(m), true)
}

// rarefyPairBudget bounds the class pairs evaluated exactly for the
// rarefaction variance (about 50 ms of work at ~50 ns a pair); beyond it
// the conditioned binomial approximation is used (see rarefy).
const rarefyPairBudget = 1 << 20

// hgDirect is the largest number of factors summed directly in
// hgLogAbsent; above it the log-gamma form is used. Sixteen log1p terms
// cost about as much as the log-gamma form and are accurate to ~16 eps.
const hgDirect = 16

// rarefyMeanAt is the rarefaction expectation at a real depth t in [0, N],
// by the gamma-function continuation of q_j (see hgLogAbsent): equal to
// rarefy at integers, smooth and increasing between them.
func rarefyMeanAt(c Counts, t float64) float64 {
	if !(t >= 0 && t <= float64(c.Reads())) {
		return math.NaN()
	}
	m, _ := rarefyAt(c, t, false)
	return m
}

// rarefyAt computes the rarefaction mean and, if wantVar, variance at a
// real depth t in [0, N] (caller checks the range).
func rarefyAt(c Counts, t float64, wantVar bool) (mean, variance float64) {
	return rarefyBudget(c, t, wantVar, rarefyPairBudget)
}

// rarefyBudget is rarefyAt with the pair budget as a parameter (tests
// use it to reach the exact variance beyond the budget).
func rarefyBudget(c Counts, t float64, wantVar bool, budget int) (mean, variance float64) {
	n := float64(c.Reads())
	switch {
	case t == 0:
		return 0, 0
	case t == n:
		return float64(c.Distinct()), 0
	}
	cls := c.classes
	k := len(cls)
	var sum, comp float64 // Neumaier-compensated sum of the mean
	if !wantVar {
		for _, cl := range cls {
			l := hgLogAbsent(n, float64(cl.Times), t)
			sum, comp = neumaierAdd(sum, comp, float64(cl.Units)*-math.Expm1(l))
		}
		return sum + comp, math.NaN()
	}
	lq := make([]float64, k)
	q := make([]float64, k)
	rest := make([]float64, k) // hgLoaderRestOther where hgLogCovRatio may use it
	for i, cl := range cls {
		if j := float64(cl.Times); j > hgDirect && n-j-t >= 1 {
			rest[i] = hgLoaderRestOther(n, j, t)
		}
		lq[i] = hgLogAbsent(n, float64(cl.Times), t)
		q[i] = math.Exp(lq[i])
		sum, comp = neumaierAdd(sum, comp, float64(cl.Units)*-math.Expm1(lq[i]))
	}
	mean = sum + comp

	// Diagonal term and the suffix sums R_b = sum_{b' >= b} n_b' q_b' that
	// bound what the pairs from b on can contribute.
	var diag, dcomp float64
	for i, cl := range cls {
		diag, dcomp = neumaierAdd(diag, dcomp, float64(cl.Units)*q[i]*-math.Expm1(lq[i]))
	}
	diag += dcomp
	if diag == 0 {
		return mean, 0
	}
	suffix := make([]float64, k+1)
	for i := k - 1; i >= 0; i-- {
		suffix[i] = suffix[i+1] + float64(cls[i].Units)*q[i]
	}
	// cut[a]: pairs (a, b) with b >= cut[a] together contribute at most
	// 2 n_a q_a R_cut <= thr, thr = 1e-16 * diag / K.
	thr := 1e-16 * diag / float64(k)
	cut := make([]int, k)
	var pairs int
	for a := range cls {
		w := 2 * float64(cls[a].Units) * q[a]
		cut[a] = a + sort.Search(k-a, func(i int) bool { return w*suffix[a+i] <= thr })
		pairs += cut[a] - a
	}
	if pairs > budget {
		return mean, rarefyVarBinomial(c, t)
	}

	var off, ocomp float64 // sum of (negative) covariance terms
	for a := range cls {
		ja, na := float64(cls[a].Times), float64(cls[a].Units)
		if q[a] == 0 {
			continue
		}
		for b := a; b < cut[a]; b++ {
			if q[b] == 0 {
				break // q is non-increasing in j
			}
			jb, nb := float64(cls[b].Times), float64(cls[b].Units)
			var w float64
			if a == b {
				w = na * (na - 1)
			} else {
				w = 2 * na * nb
			}
			if w == 0 {
				continue
			}
			d := hgLogCovRatio(n, ja, jb, t, lq[a], lq[b], rest[a], rest[b])
			off, ocomp = neumaierAdd(off, ocomp, w*q[a]*q[b]*math.Expm1(d))
		}
	}
	variance = diag + (off + ocomp)
	if variance < 0 {
		variance = 0 // rounding near m = N
	}
	return mean, variance
}

// rarefyVarBinomial is the conditioned binomial-thinning approximation of
// the rarefaction variance documented at rarefy.
func rarefyVarBinomial(c Counts, t float64) float64 {
	n := float64(c.Reads())
	p := t / n
	l1p := math.Log1p(-p)
	var vb, vbc, cv, cvc float64
	for _, cl := range c.classes {
		j, u := float64(cl.Times), float64(cl.Units)
		b := math.Exp(j * l1p)
		vb, vbc = neumaierAdd(vb, vbc, u*b*-math.Expm1(j*l1p))
		cv, cvc = neumaierAdd(cv, cvc, u*j*p*b)
	}
	vb += vbc
	cv += cvc
	v := vb - cv*cv/(n*p*(1-p))
	if v < 0 {
		v = 0
	}
	return v
}

// hgLogAbsent returns log q, where
//
//	q = C(n-j, t) / C(n, t) = prod_{i=0}^{j-1} (1 - t/(n-i)),
//
// the probability that a unit holding j of n reads is missed by a sample
// of t reads drawn without replacement. j is a whole number >= 0, n >= j,
// and t is real in [0, n]: for non-integer t the product (equivalently the
// gamma-function form Γ(n-j+1)Γ(n-t+1)/(Γ(n-j-t+1)Γ(n+1))) is used while
// all factors are positive, and q = 0 (log q = -Inf) once t >= n-j+1, which
// makes q continuous in t and exact at integers.
func hgLogAbsent(n, j, t float64) float64 {
	switch {
	case t <= 0 || j <= 0:
		return 0
	case t >= n-j+1:
		return math.Inf(-1)
	case j <= hgDirect:
		var s float64
		for i := 0.0; i < j; i++ {
			s += math.Log1p(-t / (n - i))
		}
		return s
	case t <= hgDirect && t == math.Trunc(t):
		// Symmetry: C(n-j,t)/C(n,t) = C(n-t,j)/C(n,j).
		var s float64
		for i := 0.0; i < t; i++ {
			s += math.Log1p(-j / (n - i))
		}
		return s
	}
	if n-j-t < 1 {
		// q is at most C(n-j,t)/C(n,t) with n-j-t < 1 < j, t: tiny, so the
		// plain log-gamma difference is accurate enough relative to log q.
		l1, _ := math.Lgamma(n - j + 1)
		l2, _ := math.Lgamma(n - t + 1)
		l3, _ := math.Lgamma(n - j - t + 1)
		l4, _ := math.Lgamma(n + 1)
		return l1 + l2 - l3 - l4
	}
	return j*math.Log1p(-t/n) + hgLoaderRest(n, j, t)
}

// hgLoaderRest returns log q - j log(1-t/n) for the q of hgLogAbsent, in
// Loader's form, for n-j-t >= 1: log q = j log(1-p) + log dbinom(t; n-j, p)
// - log dbinom(t; n, p) with p = t/n, the dbinom ratio expanded into
// Stirling remainders and deviances whose arguments differ by the exactly
// known amounts t j/n and -t j/n. The part j log(1-p) is left out because
// it is linear in j: in the covariance exponent
// log q_{j+l} - log q_j - log q_l it cancels exactly, and leaving it out
// avoids a relative error of eps*n/min(j,l) there.
func hgLoaderRest(n, j, t float64) float64 {
	return hgLoaderRestOther(n, j, t) - t*j*j/(n*(2*n-j))
}

// hgLoaderRestOther is hgLoaderRest without the leading deviance term
// t j^2/(n(2n-j)) (= d v of bd0(t, t(n-j)/n)), whose second difference
// hgLogCovRatio takes in closed form.
func hgLoaderRestOther(n, j, t float64) float64 {
	a, b, cc := n-j, n-t, n-j-t
	d, v := t*j/n, j/(n+a)
	var tail float64
	if v < 0.1 {
		tail = hgBd0Tail(t, v)
	} else {
		tail = hgBd0(t, d, v) - d*v
	}
	return hgStirlerr4(n, j, t) - tail -
		hgBd0(cc, -j*t/n, -j*t/(cc*n+a*b)) -
		0.5*math.Log1p(-j*t/(a*b))
}

// hgLogCovRatio returns log(q_{j+l} / (q_j q_l)) for the q of hgLogAbsent,
// given lqj = log q_j, lql = log q_l and rj, rl their hgLoaderRestOther
// (needed only when j, l > 16 and n-j-l-t >= 1). Its value is about j l t/n^2,
// smaller than log q_j by a factor of about l/n, so it is not formed as a
// difference of logs where that would cancel:
//
//	min(j,l) <= 16:    sum_{i<min(j,l)} log1p(-J t / ((n-t-i)(n-J-i))),  J = max(j,l)
//	integer t <= 16:   sum_{i<t} log1p(-j l / ((n-i-j)(n-i-l)))
//	otherwise:         the second difference of hgLoaderRest: the part of
//	                   log q linear in j cancels exactly and is left out,
//	                   the leading deviance term is differenced in closed
//	                   form, the Stirling remainders as in hgStirlerr4
//
// each accurate to a few eps relative. Near the boundary
// (n-j-l-t < 1) q_{j+l} is tiny and the plain difference is used.
func hgLogCovRatio(n, j, l, t, lqj, lql, rj, rl float64) float64 {
	if t >= n-j-l+1 {
		return math.Inf(-1)
	}
	if l > j {
		j, l = l, j
	}
	switch {
	case l <= hgDirect:
		var s float64
		for i := 0.0; i < l; i++ {
			s += math.Log1p(-j * t / ((n - t - i) * (n - j - i)))
		}
		return s
	case t <= hgDirect && t == math.Trunc(t):
		var s float64
		for i := 0.0; i < t; i++ {
			s += math.Log1p(-j * l / ((n - i - j) * (n - i - l)))
		}
		return s
	case n-j-l-t >= 1:
		// Second difference of the leading deviance term t s^2/(n(2n-s)),
		// in closed form, then of the remaining small terms.
		lead := -2 * t * j * l * (4*n - j - l) / ((2*n - l) * (2*n - j) * (2*n - j - l))
		return lead + hgLoaderRestOther(n, j+l, t) - rj - rl
	}
	return hgLogAbsent(n, j+l, t) - lqj - lql
}

// lnSqrt2Pi is log(sqrt(2*pi)).
const lnSqrt2Pi = 0.918938533204672741780329736406

// hgStirlerr returns the remainder of Stirling's formula,
//
//	stirlerr(x) = log Γ(x+1) - (x + 1/2) log x + x - log sqrt(2π),
//
// for real x > 0: directly for x <= 15 (absolute error ~1e-14), else by
// the asymptotic series 1/(12x) - 1/(360x^3) + 1/(1260x^5) - 1/(1680x^7)
// + 1/(1188x^9), whose first omitted term is below 2.3e-16 for x > 15
// (coefficients B_2k/(2k(2k-1)) from the Bernoulli numbers).
func hgStirlerr(x float64) float64 {
	if x <= 15 {
		lg, _ := math.Lgamma(x + 1)
		return lg - (x+0.5)*math.Log(x) + x - lnSqrt2Pi
	}
	const (
		s0 = 1.0 / 12
		s1 = 1.0 / 360
		s2 = 1.0 / 1260
		s3 = 1.0 / 1680
		s4 = 1.0 / 1188
	)
	x2 := 1 / (x * x)
	return (s0 - (s1-(s2-(s3-s4*x2)*x2)*x2)*x2) / x
}

// hgStirlerr4 returns stirlerr(n-j) - stirlerr(n) + stirlerr(n-t) -
// stirlerr(n-j-t). When all four arguments exceed 15 the leading 1/(12x)
// terms are combined exactly,
//
//	-j t (2n - j - t) / (12 n (n-j) (n-t) (n-j-t)),
//
// and only the higher series terms are differenced, so the result is
// accurate relative to its own size (about j t/(6 n^3)) rather than to
// eps/(12 n): at n = 2e9 the plain difference limits the covariance
// exponent of hgLogCovRatio to ~1e-12 relative.
func hgStirlerr4(n, j, t float64) float64 {
	a, b, cc := n-j, n-t, n-j-t
	if cc <= 15 {
		return hgStirlerr(a) - hgStirlerr(n) + hgStirlerr(b) - hgStirlerr(cc)
	}
	lead := -j * t * (2*n - j - t) / (12 * n * a * b * cc)
	return lead + hgStirlerrTail(a) - hgStirlerrTail(n) + hgStirlerrTail(b) - hgStirlerrTail(cc)
}

// hgStirlerrTail returns stirlerr(x) - 1/(12x) for x > 15 by the series
// of hgStirlerr without its first term.
func hgStirlerrTail(x float64) float64 {
	const (
		s1 = 1.0 / 360
		s2 = 1.0 / 1260
		s3 = 1.0 / 1680
		s4 = 1.0 / 1188
	)
	x2 := 1 / (x * x)
	return -(s1 - (s2-(s3-s4*x2)*x2)*x2) * x2 / x
}

// hgBd0 returns the deviance term bd0(x, M) = x log(x/M) + M - x of Loader
// (2000), given x, d = x - M and v = d/(x + M) computed without
// cancellation by the caller. For |v| < 0.1 it sums the series
//
//	bd0 = d v + 2x (v^3/3 + v^5/5 + ...),
//
// otherwise x log((1+v)/(1-v)) - d.
func hgBd0(x, d, v float64) float64 {
	if math.Abs(v) >= 0.1 {
		return x*(math.Log1p(v)-math.Log1p(-v)) - d
	}
	return d*v + hgBd0Tail(x, v)
}

// hgBd0Tail returns 2x (v^3/3 + v^5/5 + ...), for |v| < 0.1.
func hgBd0Tail(x, v float64) float64 {
	ej := 2 * x * v
	v2 := v * v
	var s float64
	for k := 3.0; k < 200; k += 2 {
		ej *= v2
		s1 := s + ej/k
		if s1 == s {
			break
		}
		s = s1
	}
	return s
}

// neumaierAdd adds x to the compensated sum (s, c) (Neumaier 1974, an
// improved Kahan summation); the total is s + c.
func neumaierAdd(s, c, x float64) (float64, float64) {
	t := s + x
	if math.Abs(s) >= math.Abs(x) {
		c += (s - t) + x
	} else {
		c += (x - t) + s
	}
	return t, c
}

// rarefyMean returns the expected distinct units in a subsample of t reads
// drawn without replacement, as rarefy's mean but without the variance
// (much cheaper for many depths), for real t in [0, N] by the
// gamma-function continuation. It returns NaN outside [0, N].
func rarefyMean(c Counts, t float64) float64 { return rarefyMeanAt(c, t) }
