package complexity

import "math"

// Nonparametric Poisson mixture fitted by maximum likelihood (NPMLE).
//
// Each unit has its own rate λ (expected times seen in the N observed
// reads) drawn from an unknown mixing distribution G, and is seen
// Poisson(λ) times. Only units seen at least once are observed, so the
// likelihood of the frequency counts f_k (units seen k times) is that of a
// zero-truncated mixture with weights π on the seen units:
//
//	L(π) = Π_k [Σ_j π_j p_j(k)]^{f_k},  p_j(k) = e^{−λ_j} λ_j^k / (k! (1 − e^{−λ_j})),
//
// with G restricted to a fixed grid λ_1 < … < λ_G (Lindsay 1983: the NPMLE
// has finite support; on a grid it is a convex problem). The weights are
// found by the EM algorithm for mixing proportions (Laird 1978):
//
//	π_j ← (1/D) Σ_k f_k π_j p_j(k) / Σ_i π_i p_i(k).
//
// The seen weight π_j stands for S_j = D π_j / (1 − e^{−λ_j}) units of
// rate λ_j in the library, so after t reads
//
//	D(t) = Σ_j S_j (1 − e^{−λ_j t/N}),  D(N) = D,  limit Σ_j S_j.
//
// The rates below about 1/maxMultiple are not identified by the data (a
// unit that rare is almost never seen); the grid starts at λ_1 =
// npmleLowReach · N/maxT, so the rarest grid units have mean npmleLowReach
// at the deepest depth asked, and runs log-spaced to 1.5 × the largest
// count. References: Laird (1978), JASA 73:805; Lindsay (1983), Ann. Stat.
// 11:86 and 11:783; Böhning (1995), J. Stat. Plan. Inference 47:5 (EM on a
// grid); Norris & Pollock (1998), Environ. Ecol. Stat. 5:391 (NPMLE for
// species richness and its instability at the low end).
type npmleModel struct {
	n   float64   // observed reads N
	lam []float64 // grid rates per N reads
	s   []float64 // units at each rate in the library
}

// NPMLE fitting constants: npmleGrid rates; EM stops when the
// log-likelihood gains less than npmleTol (relative) in an iteration or
// after npmleIter iterations (EM for mixing weights converges slowly near
// the optimum; the curve, a smooth functional of π, settles long before the
// weights do): every npmleCheck iterations the prediction at maxT is
// compared with the previous check's, and EM stops when it moved by less
// than npmleCurveTol. npmleLowReach is explained above.
const (
	npmleCheck    = 100
	npmleCurveTol = 1e-5
	npmleGrid     = 80
	npmleIter     = 20000
	npmleTol      = 1e-14
	npmleLowReach = 0.1
)

// fitNPMLE fits the grid NPMLE Poisson mixture to c for predictions up to
// maxT reads.
func fitNPMLE(c Counts, maxT float64) (Model, error) {
	n, d := float64(c.Reads()), float64(c.Distinct())
	cls := c.Classes()
	if d < 2 || len(cls) == 0 || !(maxT >= n) {
		return nil, errNoFit
	}
	maxK := float64(cls[len(cls)-1].Times)
	lo := npmleLowReach * n / maxT
	hi := 1.5 * math.Max(maxK, 1)
	lam := make([]float64, npmleGrid)
	for j := range lam {
		lam[j] = lo * math.Pow(hi/lo, float64(j)/float64(npmleGrid-1))
	}
	// logp[k][j] = log p_j(k) for each class.
	logp := make([][]float64, len(cls))
	for i, cl := range cls {
		k := float64(cl.Times)
		lg, _ := math.Lgamma(k + 1)
		row := make([]float64, npmleGrid)
		for j, l := range lam {
			row[j] = -l + k*math.Log(l) - lg - math.Log(-math.Expm1(-l))
		}
		logp[i] = row
	}
	pi := make([]float64, npmleGrid)
	for j := range pi {
		pi[j] = 1 / float64(npmleGrid)
	}
	next := make([]float64, npmleGrid)
	w := make([]float64, npmleGrid)
	prev, lastV := math.Inf(-1), 0.0
	for it := 0; it < npmleIter; it++ {
		for j := range next {
			next[j] = 0
		}
		ll := 0.0
		for i, cl := range cls {
			// log-sum-exp over the grid for this class.
			mx := math.Inf(-1)
			for j := range w {
				if pi[j] > 0 {
					w[j] = math.Log(pi[j]) + logp[i][j]
					mx = math.Max(mx, w[j])
				} else {
					w[j] = math.Inf(-1)
				}
			}
			sum := 0.0
			for j := range w {
				w[j] = math.Exp(w[j] - mx)
				sum += w[j]
			}
			f := float64(cl.Units)
			ll += f * (mx + math.Log(sum))
			for j := range w {
				next[j] += f * w[j] / sum
			}
		}
		for j := range pi {
			pi[j] = next[j] / d
		}
		if ll-prev < npmleTol*math.Abs(ll) {
			break
		}
		prev = ll
		// Every npmleCheck iterations: stop once the prediction at maxT
		// moved by less than npmleCurveTol (relative) since the last check.
		if it%npmleCheck == npmleCheck-1 {
			v := 0.0
			for j, l := range lam {
				v += pi[j] / -math.Expm1(-l) * -math.Expm1(-l*maxT/n)
			}
			if math.Abs(v-lastV) < npmleCurveTol*v {
				break
			}
			lastV = v
		}
	}
	m := &npmleModel{n: n, lam: lam, s: make([]float64, npmleGrid)}
	for j, l := range lam {
		m.s[j] = d * pi[j] / -math.Expm1(-l)
	}
	return m, nil
}

func (m *npmleModel) Name() string { return "npmle" }

// Distinct returns Σ_j S_j (1 − e^{−λ_j t/N}).
func (m *npmleModel) Distinct(t float64) float64 {
	if !(t >= 0) || math.IsInf(t, 0) {
		return missing
	}
	s := 0.0
	for j, l := range m.lam {
		s += m.s[j] * -math.Expm1(-l*t/m.n)
	}
	return s
}

// Limit returns Σ_j S_j.
func (m *npmleModel) Limit() (float64, bool) {
	s := 0.0
	for _, v := range m.s {
		s += v
	}
	return s, true
}
