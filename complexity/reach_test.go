package complexity

import (
	"math"
	"reflect"
	"strings"
	"testing"
)

// TestSaturatedNoBacktest: a table without singletons is saturated; its
// constant curve has nothing to backtest (the thinned table would be
// fitted by another family and report an error that says nothing), and
// the method names the curve only, the total's estimator is apart.
func TestSaturatedNoBacktest(t *testing.T) {
	c, err := FromMap(map[int64]int64{2: 2, 3: 50, 5: 200, 8: 100, 12: 60})
	if err != nil {
		t.Fatal(err)
	}
	r := Analyze(c, Options{Depths: []float64{10 * float64(c.Reads())}, Bootstrap: 20, Seed: 1, Gates: NoGates()})
	if r.Method != "saturated" || r.TotalMethod != "limit" {
		t.Errorf("method %q total %q, want saturated and limit", r.Method, r.TotalMethod)
	}
	if !math.IsNaN(r.BacktestError) {
		t.Errorf("backtest error %v, want missing", r.BacktestError)
	}
}

// oneClass returns the expected frequency counts of a library of S
// equally abundant units sampled to depth λS: n_j = S e^{−λ} λ^j / j!,
// rounded (the Poisson law of each unit's reads; Lander & Waterman 1988).
func oneClass(t *testing.T, S, lambda float64) Counts {
	t.Helper()
	m := map[int64]int64{}
	for j := int64(1); j < 60; j++ {
		lg, _ := math.Lgamma(float64(j + 1))
		if v := math.Round(S * math.Exp(-lambda+float64(j)*math.Log(lambda)-lg)); v > 0 {
			m[j] = int64(v)
		}
	}
	c, err := FromMap(m)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// TestReachOneClass: on a one-class library the curve is D(T) =
// S(1 − e^{−T/S}) (Lander & Waterman 1988, Genomics 2:231), so the depth
// at which D reaches d is −S ln(1 − d/S), the yield dD/dT = e^{−T/S}
// falls to y at −S ln y, and the duplicate fraction 1 − D(T)/T reaches f
// where bisection on that closed form says. Analyze's answers must be
// within 1% of these.
func TestReachOneClass(t *testing.T) {
	const S, lambda = 1e6, 0.5
	c := oneClass(t, S, lambda)
	n := float64(c.Reads())
	D := func(T float64) float64 { return S * -math.Expm1(-T/S) }
	var targets []Target
	var want []float64
	for _, m := range []float64{0.5, 2, 5} { // below, and above, the observed depth
		T := m * n
		targets = append(targets, Target{TargetDistinct, D(T)}, Target{TargetDup, 1 - D(T)/T}, Target{TargetYield, math.Exp(-T / S)}, Target{TargetCoverage, -math.Expm1(-T / S)})
		want = append(want, T, T, T, T)
	}
	r := Analyze(c, Options{Reach: targets, Gates: NoGates()})
	for i, q := range r.Reach {
		w := want[i]
		switch q.Target.Kind {
		case TargetDistinct:
			w = -S * math.Log1p(-q.Target.Value/S)
		case TargetYield:
			w = -S * math.Log(q.Target.Value)
		case TargetDup:
			// 1 − D(T)/T is increasing in T: bisection on the closed form.
			lo, hi := 1.0, 1e3*S
			for k := 0; k < 200; k++ {
				mid := (lo + hi) / 2
				if 1-D(mid)/mid >= q.Target.Value {
					hi = mid
				} else {
					lo = mid
				}
			}
			w = hi
		}
		if math.Abs(q.Reads/w-1) > 0.01 {
			t.Errorf("%v (true depth %.4g): %v reads, closed form %v (%s)", q.Target, want[i], q.Reads, w, q.Note)
		}
	}
	// The curve itself, as the lead's planner reads it: D(T) and dD/dT.
	for _, T := range []float64{2 * n, 5 * n} {
		if got := r.Curve.Distinct(T); math.Abs(got/D(T)-1) > 0.002 {
			t.Errorf("Curve.Distinct(%v) = %v, closed form %v", T, got, D(T))
		}
		if got, w := r.Curve.MarginalYield(T), math.Exp(-T/S); math.Abs(got/w-1) > 0.01 {
			t.Errorf("Curve.MarginalYield(%v) = %v, closed form %v", T, got, w)
		}
	}
}

// TestReachRarefactionGolden: below the observed depth a target is
// answered by exact rarefaction; inverting the scipy golden's curve
// (testdata/complexity/rarefaction_golden.tsv, scripts/ref_scipy_rarefaction.py)
// at its own points, the depth of each point's distinct mean, duplicate
// fraction and coverage is that point's depth (within the one read of
// the bisection).
func TestReachRarefactionGolden(t *testing.T) {
	g := readRarefyGolden(t)
	checked := 0
	for i := 1; i < len(g); i++ {
		p, q := g[i-1], g[i]
		if p.table != q.table || q.m <= 1 || q.m >= q.c.Reads() || !(q.mean > p.mean) {
			continue
		}
		m := float64(q.m)
		targets := []Target{{TargetDistinct, q.mean}, {TargetDup, 1 - q.mean/m}}
		if !math.IsNaN(q.coverage) && !math.IsNaN(p.coverage) && q.coverage > p.coverage {
			targets = append(targets, Target{TargetCoverage, q.coverage}, Target{TargetYield, 1 - q.coverage})
		}
		for _, x := range Analyze(q.c, Options{Reach: targets, Gates: NoGates()}).Reach {
			if x.Target.Kind == TargetDup && !(x.Target.Value > 1-p.mean/float64(p.m)) {
				continue // dup flat between the golden's points
			}
			if math.Abs(x.Reads-m) > 1+1e-9*m {
				t.Errorf("%s: %v reached at %v, golden point at %v (%s)", q.table, x.Target, x.Reads, m, x.Note)
			}
			if x.Target.Kind == TargetDistinct || x.Target.Kind == TargetDup {
				if !(x.Lo <= x.Reads && x.Reads <= x.Hi) {
					t.Errorf("%s: %v interval [%v, %v] misses %v", q.table, x.Target, x.Lo, x.Hi, x.Reads)
				}
			}
			checked++
		}
	}
	if checked < 100 {
		t.Errorf("only %d golden targets checked", checked)
	}
}

// TestReachNotes: unreachable targets are missing with a note that says
// why and what the limit is; a target already met is answered below N.
func TestReachNotes(t *testing.T) {
	c := demoCounts(t)
	n, d := float64(c.Reads()), float64(c.Distinct())
	r := Analyze(c, Options{Gates: NoGates(), Reach: []Target{
		{TargetDistinct, 1e9}, {TargetCoverage, 1}, {TargetDup, 1.2}, {TargetDistinct, d / 2}, {TargetYield, 1e-12}}})
	for i, want := range []string{"not reached", "infinite depth", "not a valid target", "", "within 100x"} {
		q := r.Reach[i]
		if want == "" {
			if !(q.Reads > 0 && q.Reads < n) || q.Note != "" {
				t.Errorf("%v: %v reads (%q), want a rarefied depth below %v", q.Target, q.Reads, q.Note, n)
			}
			continue
		}
		if !math.IsNaN(q.Reads) || !strings.Contains(q.Note, want) {
			t.Errorf("%v: %v reads, note %q, want missing and %q", q.Target, q.Reads, q.Note, want)
		}
	}
	if lim, ok := r.Curve.Model.Limit(); ok && !strings.Contains(r.Reach[0].Note, "limit") {
		t.Errorf("beyond the limit %v: note %q does not name it", lim, r.Reach[0].Note)
	}
	sat, _ := FromMap(map[int64]int64{2: 2, 3: 50, 5: 200, 8: 100, 12: 60})
	q := Analyze(sat, Options{Gates: NoGates(), Reach: []Target{{TargetDistinct, 413}}}).Reach[0]
	if !math.IsNaN(q.Reads) || !strings.Contains(q.Note, "limit is 412") {
		t.Errorf("saturated: %+v", q)
	}
}

// TestReachIntervalConsistent: the depth interval of a distinct target
// agrees with the distinct interval: at the answer's depth the distinct
// interval holds the target, at Lo its upper end reaches it, at Hi its
// lower end does. And the answers do not depend on Threads.
func TestReachIntervalConsistent(t *testing.T) {
	c := demoCounts(t)
	n := float64(c.Reads())
	opt := Options{Bootstrap: 40, Seed: 3, Gates: NoGates(), Threads: 1}
	V := Analyze(c, Options{Depths: []float64{3 * n}, Gates: NoGates()}).Predictions[0].Distinct
	opt.Reach = []Target{{TargetDistinct, V}, {TargetDup, 0.8}, {TargetYield, 0.05}, {TargetCoverage, 0.97}}
	r := Analyze(c, opt)
	q := r.Reach[0]
	if !(q.Lo < q.Reads && q.Reads < q.Hi && q.Hi < 100*n) {
		t.Fatalf("distinct %v: %v [%v, %v]", V, q.Reads, q.Lo, q.Hi)
	}
	opt2 := opt
	opt2.Depths = []float64{q.Reads, q.Lo, q.Hi}
	p := Analyze(c, opt2).Predictions
	const tol = 1e-3 // the bounds are whole reads found to one read
	if !(p[0].Lo <= V && V <= p[0].Hi) {
		t.Errorf("at %v the distinct interval [%v, %v] misses %v", q.Reads, p[0].Lo, p[0].Hi, V)
	}
	if math.Abs(p[1].Hi/V-1) > tol || math.Abs(p[2].Lo/V-1) > tol {
		t.Errorf("upper end at Lo %v, lower end at Hi %v, want %v", p[1].Hi, p[2].Lo, V)
	}
	for _, q := range r.Reach {
		if !(q.Lo <= q.Reads && q.Reads <= q.Hi) {
			t.Errorf("%v: %v not in [%v, %v] (%s)", q.Target, q.Reads, q.Lo, q.Hi, q.Note)
		}
	}
	opt.Threads = 3
	if r3 := Analyze(c, opt); !reflect.DeepEqual(r3.Reach, r.Reach) {
		t.Errorf("threads 3: %+v, threads 1: %+v", r3.Reach, r.Reach)
	}
}

// BenchmarkAnalyzeReach times Analyze with 100 bootstrap replicates and
// no reach targets, then with one target of each kind (the cost of the
// reach step: band inversions and the replicates' own answers).
func BenchmarkAnalyzeReach(b *testing.B) {
	c, _ := FromMap(map[int64]int64{1: 6000, 2: 2100, 3: 900, 4: 420, 5: 210, 6: 120, 7: 70, 8: 40, 10: 30, 15: 12, 30: 3})
	n := float64(c.Reads())
	base := Options{Depths: []float64{2 * n, 10 * n, 100 * n}, Bootstrap: 100, Seed: 1, Gates: NoGates()}
	targets := []Target{{TargetDistinct, 2 * float64(c.Distinct())}, {TargetDup, 0.8}, {TargetCoverage, 0.99}, {TargetYield, 0.1}}
	for _, bc := range []struct {
		name  string
		reach []Target
	}{{"none", nil}, {"four", targets}} {
		b.Run(bc.name, func(b *testing.B) {
			opt := base
			opt.Reach = bc.reach
			for b.Loop() {
				Analyze(c, opt)
			}
		})
	}
}
