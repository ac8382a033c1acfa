package complexity

import (
	"math"
	"math/rand/v2"
	"testing"
)

// randomIncreasing returns a random non-decreasing function on [1, hi]
// of one of the shapes the curves take (a saturating power law, a step
// function with flats, a piecewise-linear path with random increments
// and flat stretches in u = log(1+T)) and a target it crosses inside
// (1, hi), or sometimes never reaches.
func randomIncreasing(rng *rand.Rand, hi float64) (func(float64) float64, float64) {
	switch rng.IntN(3) {
	case 0:
		s, p := math.Exp(rng.Float64()*math.Log(hi)), 0.2+3*rng.Float64()
		return func(T float64) float64 { return -math.Pow(1+T/s, -p) }, -rng.Float64()
	case 1:
		steps := 1 + rng.IntN(6)
		at := make([]float64, steps)
		for i := range at {
			at[i] = math.Exp(rng.Float64() * math.Log(hi))
		}
		f := func(T float64) float64 {
			v := 0.0
			for _, a := range at {
				if T >= a {
					v++
				}
			}
			return v
		}
		return f, float64(rng.IntN(steps + 2))
	default:
		const knots = 12
		um := math.Log1p(hi)
		vals := make([]float64, knots+1)
		for i := 1; i <= knots; i++ {
			d := rng.ExpFloat64()
			if rng.IntN(3) == 0 {
				d = 0 // a flat stretch
			}
			vals[i] = vals[i-1] + d
		}
		f := func(T float64) float64 {
			x := math.Log1p(T) / um * knots
			i := int(math.Min(math.Floor(x), knots-1))
			return vals[i] + (x-float64(i))*(vals[i+1]-vals[i])
		}
		return f, vals[knots] * (1.1*rng.Float64() - 0.05)
	}
}

// TestSolveNearMatchesBisection: on non-decreasing functions the guessed
// searches (solveNear, solveGuess, solveFirst from at or below the root)
// give bisectIncreasing's answer to the bit, which is what lets reach
// intervals drop most of bisection's evaluations without moving a digit;
// guesses anywhere in the range, outside it, or NaN.
func TestSolveNearMatchesBisection(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 1))
	var evalsBisect, evalsGuess int
	for trial := 0; trial < 4000; trial++ {
		hi := math.Exp(2 + 14*rng.Float64())
		lo := 1.0
		if rng.IntN(4) == 0 {
			lo = hi * rng.Float64() / 2
		}
		g, target := randomIncreasing(rng, hi)
		var n int
		f := func(T float64) float64 { n++; return g(T) }
		want := bisectIncreasing(f, target, lo, hi)
		evalsBisect += n
		guess := math.Expm1(math.Log1p(lo) + rng.Float64()*(math.Log1p(hi)-math.Log1p(lo)))
		switch rng.IntN(8) {
		case 0:
			guess = math.NaN()
		case 1:
			guess = 2 * hi
		case 2:
			guess = want // the point answer itself
		}
		n = 0
		got := solveGuess(f, target, lo, hi, guess, math.NaN())
		evalsGuess += n
		if !same(got, want) {
			t.Fatalf("trial %d: solveGuess(guess %v) = %v, bisection %v (lo %v hi %v target %v)", trial, guess, got, want, lo, hi, target)
		}
		if got := solveIncreasing(f, target, lo, hi); !same(got, want) {
			t.Fatalf("trial %d: solveIncreasing = %v, bisection %v", trial, got, want)
		}
		if math.IsNaN(want) {
			continue
		}
		// solveFirst from any start short of the target.
		start := math.Expm1(math.Log1p(lo) + rng.Float64()*(math.Log1p(want)-math.Log1p(lo)))
		if f(start) >= target {
			start = lo
		}
		if f(lo) >= target {
			continue // answered as lo by both, by different roads
		}
		if got := solveFirst(f, target, lo, hi, start); !same(got, want) {
			t.Fatalf("trial %d: solveFirst(start %v) = %v, bisection %v (lo %v hi %v target %v)", trial, start, got, want, lo, hi, target)
		}
	}
	t.Logf("evaluations: bisection %d, guessed %d", evalsBisect, evalsGuess)
	if evalsGuess >= evalsBisect {
		t.Errorf("the guessed search took %d evaluations, bisection %d", evalsGuess, evalsBisect)
	}
}

func same(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) }

// TestSolveFirstTurnsBack: a band end that reaches the target, falls
// back and reaches it again far out (a yield's upper end, where the
// replicates' spread outgrows the curve) is answered at its first
// crossing, the one that holds for every later depth of the monotone
// quantity it bounds; bisection over the whole range may land on the
// later one.
func TestSolveFirstTurnsBack(t *testing.T) {
	// Reached on [1000, 5000) and from 80,000 on.
	f := func(T float64) float64 {
		if T >= 1000 && T < 5000 || T >= 80000 {
			return 1
		}
		return 0
	}
	// Answers are to half a read, rounded up (bisectIncreasing).
	near := func(got, want float64) bool { return got >= want && got <= want+1 }
	if got := solveFirst(f, 1, 1, 1e6, 200); !near(got, 1000) {
		t.Errorf("solveFirst = %v, want 1000", got)
	}
	if got := bisectIncreasing(f, 1, 1, 1e6); !near(got, 80000) {
		t.Errorf("bisection = %v, want 80000 (the case solveFirst exists for)", got)
	}
	// Started past the first crossing, the start is the answer.
	if got := solveFirst(f, 1, 1, 1e6, 2000); !near(got, 2000) {
		t.Errorf("solveFirst from inside = %v, want 2000", got)
	}
	if got := solveFirst(func(float64) float64 { return 0 }, 1, 1, 1e6, 10); !math.IsNaN(got) {
		t.Errorf("never reached: %v, want NaN", got)
	}
}

// TestRunningAbsent: the running sum of coverageRarefied gives
// hgLogAbsent bit for bit for ascending class sizes, across the switch
// to the log-gamma form.
func TestRunningAbsent(t *testing.T) {
	for _, N := range []float64{40, 999, 123456} {
		for _, tt := range []float64{0, 1, 3.5, N / 3, N - 20, N - 1} {
			var r runningAbsent
			for k := 0.0; k <= 30; k += float64(1 + int(k)%3) {
				if got, want := r.logAbsent(N, k, tt), hgLogAbsent(N, k, tt); !same(got, want) {
					t.Fatalf("N %v t %v k %v: %v, want %v", N, tt, k, got, want)
				}
			}
		}
	}
}

// plainModel hides a model's type, so admissibleFrom runs every grid
// point (no passesBeyond).
type plainModel struct{ Model }

// TestAdmissibleShortcut: admissibleFrom's early answer for mixture
// curves (passesBeyond) is the answer of the full check, on random
// Poisson mixtures whose initial slope is put near 1 (where the "more new
// units than reads" check decides) and on ones far from it.
func TestAdmissibleShortcut(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 2))
	var early, pass, fail int
	for trial := 0; trial < 3000; trial++ {
		k := 1 + rng.IntN(60)
		m := &gridModel{name: "test", n: math.Exp(3 + 12*rng.Float64())}
		m.d = m.n * rng.Float64()
		var slope float64 // D'(n) per unit of a
		for i := 0; i < k; i++ {
			l := math.Exp(-6 + 12*rng.Float64())
			w := rng.ExpFloat64()
			if rng.IntN(5) == 0 {
				w *= 1e-8
			}
			m.lam, m.g = append(m.lam, l), append(m.g, w/math.Exp(l))
			m.ge = append(m.ge, w)
			slope += w * l / m.n
		}
		// Initial slope near 1 in half the trials, spread otherwise.
		want := 0.2 + 1.6*rng.Float64()
		if trial%2 == 0 {
			want = 1 + (rng.Float64()-0.5)*1e-6
		}
		m.a = want / slope
		n, d := m.n, m.d
		if rng.IntN(4) == 0 { // checked from another point of the curve
			n *= 1 + rng.Float64()
			d = m.Distinct(n)
		}
		maxT := n * math.Exp(1+6*rng.Float64())
		got, full := admissibleFrom(m, n, d, maxT), admissibleFrom(plainModel{m}, n, d, maxT)
		if got != full {
			t.Fatalf("trial %d: admissibleFrom %v, full check %v (slope %v, n %v, maxT %v)", trial, got, full, want, n, maxT)
		}
		t1 := n * math.Pow(maxT/n, 1.0/admissGrid)
		if m.passesBeyond(t1, m.Distinct(t1), n, d) {
			early++
		}
		if full {
			pass++
		} else {
			fail++
		}
	}
	t.Logf("admissible %d, not %d; answered at the first point %d", pass, fail, early)
	if early == 0 || fail == 0 {
		t.Errorf("the trials did not exercise both answers and the shortcut")
	}
}
