package complexity

import (
	"bufio"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"

	"headroom/internal/sim"
)

// scipyRow is one row of testdata/complexity/models_scipy.tsv, generated
// by scripts/ref_scipy_models.py with Debian's python3-scipy 1.10.1.
type scipyRow struct {
	kind    string
	a, b, c float64
	value   float64
}

func readScipy(t *testing.T) []scipyRow {
	t.Helper()
	f, err := os.Open("../testdata/complexity/models_scipy.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows []scipyRow
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || strings.HasPrefix(line, "kind\t") {
			continue
		}
		fs := strings.Split(line, "\t")
		if len(fs) != 5 {
			t.Fatalf("bad golden line %q", line)
		}
		var v [4]float64
		for i, s := range fs[1:] {
			if v[i], err = strconv.ParseFloat(s, 64); err != nil {
				t.Fatalf("bad golden line %q: %v", line, err)
			}
		}
		rows = append(rows, scipyRow{fs[0], v[0], v[1], v[2], v[3]})
	}
	if len(rows) == 0 {
		t.Fatal("no golden rows")
	}
	return rows
}

func relDiff(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300) }

// Tolerances against scipy. pmfTol: closed forms (lgamma, log1p) agree to
// ~1e−13; 1e−10 leaves room for lgamma's error at large arguments.
// gridTol: the lognormal integrals are sums on the 0.1-step log-rate grid
// truncated at |z| < lnZMax = 6 (mass 2e−9); the trapezoid error of such
// smooth integrands is far smaller, so 1e−5 relative is a safe bound for
// probabilities above gridMinP. Smaller probabilities come from the
// truncated far tail (the model is a lognormal truncated at ±6σ by design)
// and are not compared.
const (
	pmfTol   = 1e-10
	gridTol  = 1e-5
	gridMinP = 1e-6
)

// TestZTNBLikelihoodScipy: the ZTNB log-likelihood of a small table equals
// the one assembled from scipy.stats.nbinom.pmf values.
func TestZTNBLikelihoodScipy(t *testing.T) {
	rows := readScipy(t)
	type key struct{ k, th float64 }
	pmf := map[key]map[int]float64{}
	for _, r := range rows {
		if r.kind == "nbinom_pmf" {
			kk := key{r.a, r.b}
			if pmf[kk] == nil {
				pmf[kk] = map[int]float64{}
			}
			pmf[kk][int(r.c)] = r.value
		}
	}
	units := map[int]float64{1: 50, 2: 20, 5: 7, 10: 3, 30: 1}
	for kk, p := range pmf {
		z := ztnbData{}
		want := 0.0
		for _, j := range []int{1, 2, 5, 10, 30} {
			z.j = append(z.j, float64(j))
			z.u = append(z.u, units[j])
			z.lgj1 = append(z.lgj1, lgam(float64(j)+1))
			z.d += units[j]
			want += units[j] * math.Log(p[j])
		}
		want -= z.d * math.Log(1-p[0])
		got := -z.nll([]float64{math.Log(kk.k), math.Log(kk.th)}) * z.d
		if relDiff(got, want) > pmfTol {
			t.Errorf("k=%g θ=%g: log-likelihood %.15g, scipy-based %.15g", kk.k, kk.th, got, want)
		}
	}
}

// TestLognormalPMFScipy: the grid Poisson–lognormal probabilities against
// scipy.integrate.quad of poisson.pmf × norm.pdf.
func TestLognormalPMFScipy(t *testing.T) {
	k := gridKernel(30)
	f := &lnFit{k: k, g: make([]float64, len(k.x))}
	n := 0
	for _, r := range readScipy(t) {
		if r.kind != "pln_pmf" {
			continue
		}
		lo, hi := f.weights(r.a, r.b)
		var num, den float64
		for i := lo; i < hi; i++ {
			num += f.g[i-lo] * k.p[i][int(r.c)]
			den += f.g[i-lo]
		}
		if r.value < gridMinP {
			continue
		}
		if got := num / den; relDiff(got, r.value) > gridTol {
			t.Errorf("μ=%g σ=%g j=%g: P = %.12g, scipy %.12g", r.a, r.b, r.c, got, r.value)
		}
		n++
	}
	if n == 0 {
		t.Fatal("no pln_pmf rows")
	}
}

// TestGrowthScipy: the extrapolation formulas E[1 − e^{−tλ}] of the gamma
// (closed form) and lognormal (grid) models against scipy quadrature.
func TestGrowthScipy(t *testing.T) {
	k := gridKernel(30)
	f := &lnFit{k: k, g: make([]float64, len(k.x))}
	for _, r := range readScipy(t) {
		switch r.kind {
		case "gamma_growth":
			// With a = 1 and d = 1 − P(0), Distinct(t·n) = 1 − (1+tθ)^{−k}.
			m := &ztnbModel{n: 1, k: r.a, theta: r.b, a: 1}
			m.d = -math.Expm1(-r.a * math.Log1p(r.b))
			if got := m.Distinct(r.c); relDiff(got, r.value) > pmfTol {
				t.Errorf("gamma k=%g θ=%g t=%g: %.15g, scipy %.15g", r.a, r.b, r.c, got, r.value)
			}
		case "ln_growth":
			lo, hi := f.weights(r.a, r.b)
			m := &gridModel{n: 1}
			var sg, ss float64
			for i := lo; i < hi; i++ {
				m.lam = append(m.lam, k.lam[i])
				m.g = append(m.g, f.g[i-lo])
				sg += f.g[i-lo]
				ss += f.g[i-lo] * k.seen[i]
			}
			m.a, m.d = 1/sg, ss/sg
			if got := m.Distinct(r.c); relDiff(got, r.value) > gridTol {
				t.Errorf("lognormal μ=%g σ=%g t=%g: %.12g, scipy %.12g", r.a, r.b, r.c, got, r.value)
			}
		}
	}
}

// TestPoissonSizeScipy: the Lander–Waterman library size against
// scipy.optimize.brentq on U(1 − e^{−N/U}) = D.
func TestPoissonSizeScipy(t *testing.T) {
	// lwTol: bisection to 1e−15 of the bracket; brentq to rtol 1e−15; the
	// equation's conditioning near D ≈ N costs a few digits.
	const lwTol = 1e-9
	for _, r := range readScipy(t) {
		if r.kind != "lw_size" {
			continue
		}
		n, d := int64(r.a), int64(r.b)
		c, err := NewCounts([]Class{{1, d - 1}, {n - d + 1, 1}})
		if err != nil {
			t.Fatal(err)
		}
		m, err := fitPoisson(c)
		if err != nil {
			t.Fatal(err)
		}
		u, _ := m.Limit()
		if relDiff(u, r.value) > lwTol {
			t.Errorf("N=%d D=%d: U = %.12g, scipy %.12g", n, d, u, r.value)
		}
		if got := m.Distinct(float64(n)); relDiff(got, float64(d)) > lwTol {
			t.Errorf("N=%d D=%d: D(N) = %.12g", n, d, got)
		}
	}
}

// TestNelderMeadRosenbrock: the minimiser finds the Rosenbrock minimum
// (1, 1) (Rosenbrock 1960, Computer Journal 3:175).
func TestNelderMeadRosenbrock(t *testing.T) {
	f := func(x []float64) float64 { return 100*math.Pow(x[1]-x[0]*x[0], 2) + math.Pow(1-x[0], 2) }
	x, v := nelderMead(f, []float64{-1.2, 1}, []float64{0.5, 0.5}, 1e-14, 5000)
	if math.Abs(x[0]-1) > 1e-4 || math.Abs(x[1]-1) > 1e-4 || v > 1e-8 {
		t.Errorf("minimum at %v (f = %g), want (1, 1)", x, v)
	}
}

// hessianSE returns standard errors from the numerical Hessian of the
// total negative log-likelihood nll·scale at x (central differences with
// step h); the inverse observed information (Fisher).
func hessianSE(nll func([]float64) float64, x []float64, scale, h float64) []float64 {
	f := func(p []float64) float64 { return nll(p) * scale }
	n := len(x)
	H := make([][]float64, n)
	for i := range H {
		H[i] = make([]float64, n)
		for j := range H[i] {
			p := append([]float64(nil), x...)
			at := func(di, dj float64) float64 {
				copy(p, x)
				p[i] += di
				p[j] += dj
				return f(p)
			}
			H[i][j] = (at(h, h) - at(h, -h) - at(-h, h) + at(-h, -h)) / (4 * h * h)
		}
	}
	if n != 2 {
		panic("hessianSE: two parameters only")
	}
	det := H[0][0]*H[1][1] - H[0][1]*H[1][0]
	return []float64{math.Sqrt(H[1][1] / det), math.Sqrt(H[0][0] / det)}
}

// poissonDraw draws Poisson(lam) by inversion (lam small) or a normal
// approximation rounded (lam > 500, where it is accurate to well within
// what these tests resolve).
func poissonDraw(rng *rand.Rand, lam float64) int64 {
	if lam > 500 {
		return int64(math.Max(0, math.Round(lam+math.Sqrt(lam)*rng.NormFloat64())))
	}
	k, p, l := int64(0), rng.Float64(), math.Exp(-lam)
	for p > l {
		k++
		p *= rng.Float64()
	}
	return k
}

// recoverTol: estimates must fall within 4 standard errors of the truth
// (probability ~6e−5 per parameter under asymptotic normality).
const recoverTol = 4.0

// TestZTNBRecovers: ML on a large seeded gamma–Poisson sample recovers
// (k, θ) within recoverTol standard errors.
func TestZTNBRecovers(t *testing.T) {
	const k, theta, S = 0.8, 1.5, 200000
	rng := rand.New(rand.NewPCG(11, 12))
	var b Builder
	for i := 0; i < S; i++ {
		lam := theta * sim.Gamma(rng, k)
		b.AddUnit(poissonDraw(rng, lam))
	}
	c, _ := b.Counts()
	m, err := fitZTNBAll(c)
	if err != nil {
		t.Fatal(err)
	}
	z := m.(*ztnbModel)
	zd := ztnbData{d: float64(c.Distinct())}
	for _, cl := range c.classes {
		zd.j = append(zd.j, float64(cl.Times))
		zd.u = append(zd.u, float64(cl.Units))
		zd.lgj1 = append(zd.lgj1, lgam(float64(cl.Times)+1))
	}
	p := z.params()
	se := hessianSE(zd.nll, p, zd.d, 1e-3)
	for i, want := range []float64{math.Log(k), math.Log(theta)} {
		if math.Abs(p[i]-want) > recoverTol*se[i] {
			t.Errorf("param %d (log scale): got %.4f ± %.4f, want %.4f", i, p[i], se[i], want)
		}
	}
	// The library size: S within a few percent (its SE is not computed
	// here; 3% is ~4 SE for this design by the delta method, common practice
	// tolerance).
	if u, _ := m.Limit(); math.Abs(u/S-1) > 0.03 {
		t.Errorf("library size %.0f, want %d", u, S)
	}
}

// TestLognormalRecovers: ML on a large seeded Poisson–lognormal sample
// recovers (μ, σ) within recoverTol standard errors.
func TestLognormalRecovers(t *testing.T) {
	const mu, sigma, S = -0.5, 1.2, 200000
	rng := rand.New(rand.NewPCG(21, 22))
	var b Builder
	for i := 0; i < S; i++ {
		b.AddUnit(poissonDraw(rng, math.Exp(mu+sigma*rng.NormFloat64())))
	}
	c, _ := b.Counts()
	hs := newHist(c, censorJ)
	m, err := fitLognormalHist(hs, nil)
	if err != nil {
		t.Fatal(err)
	}
	k := gridKernel(censorJ)
	f := &lnFit{k: k, hs: &hs, g: make([]float64, len(k.x)), buf: make([]float64, hs.J+1)}
	se := hessianSE(f.nll, m.params, hs.d, 1e-3)
	for i, want := range []float64{mu, math.Log(sigma)} {
		if math.Abs(m.params[i]-want) > recoverTol*se[i] {
			t.Errorf("param %d: got %.4f ± %.4f, want %.4f", i, m.params[i], se[i], want)
		}
	}
}

// TestModelsAnchored: every candidate curve passes through the observed
// point, is admissible to 1000×, and a warm refit on the same counts
// returns the same curve.
func TestModelsAnchored(t *testing.T) {
	c := simCounts(t, 3, 50000, 1.2, 0.5)
	n, d := float64(c.Reads()), float64(c.Distinct())
	for _, cd := range candidates {
		hs := newHist(c, censorJ)
		hs.free = cd.free
		m, p, err := cd.fit(hs, nil)
		if err != nil {
			t.Fatalf("%s: %v", cd.name, err)
		}
		if got := m.Distinct(n); relDiff(got, d) > 1e-12 {
			t.Errorf("%s: Distinct(N) = %g, want %g", cd.name, got, d)
		}
		if !isAdmissible(m, c, 1000*n) {
			t.Errorf("%s: not admissible", cd.name)
		}
		r, err := refit(cd.name, c, 1000*n, m)
		if err != nil {
			t.Fatalf("%s refit: %v", cd.name, err)
		}
		// refitTol: the warm start stops at nmTolRefit per unit.
		const refitTol = 1e-3
		if a, b := r.Distinct(10*n), m.Distinct(10*n); relDiff(a, b) > refitTol {
			t.Errorf("%s: refit gives %g at 10x, fit %g (params %v)", cd.name, a, b, p)
		}
	}
	for _, bad := range []map[int64]int64{{}, {1: 5}, {3: 1}} {
		c, _ := FromMap(bad)
		for _, cd := range candidates {
			hs := newHist(c, censorJ)
			hs.free = cd.free
			if _, _, err := cd.fit(hs, nil); err == nil {
				t.Errorf("%s fitted %v without error", cd.name, bad)
			}
		}
	}
}

// TestPoissonEdges: no duplicates means an unbounded library (D(t) = t,
// the Lander–Waterman limit U → ∞); an empty table cannot be fitted.
func TestPoissonEdges(t *testing.T) {
	c, _ := NewCounts([]Class{{1, 10}})
	m, err := fitPoisson(c)
	if err != nil {
		t.Fatal(err)
	}
	if v := m.Distinct(100); v != 100 {
		t.Errorf("D(100) = %g, want 100", v)
	}
	if _, ok := m.Limit(); ok {
		t.Error("limit of an all-singleton table must be unbounded")
	}
	if _, err := fitPoisson(Counts{}); err == nil {
		t.Error("empty table fitted")
	}
	if v := m.Distinct(math.NaN()); !isMissing(v) {
		t.Errorf("D(NaN) = %g", v)
	}
}

// TestGaussGrid: the lattice recurrence agrees with math.Exp term by term
// to 1e-12 relative (the values span e^0 to e^-18 over |z| <= 6). The
// tolerance is the sensitivity of exp(-z²/2) to a grid point's own
// rounding, |z|/σ · 4e-15 <= 6/0.03 · 4e-15 = 8e-13, plus the recurrence's
// few ulps a step over 32 steps.
func TestGaussGrid(t *testing.T) {
	for _, c := range []struct{ mu, sigma float64 }{{0, 1}, {-3.3, 0.05}, {2.1, 5.9}, {-14.9, 0.4}, {5, 0.03}} {
		n := int(2*lnZMax*c.sigma/gridStep) + 2
		x := make([]float64, n)
		for i := range x {
			x[i] = c.mu - lnZMax*c.sigma + float64(i)*gridStep
		}
		got := make([]float64, n)
		gaussGrid(got, x, c.mu, c.sigma)
		for i := range x {
			z := (x[i] - c.mu) / c.sigma
			want := math.Exp(-0.5 * z * z)
			if math.Abs(got[i]-want) > 1e-12*want {
				t.Fatalf("mu %v sigma %v i %d: got %v want %v", c.mu, c.sigma, i, got[i], want)
			}
		}
	}
}
