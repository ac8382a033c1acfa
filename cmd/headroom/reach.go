package main

import (
	"fmt"
	"headroom/complexity"
	"math"
	"strconv"
	"strings"
)

// reachSpec is one --reach target: KIND:VALUE as written (DESIGN.md,
// Decisions).
type reachSpec struct {
	label    string  // as written, e.g. "dup:0.3"
	kind     string  // distinct, dup, coverage or yield
	value    float64 // absolute distinct units, or the fraction
	multiple float64 // distinct:3x: a multiple of the distinct units seen now
}

// reachKinds are the target kinds, with what their value means.
var reachKinds = map[string]string{
	"distinct": "distinct units (20M) or a multiple of those seen now (3x)",
	"dup":      "duplicate fraction of the whole run, between 0 and 1",
	"coverage": "sample coverage, between 0 and 1",
	"yield":    "share of new units among the next reads, between 0 and 1",
}

// parseReach reads one target.
func parseReach(s string) (reachSpec, error) {
	t := strings.TrimSpace(s)
	kind, val, ok := strings.Cut(t, ":")
	if !ok {
		return reachSpec{}, fmt.Errorf("%q: write a target as KIND:VALUE, e.g. dup:0.3, distinct:3x, coverage:0.99, yield:0.1", s)
	}
	kind = strings.ToLower(strings.TrimSpace(kind))
	val = strings.TrimSpace(val)
	r := reachSpec{label: kind + ":" + val, kind: kind}
	if _, known := reachKinds[kind]; !known {
		return reachSpec{}, fmt.Errorf("%q: unknown kind %q; use distinct, dup, coverage or yield", s, kind)
	}
	if kind == "distinct" {
		if n := len(val); n > 1 && (val[n-1] == 'x' || val[n-1] == 'X') {
			v, err := strconv.ParseFloat(val[:n-1], 64)
			if err != nil || !(v > 0) || math.IsInf(v, 0) {
				return reachSpec{}, fmt.Errorf("%q: a multiple must be a positive number followed by x, e.g. distinct:3x", s)
			}
			r.multiple = v
			return r, nil
		}
		v, err := parseAmount(val)
		if err != nil || !(v >= 1) {
			return reachSpec{}, fmt.Errorf("%q: give at least one distinct unit (20M, 1.5e6) or a multiple (3x)", s)
		}
		r.value = v
		return r, nil
	}
	v, err := strconv.ParseFloat(val, 64)
	if err != nil || !(v > 0 && v < 1) {
		return reachSpec{}, fmt.Errorf("%q: %s must be between 0 and 1 (exclusive), e.g. %s:0.3", s, kind, kind)
	}
	r.value = v
	return r, nil
}

// column is the TSV column stem: the target with ':' as '_'.
func (r reachSpec) column() string { return "reach_" + strings.ReplaceAll(r.label, ":", "_") }

// parseReachList validates --reach; repeated targets are refused.
func parseReachList(list []string) ([]reachSpec, error) {
	var out []reachSpec
	seen := map[string]bool{}
	for _, s := range list {
		if strings.TrimSpace(s) == "" {
			continue
		}
		r, err := parseReach(s)
		if err != nil {
			return nil, err
		}
		if seen[r.label] {
			return nil, fmt.Errorf("target %q given twice", r.label)
		}
		seen[r.label] = true
		out = append(out, r)
	}
	if len(out) > maxDepths {
		return nil, fmt.Errorf("%d targets; give at most %d", len(out), maxDepths)
	}
	return out, nil
}

// reachAnswer is one target answered for one sample: the total depth in
// reads (counting those already sequenced) and its interval; NaN when it
// cannot be reached, with why.
type reachAnswer struct {
	spec          reachSpec
	reads, lo, hi float64
	note          string
}

// resolve turns the target into the value the curve is solved for.
func (r reachSpec) resolve(distinctNow int64) float64 {
	if r.multiple > 0 {
		return r.multiple * float64(distinctNow)
	}
	return r.value
}

// reachHorizon is how far beyond the observed reads a target is sought
// and a plan goes: the accuracy benchmark measures the curves up to 100x
// (BENCHMARKS.md; complexity answers reach targets up to the same depth).
const reachHorizon = 100.0

// reachKindOf maps a target kind as written to complexity's.
var reachKindOf = map[string]complexity.TargetKind{
	"distinct": complexity.TargetDistinct,
	"dup":      complexity.TargetDup,
	"coverage": complexity.TargetCoverage,
	"yield":    complexity.TargetYield,
}

// target is the complexity target for a sample with distinctNow units.
func (r reachSpec) target(distinctNow int64) complexity.Target {
	return complexity.Target{Kind: reachKindOf[r.kind], Value: r.resolve(distinctNow)}
}
