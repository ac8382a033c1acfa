package main

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"headroom/complexity"
)

var taxaData = filepath.Join("..", "..", "testdata", "taxa")

// Output rounding: countCell writes one decimal, fracCell six significant
// digits; the comparison allows half a unit of the last digit written.
const (
	taxaCountTol = 0.05 + 1e-9
	taxaFracTol  = 5e-6
)

// taxaGolden reads a '#'-commented TSV with a header into maps.
func taxaGolden(t *testing.T, name string) []map[string]string {
	t.Helper()
	f, err := os.Open(filepath.Join(taxaData, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var keys []string
	var rows []map[string]string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if strings.HasPrefix(sc.Text(), "#") {
			continue
		}
		fields := strings.Split(sc.Text(), "\t")
		if keys == nil {
			keys = fields
			continue
		}
		m := map[string]string{}
		for i, k := range keys {
			m[k] = fields[i]
		}
		rows = append(rows, m)
	}
	return rows
}

type taxaDoc struct {
	Notes   []string         `json:"notes"`
	Samples []map[string]any `json:"samples"`
}

func runTaxaJSON(t *testing.T, stdin string, args ...string) taxaDoc {
	t.Helper()
	code, out, errs := runCLI(t, stdin, append([]string{"taxa", "--format", "json", "--bootstrap", "0"}, args...)...)
	if code != 0 {
		t.Fatalf("taxa %v: exit %d, stderr %q", args, code, errs)
	}
	var d taxaDoc
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatalf("taxa %v: bad JSON: %v\n%s", args, err, out)
	}
	return d
}

func num(v any) float64 {
	f, ok := v.(float64)
	if !ok {
		return math.NaN()
	}
	return f
}

func goldenNum(s string) float64 {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return math.NaN()
	}
	return v
}

// checkTaxaSkbio compares the summary with scikit-bio 0.5.8
// (skbio.diversity.alpha; testdata/taxa/skbio_alpha.tsv, written by
// scripts/taxa_reference.py).
func checkTaxaSkbio(t *testing.T, what string, d taxaDoc, golden []map[string]string) {
	t.Helper()
	if len(d.Samples) != len(golden) {
		t.Fatalf("%s: %d samples, want %d", what, len(d.Samples), len(golden))
	}
	for i, g := range golden {
		s := d.Samples[i]
		name := g["sample"]
		if s["sample"] != name {
			t.Errorf("%s: sample %d = %v, want %s", what, i, s["sample"], name)
			continue
		}
		for _, k := range [][2]string{{"reads", "reads"}, {"distinct", "observed"}, {"singletons", "singles"}, {"doubletons", "doubles"}} {
			if got, want := num(s[k[0]]), goldenNum(g[k[1]]); got != want {
				t.Errorf("%s %s: %s = %v, skbio %s %v", what, name, k[0], got, k[1], want)
			}
		}
		if num(s["reads"]) == 0 {
			for _, k := range []string{"chao1", "chao1_lo", "chao1_hi", "ace", "good_coverage", "reach_coverage_0.99"} {
				if s[k] != nil {
					t.Errorf("%s %s: %s = %v for an empty sample, want null", what, name, k, s[k])
				}
			}
			continue
		}
		for _, k := range [][3]string{{"chao1", "chao1", "c"}, {"chao1_lo", "chao1_lo_0.95", "c"}, {"chao1_hi", "chao1_hi_0.95", "c"},
			{"ace", "ace", "c"}, {"good_coverage", "goods_coverage", "f"}} {
			got, want := num(s[k[0]]), goldenNum(g[k[1]])
			tol := taxaCountTol
			if k[2] == "f" {
				tol = taxaFracTol * math.Max(1, math.Abs(want))
			}
			if math.IsNaN(want) != math.IsNaN(got) || math.Abs(got-want) > tol {
				t.Errorf("%s %s: %s = %v, skbio %s %v", what, name, k[0], got, k[1], want)
			}
		}
	}
}

// Every layout of the generated table gives skbio's values.
func TestTaxaLayoutsMatchSkbio(t *testing.T) {
	golden := taxaGolden(t, "skbio_alpha.tsv")
	for _, f := range []string{"gen_taxa_rows.tsv", "gen_samples_rows.csv", "gen_dense.biom", "gen_sparse.biom"} {
		checkTaxaSkbio(t, f, runTaxaJSON(t, "", filepath.Join(taxaData, f)), golden)
	}
	// Standard input, gzip-compressed.
	raw, err := os.ReadFile(filepath.Join(taxaData, "gen_samples_rows.csv"))
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	zw := gzip.NewWriter(&b)
	zw.Write(raw)
	zw.Close()
	checkTaxaSkbio(t, "stdin gzip", runTaxaJSON(t, b.String(), "-"), golden)
}

// The real table Twins.csv against skbio (testdata/taxa/twins_alpha.tsv).
func TestTaxaTwins(t *testing.T) {
	path := filepath.Join(taxaData, "external", "Twins.csv")
	if _, err := os.Stat(path); err != nil {
		t.Skip("testdata/taxa/external/Twins.csv absent: run sh scripts/fetch_taxa_data.sh to fetch it from Debian")
	}
	checkTaxaSkbio(t, "Twins.csv", runTaxaJSON(t, "", path), taxaGolden(t, "twins_alpha.tsv"))
}

// The rarefied richness and coverage the advisor uses (complexity.Curve.Distinct
// and Coverage) against scipy's hypergeometric distribution
// (testdata/taxa/scipy_rarefied.tsv).
func TestTaxaRarefiedMatchesScipy(t *testing.T) {
	// Both sides sum the same terms in float64; log-gamma differences lose
	// about eps*N*log(N) (N <= 2e4 here), so 1e-9 relative is ample.
	const tol = 1e-9
	code, out, errs := runCLI(t, "", "taxa", "--bootstrap", "0", "-o", filepath.Join(t.TempDir(), "summary.tsv"), "--save-counts", "-", filepath.Join(taxaData, "gen_taxa_rows.tsv"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	counts := map[string]map[int64]int64{}
	for _, line := range strings.Split(out, "\n") {
		f := strings.Split(line, "\t")
		if len(f) != 3 || f[0] == "sample" {
			continue
		}
		j, err1 := strconv.ParseInt(f[1], 10, 64)
		u, err2 := strconv.ParseInt(f[2], 10, 64)
		if err1 != nil || err2 != nil {
			continue
		}
		if counts[f[0]] == nil {
			counts[f[0]] = map[int64]int64{}
		}
		counts[f[0]][j] = u
	}
	rows := taxaGolden(t, "scipy_rarefied.tsv")
	if len(rows) < 50 {
		t.Fatalf("only %d golden rows", len(rows))
	}
	for _, g := range rows {
		c, err := complexity.FromMap(counts[g["sample"]])
		if err != nil {
			t.Fatal(err)
		}
		m := goldenNum(g["depth"])
		cv := complexity.Curve{Counts: c}
		if got, want := cv.Distinct(m), goldenNum(g["expected_taxa"]); math.Abs(got-want) > tol*want {
			t.Errorf("%s at %v: expected taxa %v, scipy %v", g["sample"], m, got, want)
		}
		if got, want := cv.Coverage(m), goldenNum(g["expected_coverage"]); math.Abs(got-want) > tol {
			t.Errorf("%s at %v: expected coverage %v, scipy %v", g["sample"], m, got, want)
		}
	}
}

// --reach coverage:C solves the Chao & Jost (2012) coverage for the target.
func TestTaxaReachCoverage(t *testing.T) {
	c, _ := complexity.FromMap(map[int64]int64{1: 40, 2: 15, 3: 8, 10: 30, 100: 5})
	n := float64(c.Reads())
	cv := complexity.Curve{Counts: c}
	for _, target := range []float64{0.5, 0.9, 0.95, 0.99, 0.999} {
		spec, err := parseReach(fmt.Sprintf("coverage:%v", target))
		if err != nil {
			t.Fatal(err)
		}
		m := complexity.Curve{Counts: c}.ReadsFor(spec.target(c.Distinct()), 100*n)
		if math.IsNaN(m) {
			t.Fatalf("target %v: NaN", target)
		}
		if got := cv.Coverage(m); got < target {
			t.Errorf("target %v: coverage at %v = %v, below the target", target, m, got)
		}
		// Whole reads, found by bisection to half a read: at most one read
		// above the least depth that reaches the target.
		if m > 2 {
			if got := cv.Coverage(m - 2); got >= target {
				t.Errorf("target %v: coverage at %v-2 = %v already reaches it", target, m, got)
			}
		}
		// Above N, eq. 4b in closed form: 1 - f1/N A^(m-N+1).
		if m > n {
			a := 39.0 * float64(c.Reads()-1) / (40.0*float64(c.Reads()-1) + 30) * 40 / 39
			want := 1 - 40/n*math.Pow(a, m-n+1)
			if math.Abs(cv.Coverage(m)-want) > 1e-12 {
				t.Errorf("target %v: coverage at %v = %v, closed form %v", target, m, cv.Coverage(m), want)
			}
		}
	}
}

// Bad input: exit 1, one line on stderr naming file, line and column, and
// no output file written.
func TestTaxaBadInput(t *testing.T) {
	dir := t.TempDir()
	biom := func(data string) string {
		return `{"id":"x","format":"Biological Observation Matrix 1.0.0","type":"OTU table","shape":[2,2],` +
			`"rows":[{"id":"T1","metadata":null},{"id":"T2","metadata":null}],` +
			`"columns":[{"id":"S1","metadata":null},{"id":"S2","metadata":null}],` + data + `}`
	}
	cases := []struct {
		name, body, want string
	}{
		{"proportions", "taxon\tS1\tS2\nT1\t0.25\t0.5\nT2\t0.75\t0.5\n", ":2: column 2: sample \"S1\": \"0.25\" is not a whole number; headroom needs raw read counts"},
		{"negative", "taxon\tS1\tS2\nT1\t3\t-2\n", ":2: column 3: sample \"S2\": negative count"},
		{"word", "taxon,S1,S2\nT1,3,4\nT2,5,NA\n", ":3: column 3: sample \"S2\": word \"NA\" in a count cell"},
		{"ragged", "taxon\tS1\tS2\nT1\t3\t4\nT2\t5\n", ":3: column 2: row has 2 fields but the header (line 1) has 3"},
		{"dupsample", "taxon\tS1\tS1\nT1\t3\t4\n", ":1: column 3: sample ID \"S1\" repeated"},
		{"duptaxon", "taxon\tS1\tS2\nT1\t3\t4\nT1\t5\t6\n", ":3: column 1: taxon ID \"T1\" repeated (first on line 2)"},
		{"dupsamplerow", "sample_id,T1,T2\nS1,3,4\nS1,5,6\n", ":3: column 1: sample ID \"S1\" repeated"},
		{"empty", "", "empty table"},
		{"headeronly", "# a comment\ntaxon\tS1\tS2\n", ":2: empty table: a header but no data rows"},
		{"truncbiom", strings.TrimSuffix(biom(`"matrix_type":"dense","data":[[1,2],[3`), "}"), "truncated BIOM JSON"},
		{"biomsyntax", biom(`"matrix_type":"dense","data":[[1,2],[3}`), ":1: column 260: BIOM JSON syntax error"},
		{"biomfrac", biom(`"matrix_type":"sparse","data":[[0,0,1.5]]`), ":1: column 260: \"1.5\" is not a whole number"},
		{"biomneg", biom(`"matrix_type":"dense","data":[[1,2],[3,-4]]`), "negative count"},
		{"biomdup", `{"shape":[1,2],"matrix_type":"dense","rows":[{"id":"T"}],"columns":[{"id":"A"},{"id":"A"}],"data":[[1,2]]}`, "sample ID \"A\" repeated"},
		{"hdf5", "\x89HDF\r\n\x1a\n\x00\x00\x00binary", ": HDF5: 24 bytes at address 0 lie beyond the end of the file"},
	}
	out := writeFile(t, dir, "keep.tsv", "old contents\n")
	adv := filepath.Join(dir, "advice.tsv")
	for _, c := range cases {
		p := writeFile(t, dir, c.name+".txt", c.body)
		code, stdout, stderr := runCLI(t, "", "taxa", "--bootstrap", "0", "-o", out, "--advise-depth", adv, p)
		if code != exitInput {
			t.Errorf("%s: exit %d, want 1 (stderr %q)", c.name, code, stderr)
		}
		if !strings.HasPrefix(stderr, "headroom: "+p) || !strings.Contains(stderr, c.want) {
			t.Errorf("%s: stderr %q, want file name and %q", c.name, stderr, c.want)
		}
		if strings.Count(stderr, "\n") != 1 {
			t.Errorf("%s: stderr is not one line: %q", c.name, stderr)
		}
		if stdout != "" {
			t.Errorf("%s: stdout %q, want nothing", c.name, stdout)
		}
		if b, _ := os.ReadFile(out); string(b) != "old contents\n" {
			t.Errorf("%s: -o file changed to %q", c.name, b)
		}
		if _, err := os.Stat(adv); err == nil {
			t.Errorf("%s: --advise-depth file written", c.name)
		}
	}
}

func TestTaxaUsage(t *testing.T) {
	p := filepath.Join(taxaData, "gen_taxa_rows.tsv")
	for _, args := range [][]string{
		{"taxa"},
		{"taxa", p, p},
		{"taxa", "--samples-as-rows", "--taxa-as-rows", p},
		{"taxa", "--reach", "coverage:1.5", p},
		{"taxa", "--no-such-flag", p},
	} {
		if code, _, stderr := runCLI(t, "", args...); code != exitUsage || !strings.HasPrefix(stderr, "headroom: ") {
			t.Errorf("%v: exit %d stderr %q, want usage error", args, code, stderr)
		}
	}
	code, out, _ := runCLI(t, "", "taxa", "--help")
	if code != 0 || !strings.Contains(out, "--advise-depth") || !strings.Contains(out, "--samples-as-rows") {
		t.Errorf("--help: exit %d, %q", code, out)
	}
}

// Singleton-filtered samples and tables are named in notes.
func TestTaxaSingletonFiltered(t *testing.T) {
	d := runTaxaJSON(t, "", filepath.Join(taxaData, "gen_taxa_rows.tsv"))
	for _, s := range d.Samples {
		notes := jsonNotes(s["notes"])
		flagged := strings.Contains(notes, "taxa seen once where at least")
		switch s["sample"] {
		case "NO-SINGLES":
			if !flagged || !strings.Contains(notes, "filtered") {
				t.Errorf("NO-SINGLES: notes %q, want the singleton warning", notes)
			}
		case "BLANK-01":
			if !strings.Contains(notes, "no reads") {
				t.Errorf("BLANK-01: notes %q, want 'no reads'", notes)
			}
		default:
			if flagged {
				t.Errorf("%v: flagged as singleton-filtered: %q", s["sample"], notes)
			}
		}
		if strings.Contains(notes, "skipped taxon metadata column(s)") {
			t.Errorf("%v: notes %q repeat a note about the whole table", s["sample"], notes)
		}
	}
	// Notes about the whole table are said once, at the top of the JSON.
	if !strings.Contains(strings.Join(d.Notes, ";"), "skipped taxon metadata column(s) taxonomy") {
		t.Errorf("run notes %q lack the skipped taxonomy column", d.Notes)
	}
	// A whole table with its table-wide singletons removed: taxa whose
	// counts in four samples add up to 1 are dropped from a table of many
	// rare taxa.
	var b strings.Builder
	b.WriteString("taxon\tP1\tP2\tP3\tP4\n")
	for i := 0; i < 600; i++ {
		x := []int{i % 4, (i / 4) % 3, (i / 12) % 2, (i / 24) % 5}
		if x[0]+x[1]+x[2]+x[3] <= 1 {
			continue
		}
		fmt.Fprintf(&b, "OTU%d\t%d\t%d\t%d\t%d\n", i, x[0], x[1], x[2], x[3])
	}
	d = runTaxaJSON(t, b.String(), "-")
	notes := jsonNotes(d.Samples[0]["notes"])
	if !strings.Contains(notes, "table singletons: 0 taxa have 1 read in the whole table") {
		t.Errorf("table-wide singleton filter not noted: %q", notes)
	}
}

// The advisor lists candidate depths with kept samples and retained
// coverage; its numbers are the helpers' (checked against scipy above).
func TestTaxaAdviseDepth(t *testing.T) {
	dir := t.TempDir()
	adv := filepath.Join(dir, "advice.tsv")
	code, _, errs := runCLI(t, "", "taxa", "--bootstrap", "0", "-o", filepath.Join(dir, "s.tsv"), "--advise-depth", adv,
		filepath.Join(taxaData, "gen_taxa_rows.tsv"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(adv)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if lines[0] != "depth\tbasis\tsamples_kept\tsamples_dropped\tmin_coverage\tmedian_coverage\tmin_taxa_retained\tmedian_taxa_retained\tdropped" {
		t.Fatalf("header %q", lines[0])
	}
	found := false
	for _, l := range lines[1:] {
		f := strings.Split(l, "\t")
		if f[0] == "100" {
			found = true
			// At 100 reads: 10 of 13 samples have at least 100 reads (the
			// empty one, ONLY-SINGLES with 7 and NO-DOUBLES with 51 do
			// not); the lowest coverage is LAKE-A01's, 0.5594121 by scipy.
			if f[1] != "round" || f[2] != "10" || f[3] != "3" || f[4] != "0.559412" {
				t.Errorf("depth 100: %q", l)
			}
		}
	}
	if !found {
		t.Errorf("no row for the round depth 100: %q", lines)
	}
}

// Output does not depend on --threads.
func TestTaxaThreads(t *testing.T) {
	p := filepath.Join(taxaData, "gen_sparse.biom")
	_, a, _ := runCLI(t, "", "taxa", "--bootstrap", "20", "--threads", "1", p)
	_, b, _ := runCLI(t, "", "taxa", "--bootstrap", "20", "--threads", "3", p)
	if a != b || a == "" {
		t.Errorf("--threads 1 and 3 differ:\n%s\n%s", a, b)
	}
}

// Tables that are not raw read counts in disguise get a table note.
func TestTaxaSuspiciousTables(t *testing.T) {
	var pa, rare strings.Builder
	pa.WriteString("taxon\tA\tB\tC\n")
	rare.WriteString("taxon\tA\tB\tC\n")
	for i := 0; i < 12; i++ {
		fmt.Fprintf(&pa, "t%d\t%d\t1\t%d\n", i, i%2, (i+1)%2)
		// Columns add up to 60 each.
		fmt.Fprintf(&rare, "t%d\t5\t%d\t%d\n", i, []int{10, 2, 8, 0, 5, 5, 3, 7, 6, 4, 9, 1}[i], []int{1, 9, 4, 6, 7, 3, 5, 5, 8, 2, 0, 10}[i])
	}
	for _, c := range []struct{ name, body, want string }{
		{"presence", pa.String(), "every count in the table is 0 or 1"},
		{"rarefied", rare.String(), "every sample has exactly 60 reads: the table looks rarefied"},
	} {
		d := runTaxaJSON(t, c.body, "-")
		for _, s := range d.Samples {
			if notes := jsonNotes(s["notes"]); !strings.Contains(notes, c.want) {
				t.Errorf("%s: %v notes %q, want %q", c.name, s["sample"], notes, c.want)
			}
		}
	}
}

// jsonNotes joins a sample's JSON notes (an array of strings) as the TSV
// does.
func jsonNotes(v any) string {
	arr, _ := v.([]any)
	var out []string
	for _, x := range arr {
		if s, ok := x.(string); ok {
			out = append(out, s)
		}
	}
	return strings.Join(out, "; ")
}
