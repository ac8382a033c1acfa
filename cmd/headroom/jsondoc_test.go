package main

import (
	"bytes"
	"encoding/json"
	"os"
	"regexp"
	"strings"
	"testing"
)

// docField is one row of docs/json.md.
type docField struct {
	key, typ string
	commands string
}

// readJSONDoc parses the key tables of docs/json.md: the section "Sample
// keys", "Prediction keys" and "Reach keys".
func readJSONDoc(t *testing.T) (sample, pred, reach []docField) {
	t.Helper()
	b, err := os.ReadFile("../../docs/json.md")
	if err != nil {
		t.Fatal(err)
	}
	row := regexp.MustCompile("^\\| `([a-z0-9_]+)` \\| ([a-z\\\\|]+) \\| ([a-z]+) \\|")
	var cur *[]docField
	for _, line := range strings.Split(string(b), "\n") {
		switch {
		case strings.HasPrefix(line, "## Sample keys"):
			cur = &sample
		case strings.HasPrefix(line, "## Prediction keys"):
			cur = &pred
		case strings.HasPrefix(line, "## Reach keys"):
			cur = &reach
		}
		if m := row.FindStringSubmatch(line); m != nil && cur != nil {
			*cur = append(*cur, docField{key: m[1], typ: strings.ReplaceAll(m[2], "\\|", "|"), commands: m[3]})
		}
	}
	if len(sample) < 10 || len(pred) < 5 || len(reach) < 4 {
		t.Fatalf("docs/json.md: parsed %d sample, %d prediction and %d reach keys", len(sample), len(pred), len(reach))
	}
	return sample, pred, reach
}

// checkType reports whether v matches a documented type.
func checkType(v any, typ string) bool {
	for _, alt := range strings.Split(typ, "|") {
		switch alt {
		case "null":
			if v == nil {
				return true
			}
		case "string":
			if _, ok := v.(string); ok {
				return true
			}
		case "number":
			if _, ok := v.(json.Number); ok {
				return true
			}
		case "integer":
			if n, ok := v.(json.Number); ok && !strings.ContainsAny(string(n), ".eE") {
				return true
			}
		case "array":
			if _, ok := v.([]any); ok {
				return true
			}
		}
	}
	return false
}

// validateJSONDoc checks a real JSON summary against docs/json.md: every
// key documented for the command is present, in the documented order, with
// the documented type, and no undocumented key appears.
func validateJSONDoc(t *testing.T, command string, out []byte) {
	t.Helper()
	sample, pred, reach := readJSONDoc(t)
	d := json.NewDecoder(bytes.NewReader(out))
	d.UseNumber()
	var doc map[string]any
	if err := d.Decode(&doc); err != nil {
		t.Fatalf("invalid JSON: %v", err)
	}
	if doc["tool"] != "headroom" {
		t.Errorf("tool = %v", doc["tool"])
	}
	if _, ok := doc["version"].(string); !ok {
		t.Errorf("version = %v", doc["version"])
	}
	if n, ok := doc["notes"]; ok {
		arr, isArr := n.([]any)
		if !isArr || len(arr) == 0 {
			t.Errorf("top-level notes = %v, want a non-empty array when present", n)
		}
		for _, x := range arr {
			if _, isStr := x.(string); !isStr {
				t.Errorf("top-level note %v is not a string", x)
			}
		}
	}
	for k := range doc {
		if k != "tool" && k != "version" && k != "samples" && k != "notes" {
			t.Errorf("undocumented top-level key %q", k)
		}
	}
	samples, ok := doc["samples"].([]any)
	if !ok || len(samples) == 0 {
		t.Fatalf("samples = %v", doc["samples"])
	}
	check := func(where string, obj map[string]any, fields []docField) {
		want := map[string]bool{}
		for _, f := range fields {
			if f.commands != "all" && f.commands != command {
				continue
			}
			want[f.key] = true
			v, ok := obj[f.key]
			if !ok {
				t.Errorf("%s: key %q documented but missing", where, f.key)
				continue
			}
			if !checkType(v, f.typ) {
				t.Errorf("%s: key %q = %v, documented as %s", where, f.key, v, f.typ)
			}
		}
		for k := range obj {
			if !want[k] {
				t.Errorf("%s: key %q is not documented for %s", where, k, command)
			}
		}
	}
	for _, s := range samples {
		obj := s.(map[string]any)
		check("sample "+obj["sample"].(string), obj, sample)
		for _, p := range obj["predictions"].([]any) {
			check("prediction", p.(map[string]any), pred)
		}
		for _, r := range obj["reach"].([]any) {
			check("reach", r.(map[string]any), reach)
		}
	}
}

func TestJSONMatchesDocCounts(t *testing.T) {
	code, out, stderr := runCLI(t, "", "counts", "--format", "json", "--bootstrap", "10", "--max-dup", "0.5", demoCounts)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	validateJSONDoc(t, "counts", []byte(out))
	// Without bootstrap and gates, intervals and verdicts are null.
	code, out, _ = runCLI(t, "", "counts", "--format", "json", "--bootstrap", "0", demoCounts)
	if code != 0 {
		t.Fatal(code)
	}
	validateJSONDoc(t, "counts", []byte(out))
	if !strings.Contains(out, `"verdict":null`) || !strings.Contains(out, `"lo":null`) {
		t.Errorf("expected null verdicts and intervals without gates and bootstrap")
	}
}

func TestJSONMatchesDocReadsTaxa(t *testing.T) {
	code, out, stderr := runCLI(t, "", "reads", "--format", "json", "--bootstrap", "5", "--progress", "never", demoBAM)
	if code != 0 {
		t.Fatalf("reads: exit %d: %s", code, stderr)
	}
	validateJSONDoc(t, "reads", []byte(out))
	code, out, stderr = runCLI(t, "", "taxa", "--format", "json", "--bootstrap", "5", "--min-coverage", "0.9", "../../testdata/taxa/gen_taxa_rows.tsv")
	if code != 0 {
		t.Fatalf("taxa: exit %d: %s", code, stderr)
	}
	validateJSONDoc(t, "taxa", []byte(out))
}
