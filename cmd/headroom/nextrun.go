package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"headroom/complexity"
)

// plan is the next run for the samples of this run as one pool (--plan,
// DESIGN.md "Decisions"). Reads bought are reads as the run delivers them
// (read pairs for paired data, before any filtering); each sample's usable
// share (the reads its curve speaks of per read bought) converts between
// those and the curve's reads.
type plan struct {
	goal   string
	budget int64
	target string // the --reach target of goal reach
	rows   []planRow
	notes  []string // about the whole plan
}

// planRow is one sample of the plan.
type planRow struct {
	name                            string
	readsNow                        int64   // bought this run
	shareNow                        float64 // share of this run's pool
	usable                          float64 // curve reads per read bought
	curveNow                        float64 // the curve's reads now
	readsNext                       int64   // to buy in the next run
	poolShare                       float64 // share of the next pool to load
	distinctNow                     int64
	distinctAfter, lo, hi, dupAfter float64
	action                          string
	notes                           []string
}

// depth is the curve's depth after both runs.
func (r planRow) depth() float64 { return r.curveNow + r.usable*float64(r.readsNext) }

// newPlan splits the budget among the samples. It estimates every sample's
// curve once without bootstrap (the split needs the curves only); the
// intervals after both runs come from the main pass, which predicts at
// the depths the plan returns (depths) and hands them back (fill).
func newPlan(s *shared, samples []sampleInput) (*plan, error) {
	shares, err := readPool(s.pool, samples)
	if err != nil {
		return nil, err
	}
	var bought int64
	for _, in := range samples {
		bought += in.bought()
	}
	B := s.budgetSpec.reads(bought)
	if !(B >= 1) || B > 1e15 {
		return nil, usagef("--budget %s: %s reads is not a budget a run can have", s.budgetSpec.label, human(B))
	}
	pl := &plan{goal: s.planGoal, budget: int64(math.Round(B))}
	est := estimateAll(s, samples, pass{noBoot: true})
	curves := make([]complexity.Curve, len(samples))
	usable := make([]float64, len(samples))
	for i, e := range est {
		in := e.in
		curves[i] = e.rep.Curve
		usable[i] = in.usable()
		pl.rows = append(pl.rows, planRow{name: in.name, readsNow: in.bought(), shareNow: shares[i],
			usable: usable[i], curveNow: float64(in.counts.Reads()), distinctNow: in.counts.Distinct()})
		if e.rep.Curve.Model == nil {
			pl.rows[i].notes = append(pl.rows[i].notes, "no curve beyond the observed depth: not planned")
		}
	}
	var next []int64
	switch s.planGoal {
	case "reach":
		next = pl.reachSplit(s, est)
	default:
		var level float64
		// No sample is planned past reachHorizon times its reads: beyond
		// that the curve's accuracy was never measured, and an optimiser
		// trusting a far extrapolation pours reads into small libraries
		// whose curves overshoot (scripts/planbench).
		caps := make([]float64, len(samples))
		for i, r := range pl.rows {
			caps[i] = (reachHorizon - 1) * r.curveNow / r.usable
		}
		next, level = complexity.SplitBudget(curves, usable, pl.budget, caps)
		if level == 0 {
			pl.notes = append(pl.notes, "no sample gains new units from more reads: the budget is split evenly and buys nothing new")
		}
		var given int64
		for i, x := range next {
			given += x
			if float64(x) >= caps[i]-1 && x > 0 {
				pl.rows[i].notes = append(pl.rows[i].notes, fmt.Sprintf("capped at %gx its reads now, the deepest its curve is trusted at; it would take more", reachHorizon))
			}
		}
		if given < pl.budget {
			pl.notes = append(pl.notes, fmt.Sprintf("%s of the %s reads are left unassigned: every sample that gains is at %gx its reads", human(float64(pl.budget-given)), human(float64(pl.budget)), reachHorizon))
		}
	}
	next2 := make([]int64, len(pl.rows))
	now := make([]int64, len(pl.rows))
	share := make([]float64, len(pl.rows))
	for i := range pl.rows {
		r := &pl.rows[i]
		r.readsNext = next[i]
		next2[i], now[i], share[i] = r.readsNext, r.readsNow, r.shareNow
		if r.action == "" {
			r.action = "stop"
			if r.readsNext > 0 {
				r.action = "sequence"
			}
		}
		if r.depth() > reachHorizon*r.curveNow*(1+1e-9) {
			r.notes = append(r.notes, fmt.Sprintf("the plan takes this sample past %gx its reads, beyond the depths whose accuracy was measured", reachHorizon))
		}
	}
	for i, p := range poolShares(next2, now, share) {
		pl.rows[i].poolShare = p
	}
	return pl, nil
}

// poolShares is the share of the next pool to load for each sample: a
// sample gave now[i] reads for share[i] of this pool, so next[i] reads
// take next[i]·share[i]/now[i] of the same pool; normalised to sum to 1.
// NaN for a sample that gave no reads (nothing says what its share buys).
func poolShares(next, now []int64, share []float64) []float64 {
	out := make([]float64, len(next))
	var w float64
	for i := range next {
		if now[i] > 0 {
			w += float64(next[i]) * share[i] / float64(now[i])
		}
	}
	for i := range next {
		out[i] = math.NaN()
		if w > 0 && now[i] > 0 {
			out[i] = float64(next[i]) * share[i] / float64(now[i]) / w
		}
	}
	return out
}

// reachSplit gives each sample what its first --reach target needs,
// scaled down pro rata when the budget is short.
func (pl *plan) reachSplit(s *shared, est []estimated) []int64 {
	pl.target = s.reaches[0].label
	need := make([]float64, len(est))
	var sum float64
	for i, e := range est {
		r := &pl.rows[i]
		a := e.reach[0]
		switch {
		case math.IsNaN(a.reads):
			r.notes = append(r.notes, "not planned: "+a.note)
		case a.reads <= r.curveNow:
			r.action = "done"
		default:
			need[i] = math.Ceil((a.reads - r.curveNow) / r.usable)
			sum += need[i]
		}
	}
	if sum == 0 {
		pl.notes = append(pl.notes, "no sample needs reads for "+pl.target+"; the budget is left unassigned")
		return make([]int64, len(est))
	}
	if sum > float64(pl.budget) {
		x := make([]float64, len(need))
		for i := range need {
			x[i] = need[i] * float64(pl.budget) / sum
		}
		got := complexity.Apportion(x, pl.budget)
		for i := range need {
			if need[i] > 0 {
				pl.rows[i].notes = append(pl.rows[i].notes, fmt.Sprintf("falls short of %s: the budget gives %s of the %s reads it needs", pl.target, human(float64(got[i])), human(need[i])))
			}
		}
		pl.notes = append(pl.notes, fmt.Sprintf("the budget covers %.0f%% of what the samples need for %s; every sample's share is scaled down alike", 100*float64(pl.budget)/sum, pl.target))
		return got
	}
	out := make([]int64, len(need))
	for i := range need {
		out[i] = int64(need[i])
	}
	pl.notes = append(pl.notes, fmt.Sprintf("%s of the %s reads of the budget are left unassigned: every sample reaches %s without them", human(float64(pl.budget)-sum), human(float64(pl.budget)), pl.target))
	return out
}

// depths are the curve depths after both runs, predicted by the main pass.
func (pl *plan) depths() [][]float64 {
	d := make([][]float64, len(pl.rows))
	for i, r := range pl.rows {
		d[i] = []float64{r.depth()}
	}
	return d
}

// fill takes the predictions after both runs from the main pass.
func (pl *plan) fill(est []estimated) {
	for i, e := range est {
		r := &pl.rows[i]
		p := e.rep.Predictions[len(e.rep.Predictions)-1]
		r.distinctAfter, r.lo, r.hi = p.Distinct, p.Lo, p.Hi
		r.dupAfter = math.NaN()
		if d := r.depth(); d > 0 {
			r.dupAfter = 1 - p.Distinct/d
		}
	}
}

// planKeys are the plan's columns (DESIGN.md).
var planKeys = []string{"sample", "reads_now", "share_now", "reads_next", "pool_share", "reads_after",
	"distinct_now", "distinct_after", "lo_after", "hi_after", "dup_fraction_after", "gain", "action", "notes"}

func (r planRow) cells() []cell {
	notes := notesCell(r.notes)
	return []cell{strCell(r.name), intCell(r.readsNow), fracCell(r.shareNow), intCell(r.readsNext), fracCell(r.poolShare),
		intCell(r.readsNow + r.readsNext), intCell(r.distinctNow), countCell(r.distinctAfter), countCell(r.lo), countCell(r.hi),
		fracCell(r.dupAfter), countCell(r.distinctAfter - float64(r.distinctNow)), strCell(r.action), notes}
}

// legend says which numbers are which, for the plan's header.
func (pl *plan) legend() string {
	g := "most (the most distinct units for the pool)"
	if pl.goal == "reach" {
		g = "reach (each sample to " + pl.target + ")"
	}
	return fmt.Sprintf("next run: %d reads for the pool, goal %s. reads_now, reads_next and reads_after are reads as the run delivers them "+
		"(read pairs for paired data, before any filtering); distinct_*, lo_after, hi_after and dup_fraction_after are on the usable reads "+
		"(after unmapped, QC-failed, secondary and optical duplicate reads are set aside). pool_share is the share of the next pool to load "+
		"for each sample, given how many reads per share of pool it gave this time.", pl.budget, g)
}

// render writes the plan as TSV (with the legend as a # comment line) or,
// for a .json path, as JSON with the same keys.
func (pl *plan) render(path string) []byte {
	var b bytes.Buffer
	if strings.EqualFold(filepath.Ext(path), ".json") {
		v, _ := json.Marshal(toolVersion())
		leg, _ := json.Marshal(pl.legend())
		notes, _ := json.Marshal(append([]string{}, pl.notes...))
		fmt.Fprintf(&b, "{\"tool\":\"headroom\",\"version\":%s,\"budget\":%d,\"goal\":%q,\"legend\":%s,\"notes\":%s,\"samples\":[", v, pl.budget, pl.goal, leg, notes)
		for i, r := range pl.rows {
			if i > 0 {
				b.WriteByte(',')
			}
			b.WriteString("\n{")
			for k, c := range r.cells() {
				if k > 0 {
					b.WriteByte(',')
				}
				fmt.Fprintf(&b, "%q:%s", planKeys[k], c.json)
			}
			b.WriteByte('}')
		}
		b.WriteString("\n]}\n")
		return b.Bytes()
	}
	fmt.Fprintf(&b, "# %s\n", pl.legend())
	for _, n := range pl.notes {
		fmt.Fprintf(&b, "# note: %s\n", n)
	}
	b.WriteString(strings.Join(planKeys, "\t") + "\n")
	for _, r := range pl.rows {
		writeTSVRow(&b, r.cells())
	}
	return b.Bytes()
}
