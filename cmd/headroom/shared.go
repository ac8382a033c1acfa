package main

import (
	"fmt"
	"math"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
)

// depthSpec is one --at depth: a multiple of the sample's own reads
// ("10x") or an absolute number of reads ("50M").
type depthSpec struct {
	label    string  // as written, used in column names
	multiple float64 // > 0 when relative
	absolute float64 // > 0 when absolute
}

// reads returns the depth in reads for a sample of n reads.
func (d depthSpec) reads(n int64) float64 {
	if d.multiple > 0 {
		return d.multiple * float64(n)
	}
	return d.absolute
}

// parseDepth reads "10x", "50M", "2.5G", "1e8", "40000000", "500k".
func parseDepth(s string) (depthSpec, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return depthSpec{}, fmt.Errorf("empty depth")
	}
	d := depthSpec{label: t}
	if last := t[len(t)-1]; last == 'x' || last == 'X' {
		v, err := strconv.ParseFloat(t[:len(t)-1], 64)
		if err != nil || !(v > 0) || math.IsInf(v, 0) {
			return depthSpec{}, fmt.Errorf("depth %q: a multiple must be a positive number followed by x, e.g. 10x", s)
		}
		d.multiple = v
		return d, nil
	}
	v, err := parseAmount(t)
	if err != nil || !(v > 0) {
		return depthSpec{}, fmt.Errorf("depth %q: use a multiple like 10x or a number of reads like 50M, 2.5G, 1e8", s)
	}
	d.absolute = math.Round(v)
	if d.absolute < 1 {
		return depthSpec{}, fmt.Errorf("depth %q is below one read", s)
	}
	return d, nil
}

// parseAmount reads a count of reads or units the way every flag of
// headroom writes one: a plain or e-notation number with an optional
// decimal suffix k (1e3), M (1e6), G (1e9) or T (1e12): "20k", "2.5G",
// "1e8", "40000000". It refuses NaN and infinities; the caller checks the
// range.
func parseAmount(s string) (float64, error) {
	t, p := splitSuffix(strings.TrimSpace(s))
	mult := math.Pow(1000, float64(p))
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v*mult, 0) {
		return 0, fmt.Errorf("%q is not a number such as 20k, 50M, 2.5G or 1e8", s)
	}
	return v * mult, nil
}

// shared holds the flags every estimating subcommand accepts (DESIGN.md).
type shared struct {
	// moreOutputs are a subcommand's own output flags and files, set
	// before check so that it can refuse two outputs of one name.
	moreOutputs [][2]string
	at          []string
	format      string
	output      string
	curve       string
	plot        string
	report      string
	saveCounts  string
	bootstrap   int
	seed        uint64
	level       float64
	threads     int
	target      string
	maxDup      float64
	minDistinct float64
	minCoverage float64
	strict      bool
	progress    string
	reach       []string
	plan        string
	budget      string
	planGoal    string
	pool        string

	// parsed
	depths      []depthSpec
	targetDepth *depthSpec
	reaches     []reachSpec
	budgetSpec  *depthSpec
	stdoutUsed  bool // the summary goes to standard output
}

// addShared declares the flags every estimating subcommand shares, each in
// its help group.
//
// defaultReach is the command's --reach default (DESIGN.md: yield:0.1 for
// reads and counts, coverage:0.99 for taxa).
func addShared(c *command, defaultReach string) *shared {
	s := &shared{}
	c.gated = true
	est := c.flags(groupEstimation)
	est.StringSliceVar(&s.at, "at", []string{"2x", "10x", "100x"}, "depths to predict at: `LIST` of multiples of the sample's reads (10x) or absolute reads (50M, 2.5G, 1e8)")
	est.IntVar(&s.bootstrap, "bootstrap", 100, "bootstrap replicates for confidence intervals (`N`, 0 = none, at most 100000)")
	est.Uint64Var(&s.seed, "seed", 1, "random seed for the bootstrap (same seed, same output)")
	est.Float64Var(&s.level, "level", 0.95, "confidence level of the intervals, between 0 and 1")
	dec := c.flags(groupDecisions)
	dec.StringSliceVar(&s.reach, "reach", []string{defaultReach}, "targets `LIST` answered as the depth that reaches them: distinct:20M or distinct:3x, dup:0.3, coverage:0.99, yield:0.05")
	dec.StringVar(&s.plan, "plan", "", "write the next run's plan for this pool to `FILE` (TSV, or JSON for .json); needs --budget")
	dec.StringVar(&s.budget, "budget", "", "the next run's `READS` for the whole pool, as the run delivers them (400M, or 10x this run's reads)")
	dec.StringVar(&s.planGoal, "plan-goal", "most", "`GOAL` of the plan: most (the most distinct units for the pool) or reach (each sample to its first --reach target)")
	dec.StringVar(&s.pool, "pool", "", "this run's pool shares: TSV `FILE` with columns sample and share (default: equal shares)")
	out := c.flags(groupOutputs)
	out.StringVar(&s.format, "format", "", "summary format: text, tsv or json (default: text on a terminal without -o, tsv otherwise)")
	out.StringVarP(&s.output, "output", "o", "", "write the summary to `FILE` (default stdout), atomically")
	out.StringVar(&s.curve, "curve", "", "write the long-format curve (sample reads distinct lo hi kind) to `FILE`")
	out.StringVar(&s.plot, "plot", "", "write a saturation plot to `FILE` (.svg or .png)")
	out.StringVar(&s.report, "report", "", "write a self-contained HTML report to `FILE`")
	out.StringVar(&s.saveCounts, "save-counts", "", "write the frequency-count tables estimated from to `FILE`")
	gates := c.flags(groupGates)
	gates.StringVar(&s.target, "target", "", "`DEPTH` at which the gates are evaluated (10x, 50M, ...; default: the first --at depth)")
	s.maxDup, s.minDistinct, s.minCoverage = math.NaN(), math.NaN(), math.NaN()
	gates.Var((*optFloat)(&s.maxDup), "max-dup", "gate: fail when the duplicate fraction at the target exceeds `F` (default: no gate)")
	gates.Var((*optFloat)(&s.minDistinct), "min-distinct", "gate: fail when fewer than `N` distinct units are expected at the target (20k, 1.5M, ...; default: no gate)")
	gates.Var((*optFloat)(&s.minCoverage), "min-coverage", "gate: fail when the sample coverage at the target is below `C` (default: no gate)")
	gates.BoolVar(&s.strict, "strict", false, "exit with status 3 when any sample fails a gate")
	run := c.flags(groupRun)
	run.IntVar(&s.threads, "threads", runtime.NumCPU(), "worker goroutines (output does not depend on it)")
	run.StringVar(&s.progress, "progress", "auto", "progress on stderr: auto (only on a terminal), always or never")
	return s
}

// Upper bounds of flags whose value sets how much work or memory a run
// takes, so that a typo (--bootstrap 1000000000) is a usage error rather
// than an out-of-memory kill. Each is far beyond any use: the Monte Carlo
// error of a 95% bootstrap bound is already below 1% of the interval's
// width at 10,000 replicates; output does not depend on --threads, and no
// machine this runs on has 1024 cores; a summary of 1000 depths is a curve,
// which --curve writes.
const (
	maxBootstrap = 100000
	maxThreads   = 1024
	maxDepths    = 1000
)

// check validates the shared flags after parsing; errors are usage errors.
func (s *shared) check() error {
	s.depths = s.depths[:0]
	seen := map[string]bool{}
	for _, a := range s.at {
		if strings.TrimSpace(a) == "" {
			continue
		}
		d, err := parseDepth(a)
		if err != nil {
			return usagef("--at: %v", err)
		}
		if seen[d.label] {
			return usagef("--at: depth %q given twice", d.label)
		}
		seen[d.label] = true
		s.depths = append(s.depths, d)
	}
	switch s.format {
	case "", "text", "tsv", "json":
	default:
		return usagef("--format must be text, tsv or json, not %q", s.format)
	}
	r, err := parseReachList(s.reach)
	if err != nil {
		return usagef("--reach: %v", err)
	}
	s.reaches = r
	switch {
	case s.plan != "" && s.budget == "":
		return usagef("--plan needs --budget: how many reads the next run has for this pool (400M, or 10x this run's)")
	case s.plan == "" && s.budget != "":
		return usagef("--budget is for --plan: give --plan FILE to write the plan")
	case s.plan == "" && s.pool != "":
		return usagef("--pool is for --plan: give --plan FILE and --budget")
	}
	if s.budget != "" {
		d, err := parseDepth(s.budget)
		if err != nil {
			return usagef("--budget: %v", err)
		}
		s.budgetSpec = &d
	}
	switch s.planGoal {
	case "most":
	case "reach":
		if len(s.reaches) == 0 {
			return usagef("--plan-goal reach needs a --reach target")
		}
	default:
		return usagef("--plan-goal must be most or reach, not %q", s.planGoal)
	}
	if len(s.depths) > maxDepths {
		return usagef("--at: %d depths; give at most %d (use --curve for a fine curve)", len(s.depths), maxDepths)
	}
	if s.bootstrap < 0 || s.bootstrap > maxBootstrap {
		return usagef("--bootstrap must be between 0 and %d, not %d", maxBootstrap, s.bootstrap)
	}
	if !(s.level > 0 && s.level < 1) {
		return usagef("--level must be between 0 and 1 (e.g. 0.95), not %v", s.level)
	}
	if s.threads < 1 || s.threads > maxThreads {
		return usagef("--threads must be between 1 and %d, not %d", maxThreads, s.threads)
	}
	if s.target != "" {
		d, err := parseDepth(s.target)
		if err != nil {
			return usagef("--target: %v", err)
		}
		s.targetDepth = &d
	}
	if !math.IsNaN(s.maxDup) && !(s.maxDup >= 0 && s.maxDup <= 1) {
		return usagef("--max-dup must be a fraction between 0 and 1, not %v", s.maxDup)
	}
	if !math.IsNaN(s.minCoverage) && !(s.minCoverage >= 0 && s.minCoverage <= 1) {
		return usagef("--min-coverage must be between 0 and 1, not %v", s.minCoverage)
	}
	if !math.IsNaN(s.minDistinct) && !(s.minDistinct >= 0) {
		return usagef("--min-distinct must be 0 or more, not %v", s.minDistinct)
	}
	if s.plot != "" {
		if e := strings.ToLower(filepath.Ext(s.plot)); e != ".svg" && e != ".png" {
			return usagef("--plot %s: use a file name ending in .svg or .png", s.plot)
		}
	}
	switch s.progress {
	case "auto", "always", "never":
	default:
		return usagef("--progress must be auto, always or never, not %q", s.progress)
	}
	return nil
}

// checkOutputs vets the outputs before any input is read (see the
// function of that name); inputs are the command's input files.
func (s *shared) checkOutputs(inputs []string) error {
	outs := append([][2]string{
		{"-o", s.output}, {"--curve", s.curve}, {"--plot", s.plot}, {"--report", s.report}, {"--save-counts", s.saveCounts}, {"--plan", s.plan},
	}, s.moreOutputs...)
	return checkOutputs(outs, inputs)
}

// anyGate reports whether a QC gate was set.
func (s *shared) anyGate() bool {
	return !math.IsNaN(s.maxDup) || !math.IsNaN(s.minDistinct) || !math.IsNaN(s.minCoverage)
}

// resolvedFormat is the summary format: as given, else text when the
// summary goes to a terminal, else tsv.
func (s *shared) resolvedFormat(a *app) string {
	if s.format != "" {
		return s.format
	}
	if a.stdoutTTY && (s.output == "" || s.output == "-") {
		return "text"
	}
	return "tsv"
}

// showProgress reports whether progress should be drawn on stderr.
func (s *shared) showProgress(a *app) bool {
	switch s.progress {
	case "always":
		return true
	case "never":
		return false
	}
	return a.stderrTTY
}

// optFloat is a float flag that is unset (NaN) until given, so that its
// help shows no default.
type optFloat float64

func (f *optFloat) String() string {
	if math.IsNaN(float64(*f)) {
		return ""
	}
	return strconv.FormatFloat(float64(*f), 'g', -1, 64)
}

func (f *optFloat) Set(v string) error {
	x, err := parseAmount(v)
	if err != nil {
		return err
	}
	*f = optFloat(x)
	return nil
}

func (f *optFloat) Type() string { return "float" }

// splitSuffix splits a trailing k, M, G or T (either case) off a number
// and says which power it is (1 to 4; 0 without one). Counts take it as
// powers of 1000 (parseAmount), sizes in bytes as powers of 1024.
func splitSuffix(t string) (string, int) {
	if n := len(t); n > 1 {
		switch t[n-1] {
		case 'k', 'K':
			return t[:n-1], 1
		case 'm', 'M':
			return t[:n-1], 2
		case 'g', 'G':
			return t[:n-1], 3
		case 't', 'T':
			return t[:n-1], 4
		}
	}
	return t, 0
}
