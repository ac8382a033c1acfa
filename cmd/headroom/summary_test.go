package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const demoCounts = "../../testdata/demo/qc-pass.counts.tsv"

// TestSummaryColumns: the TSV header is the DESIGN.md contract, in order.
func TestSummaryColumns(t *testing.T) {
	code, out, stderr := runCLI(t, "", "counts", "--bootstrap", "0", "--at", "10x,50M", demoCounts)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
	want := "sample reads distinct dup_fraction singletons doubletons sample_coverage marginal_yield " +
		"total_est total_lo total_hi total_method saturation method backtest_error verdict notes " +
		"distinct_10x lo_10x hi_10x dup_fraction_10x distinct_50M lo_50M hi_50M dup_fraction_50M " +
		"reach_yield_0.1 lo_reach_yield_0.1 hi_reach_yield_0.1"
	if got := strings.Join(strings.Split(lines[0], "\t"), " "); got != want {
		t.Errorf("header\n got %s\nwant %s", got, want)
	}
	for i, l := range lines[1:] {
		if n := len(strings.Split(l, "\t")); n != len(strings.Split(lines[0], "\t")) {
			t.Errorf("row %d has %d fields", i+1, n)
		}
		if strings.Contains(l, "NaN") || strings.Contains(l, "Inf") {
			t.Errorf("row %d holds NaN/Inf: %s", i+1, l)
		}
	}
	if len(lines) != 7 {
		t.Errorf("%d rows, want 6 samples", len(lines)-1)
	}
}

// TestSummaryJSON: the JSON document has the DESIGN.md shape and the same
// keys as the TSV.
func TestSummaryJSON(t *testing.T) {
	code, out, stderr := runCLI(t, "", "counts", "--format", "json", "--bootstrap", "20", "--at", "10x,50M", demoCounts)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		Tool    string           `json:"tool"`
		Version string           `json:"version"`
		Samples []map[string]any `json:"samples"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("invalid JSON: %v\n%s", err, out)
	}
	if doc.Tool != "headroom" || doc.Version == "" || len(doc.Samples) != 6 {
		t.Fatalf("doc %+v", doc)
	}
	for _, k := range summaryKeys(nil) {
		if _, ok := doc.Samples[0][k]; !ok {
			t.Errorf("key %q missing", k)
		}
	}
	preds, ok := doc.Samples[0]["predictions"].([]any)
	if !ok || len(preds) != 2 {
		t.Fatalf("predictions %v", doc.Samples[0]["predictions"])
	}
	p := preds[1].(map[string]any)
	if p["label"] != "50M" || p["reads"] != 5e7 {
		t.Errorf("prediction %v", p)
	}
}

// TestThreadsDeterministic: output is byte-identical for any --threads.
func TestThreadsDeterministic(t *testing.T) {
	dir := t.TempDir()
	var first string
	for _, th := range []string{"1", "2", "8"} {
		curve := filepath.Join(dir, "curve"+th+".tsv")
		code, out, stderr := runCLI(t, "", "counts", "--threads", th, "--bootstrap", "30", "--curve", curve, demoCounts)
		if code != 0 {
			t.Fatalf("threads %s: exit %d %s", th, code, stderr)
		}
		cb, _ := os.ReadFile(curve)
		all := out + string(cb)
		if first == "" {
			first = all
		} else if all != first {
			t.Errorf("--threads %s output differs from --threads 1", th)
		}
	}
}

// TestStrict: --strict exits 3 when a gate fails, 0 otherwise.
func TestStrict(t *testing.T) {
	code, out, _ := runCLI(t, "", "counts", "--bootstrap", "0", "--max-dup", "0.01", "--strict", demoCounts)
	if code != exitStrict || !strings.Contains(out, "\tfail\t") {
		t.Errorf("strict failing gate: exit %d", code)
	}
	code, _, _ = runCLI(t, "", "counts", "--bootstrap", "0", "--max-dup", "0.01", demoCounts)
	if code != 0 {
		t.Errorf("failing gate without --strict: exit %d", code)
	}
	code, _, _ = runCLI(t, "", "counts", "--bootstrap", "0", "--max-dup", "0.9999", "--strict", demoCounts)
	if code != 0 {
		t.Errorf("passing gate with --strict: exit %d", code)
	}
}
