package complexity

import "math"

// This file holds the classic non-parametric richness estimators that work
// on a frequency-count table alone: Chao1 with its interval, ACE, Good's
// coverage, and a plausibility floor for the number of singletons.
//
// Notation: N = reads (observations), S = distinct units observed,
// f_j = units seen exactly j times (Counts.Units(j)).

// Chao1 returns the bias-corrected Chao1 estimate of the total number of
// units (seen and unseen) and its log-normal confidence interval at the
// given level (e.g. 0.95).
//
// The estimate (Chao 1984, in the bias-corrected form of the EstimateS
// User's Guide) is
//
//	S_chao1 = S + f1 (f1 - 1) / (2 (f2 + 1))
//
// and is defined whenever N > 0.
//
// The interval is the log-normal one of Chao (1987): with T = S_chao1 - S
// and z the standard normal quantile at 1 - (1-level)/2,
//
//	K  = exp(z sqrt(ln(1 + var/T²)))
//	lo = S + T/K,  hi = S + T K
//
// so that lo >= S always (EstimateS eq. 13). The variance follows the
// decision rules of the EstimateS User's Guide (Colwell), which are those
// of scikit-bio's chao1_ci (eq. 6 and eq. 7 there):
//
//	f1 > 0, f2 > 0:  var = f1(f1-1)/(2(f2+1)) + f1(2f1-1)²/(4(f2+1)²)
//	                       + f1²f2(f1-1)²/(4(f2+1)⁴)
//	f1 > 0, f2 = 0:  var = f1(f1-1)/2 + f1(2f1-1)²/4 - f1⁴/(4 S_chao1)
//
// When T = 0 (f1 = 1, or f1 = 0 handled below) the interval is [S, S].
// Without singletons (f1 = 0) the estimate is S and the interval is the
// one EstimateS uses in that case (eq. 14), with P = exp(-N/S):
//
//	lo = max(S, S/(1-P) - z sqrt(S P/(1-P)))
//	hi = S/(1-P) + z sqrt(S P/(1-P))
//
// Chao1 returns NaN for all three values when N = 0 (nothing was observed)
// or level is not in (0, 1), and NaN for lo and hi when the variance
// formula gives a negative value.
//
// References:
//
//	Chao A (1984) Non-parametric estimation of the number of classes in a
//	  population. Scandinavian Journal of Statistics 11:265-270.
//	Chao A (1987) Estimating the population size for capture-recapture data
//	  with unequal catchability. Biometrics 43:783-791.
//	Colwell RK, EstimateS User's Guide (equations 6, 7, 13 and 14 for the
//	  variance and interval; the numbering is the one scikit-bio 0.5.8's
//	  chao1_ci documentation cites).
func Chao1(c Counts, level float64) (est, lo, hi float64) {
	n := float64(c.Reads())
	if n == 0 || !(level > 0 && level < 1) {
		return math.NaN(), math.NaN(), math.NaN()
	}
	s := float64(c.Distinct())
	f1 := float64(c.Units(1))
	f2 := float64(c.Units(2))
	z := math.Sqrt2 * math.Erfinv(level)

	est = s + f1*(f1-1)/(2*(f2+1))
	if f1 == 0 {
		p := math.Exp(-n / s)
		mid := s / (1 - p)
		w := z * math.Sqrt(s*p/(1-p))
		return est, math.Max(s, mid-w), mid + w
	}
	var v float64
	if f2 == 0 {
		v = f1*(f1-1)/2 + f1*(2*f1-1)*(2*f1-1)/4 - f1*f1*f1*f1/(4*est)
	} else {
		d := f2 + 1
		v = f1*(f1-1)/(2*d) + f1*(2*f1-1)*(2*f1-1)/(4*d*d) + f1*f1*f2*(f1-1)*(f1-1)/(4*d*d*d*d)
	}
	t := est - s
	if t == 0 {
		return est, s, s
	}
	if !(v >= 0) {
		return est, math.NaN(), math.NaN()
	}
	k := math.Exp(z * math.Sqrt(math.Log1p(v/(t*t))))
	return est, s + t/k, s + t*k
}

// ACE returns the abundance-based coverage estimator of the total number of
// units (Chao & Lee 1992), treating units seen at most rare times as rare
// (10 is the usual threshold; Chao et al. 2000).
//
// With S_rare, N_rare the units and reads of rare units, S_abund the units
// seen more than rare times, and C = 1 - f1/N_rare,
//
//	γ² = max(S_rare/C · Σ_{j<=rare} j(j-1) f_j / (N_rare (N_rare - 1)) - 1, 0)
//	S_ace = S_abund + S_rare/C + f1/C · γ²
//
// When no unit is rare, S_ace = S_abund. ACE is undefined, and returns NaN,
// when N = 0, when rare < 1, and when every rare unit is a singleton
// (C = 0); Chao1 is the usual fallback then.
//
// References:
//
//	Chao A, Lee S-M (1992) Estimating the number of classes via sample
//	  coverage. Journal of the American Statistical Association 87:210-217.
//	Chao A, Hwang W-H, Chen Y-C, Kuo C-Y (2000) Estimating the number of
//	  shared species in two communities. Statistica Sinica 10:227-246
//	  (the threshold of 10).
func ACE(c Counts, rare int64) float64 {
	if c.Reads() == 0 || rare < 1 {
		return math.NaN()
	}
	var sRare, sAbund, nRare, sumJJ float64
	for _, k := range c.classes {
		u := float64(k.Units)
		if k.Times > rare {
			sAbund += u
			continue
		}
		j := float64(k.Times)
		sRare += u
		nRare += j * u
		sumJJ += j * (j - 1) * u
	}
	if sRare == 0 {
		return sAbund
	}
	f1 := float64(c.Units(1))
	if f1 == sRare {
		return math.NaN()
	}
	cov := 1 - f1/nRare
	g2 := math.Max(sRare/cov*sumJJ/(nRare*(nRare-1))-1, 0)
	return sAbund + sRare/cov + f1/cov*g2
}

// GoodCoverage returns Good's estimate of sample coverage, the share of
// the population's reads that belong to units already seen:
//
//	C = 1 - f1/N
//
// It returns NaN when N = 0.
//
// Reference:
//
//	Good IJ (1953) The population frequencies of species and the
//	  estimation of population parameters. Biometrika 40:237-264
//	  (citation from memory).
func GoodCoverage(c Counts) float64 {
	if c.Reads() == 0 {
		return math.NaN()
	}
	return 1 - float64(c.Units(1))/float64(c.Reads())
}

// SingletonFloor returns a lower bound for the expected number of
// singletons given the doubletons and tripletons,
//
//	F = 2 f2² / (3 max(f3, 1))
//
// It holds for any mixed-Poisson sampling model (each unit's count Poisson
// with a mean drawn from any distribution G). Derivation (ours, by the
// Cauchy–Schwarz inequality): E f_j = S ∫ e^(-λ) λ^j / j! dG(λ), so
// a_j = j! E f_j / S are the moments of the measure e^(-λ) dG and satisfy
// a_2² <= a_1 a_3, that is E f1 >= 2 (E f2)² / (3 E f3). Replacing f3 = 0 by
// 1 keeps F finite (and smaller than the bound with f3 -> 0). It returns 0
// when f2 = 0.
//
// A table from which singletons were removed, or whose singletons a
// denoising step absorbed, has f1 far below F; SingletonsDepleted tests
// that.
func SingletonFloor(c Counts) float64 {
	f2 := float64(c.Units(2))
	f3 := math.Max(float64(c.Units(3)), 1)
	return 2 * f2 * f2 / (3 * f3)
}

// Thresholds of SingletonsDepleted (ours, chosen so that a sample drawn from
// any mixed-Poisson model is flagged rarely: a Poisson count with mean at
// least 5 is 0 with probability below e^-5 < 0.7%, and a z of -3 is a 0.1%
// tail).
const (
	depletedMinFloor = 5.0  // F below this: too few doubletons to tell
	depletedZ        = -3.0 // flag when the log ratio is this many SEs low
)

// SingletonsDepleted reports whether the singletons of c are implausibly
// scarce relative to its doubletons and tripletons under any mixed-Poisson
// sampling model, as happens when singletons were filtered out of a table
// or absorbed by denoising. Estimators that lean on f1 (Chao1, ACE, Good's
// coverage, the Good–Toulmin series) are biased for such counts: totals
// too low, coverage too high.
//
// With F = SingletonFloor(c), c is flagged when F >= 5 and either f1 = 0,
// or f1 < F/2 and the log ratio is more than 3 standard errors low:
//
//	z = ln(f1 / F) / sqrt(1/f1 + 1/max(f3,1) + 4/f2) < -3
//
// (delta-method standard error of ln(f1 f3 / f2²) for Poisson counts).
func SingletonsDepleted(c Counts) bool {
	floor := SingletonFloor(c)
	if floor < depletedMinFloor {
		return false
	}
	f1 := float64(c.Units(1))
	if f1 == 0 {
		return true
	}
	if f1 >= floor/2 {
		return false
	}
	f2 := float64(c.Units(2))
	f3 := math.Max(float64(c.Units(3)), 1)
	z := math.Log(f1/floor) / math.Sqrt(1/f1+1/f3+4/f2)
	return z < depletedZ
}
