package complexity

import (
	"math"
	"testing"
)

// lwModel is the single-Poisson (one-class) curve D(T) = S(1 - e^{-T/S})
// of Lander & Waterman (1988, Genomics 2:231), whose slope e^{-T/S} makes
// the optimal split of a budget solvable in closed form.
type lwModel struct{ s float64 }

func (m lwModel) Name() string               { return "lw" }
func (m lwModel) Distinct(t float64) float64 { return m.s * -math.Expm1(-t/m.s) }
func (m lwModel) Limit() (float64, bool)     { return m.s, true }

// lwCurve is a one-class library of s units sequenced to n reads: the
// expected Poisson frequency counts n_j = s e^{-λ} λ^j / j!, λ = n/s, and
// the closed-form curve above n.
func lwCurve(t *testing.T, s, n float64) Curve {
	t.Helper()
	lam := n / s
	m := map[int64]int64{}
	logp := -lam
	for j := int64(1); j < 200; j++ {
		logp += math.Log(lam) - math.Log(float64(j))
		if u := math.Round(s * math.Exp(logp)); u > 0 {
			m[j] = int64(u)
		}
	}
	c, err := FromMap(m)
	if err != nil {
		t.Fatal(err)
	}
	return Curve{Counts: c, Model: lwModel{s}}
}

// TestSplitBudgetClosedForm: for one-class libraries the KKT conditions
// u_i e^{-(N_i + u_i x_i)/S_i} = λ give x_i = (S_i ln(u_i/λ) - N_i)/u_i
// where x_i > 0 (derived by hand from the curve above), with λ fixed by
// Σ x_i = B. SplitBudget must agree to within rounding and the numerical
// derivative's error (planTol reads).
func TestSplitBudgetClosedForm(t *testing.T) {
	const planTol = 3 // whole-read rounding (1) plus the derivative's error, well under 1 read here
	S := []float64{20000, 50000, 30000}
	u := []float64{1, 0.8, 0.9}
	var curves []Curve
	var N []float64
	for i, s := range S {
		cv := lwCurve(t, s, []float64{10000, 10000, 10000}[i])
		curves = append(curves, cv)
		N = append(N, float64(cv.Counts.Reads()))
	}
	const budget = 60000
	got, level := SplitBudget(curves, u, budget, nil)
	// Closed form, all three sequenced: ln(1/λ) Σ S_i/u_i = B + Σ (N_i - S_i ln u_i)/u_i.
	num, den := float64(budget), 0.0
	for i := range S {
		num += (N[i] - S[i]*math.Log(u[i])) / u[i]
		den += S[i] / u[i]
	}
	lam := math.Exp(-num / den)
	var sum int64
	for i := range S {
		want := (S[i]*math.Log(u[i]/lam) - N[i]) / u[i]
		if math.Abs(float64(got[i])-want) > planTol {
			t.Errorf("sample %d: got %d reads, closed form %.1f", i, got[i], want)
		}
		sum += got[i]
	}
	if sum != budget {
		t.Errorf("reads sum to %d, want the budget %d", sum, budget)
	}
	if math.Abs(level-lam)/lam > 1e-4 {
		t.Errorf("level %g, closed form %g", level, lam)
	}
}

// TestSplitBudgetKKT: a nearly exhausted library gets nothing when its
// marginal yield is below the level the others share; those sequenced
// have equal marginal yields per purchased read (KKT).
func TestSplitBudgetKKT(t *testing.T) {
	curves := []Curve{lwCurve(t, 1000, 20000), lwCurve(t, 100000, 20000), lwCurve(t, 60000, 30000)}
	u := []float64{1, 1, 0.9}
	got, level := SplitBudget(curves, u, 80000, nil)
	if got[0] != 0 {
		t.Errorf("exhausted library got %d reads", got[0])
	}
	for i := 1; i < 3; i++ {
		n := float64(curves[i].Counts.Reads())
		y := u[i] * modelSlope(curves[i].Model, n+u[i]*float64(got[i]))
		if got[i] == 0 || math.Abs(y-level)/level > 1e-3 {
			t.Errorf("sample %d: %d reads, marginal yield %g, level %g", i, got[i], y, level)
		}
	}
	n0 := float64(curves[0].Counts.Reads())
	if y := modelSlope(curves[0].Model, n0); y > level {
		t.Errorf("unsequenced sample's yield %g above the level %g", y, level)
	}
}

// TestApportion: largest remainders, exact total, ties to the earlier.
func TestApportion(t *testing.T) {
	got := Apportion([]float64{1.5, 1.5, 2.0}, 5)
	if got[0] != 2 || got[1] != 1 || got[2] != 2 {
		t.Errorf("apportion = %v, want [2 1 2]", got)
	}
}
