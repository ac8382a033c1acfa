package main

import (
	"os"
	"path/filepath"
	"testing"
)

// TestDeterministicEverySubcommand: for every estimating subcommand, the
// same input, seed and flags give byte-identical summary (TSV and JSON),
// curve, saved counts, SVG plot and HTML report for --threads 1, 2 and 8,
// and on a repeated run.
func TestDeterministicEverySubcommand(t *testing.T) {
	cases := []struct {
		name string
		args []string
	}{
		{"counts", []string{"counts", demoCounts}},
		{"reads-sorted", []string{"reads", demoBAM}},
		{"reads-hashed", []string{"reads", "--mode", "hashed", demoBAM}},
		{"taxa", []string{"taxa", "../../testdata/taxa/gen_taxa_rows.tsv"}},
	}
	files := []string{"summary.tsv", "summary.json", "curve.tsv", "counts.tsv", "plot.svg", "report.html"}
	for _, c := range cases {
		var first map[string]string
		for i, th := range []string{"1", "2", "8", "2"} {
			dir := t.TempDir()
			p := func(n string) string { return filepath.Join(dir, n) }
			common := []string{"--threads", th, "--bootstrap", "25", "--seed", "7", "--progress", "never",
				"--at", "3x,50M", "--target", "3x", "--max-dup", "0.5"}
			args := append(append([]string{c.args[0]}, common...), "-o", p("summary.tsv"), "--curve", p("curve.tsv"),
				"--save-counts", p("counts.tsv"), "--plot", p("plot.svg"), "--report", p("report.html"))
			args = append(args, c.args[1:]...)
			if code, _, stderr := runCLI(t, "", args...); code != 0 {
				t.Fatalf("%s threads %s: exit %d %s", c.name, th, code, stderr)
			}
			jargs := append(append([]string{c.args[0]}, common...), "--format", "json", "-o", p("summary.json"))
			jargs = append(jargs, c.args[1:]...)
			if code, _, stderr := runCLI(t, "", jargs...); code != 0 {
				t.Fatalf("%s json threads %s: exit %d %s", c.name, th, code, stderr)
			}
			got := map[string]string{}
			for _, f := range files {
				b, err := os.ReadFile(p(f))
				if err != nil {
					t.Fatal(err)
				}
				got[f] = string(b)
			}
			if i == 0 {
				first = got
				continue
			}
			for _, f := range files {
				if got[f] != first[f] {
					t.Errorf("%s: %s with --threads %s (run %d) differs from --threads 1", c.name, f, th, i+1)
				}
			}
		}
	}
}
