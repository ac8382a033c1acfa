package complexity

// Baseline fits the curve called name to c, for comparisons such as the
// accuracy benchmark (scripts/accuracy), and reports whether it is
// admissible up to maxT reads (finite, non-decreasing, concave, no more
// new units than new reads beyond the observed depth). Analyze does not
// need it. The names:
//
//	"poisson"    one-class library, D(T) = S(1 − e^{−T/S}) (Lander &
//	             Waterman 1988, Genomics 2:231)
//	"ztnb"       zero-truncated negative binomial fitted to every class
//	             (Sampford 1955, Biometrika 42:58)
//	"rfa"        rational-function (Padé) stabilised Good–Toulmin series,
//	             the deepest admissible bounded approximant (Good &
//	             Toulmin 1956, Biometrika 43:45; Baker & Graves-Morris 1996)
//	"shen"       Chao1-based extrapolation (Shen, Chao & Lin 2003,
//	             Ecology 84:798)
//	"select"     the selection Analyze uses (see select.go)
//	"npmle"      nonparametric Poisson mixture on a grid of rates, fitted
//	             by EM (Laird 1978; Lindsay 1983; see npmle.go), a
//	             candidate evaluated and not used by Analyze
//
// and the mixture families select.go compares, each fitted alone:
// "lognormal-h", "lognormal2-h", "ztnb-h", "powerlaw-h", "band-h" (free
// head) and "lognormal" (the Poisson–lognormal maximum-likelihood fit,
// Bulmer 1974, Biometrics 30:101), "lognormal2", "ztnb-c" (censored).
// An unknown name or a failed fit is an error.
func Baseline(name string, c Counts, maxT float64) (m Model, admissible bool, err error) {
	switch name {
	case "poisson":
		m, err = fitPoisson(c)
	case "ztnb":
		m, err = fitZTNBAll(c)
	case "rfa":
		if r, e := fitRFA(c, maxT); e == nil {
			m = r
		} else {
			err = e
		}
	case "shen":
		m = newShenModel(c)
	case "select":
		m, _, err = extrapolate(c, maxT)
	case "npmle":
		m, err = fitNPMLE(c, maxT)
	default:
		m, err = refitCandidate(name, c, name, nil)
	}
	if err != nil {
		return nil, false, err
	}
	return m, isAdmissible(m, c, maxT), nil
}
