package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestReadsUMINotes: the notes say when the chosen UMI or cell tag is
// mostly absent (naming the tag the records do carry) and how many UMIs
// were merged as errors. The counts themselves are checked against
// scripts/reads_reference.py in TestReadsReferenceGolden.
func TestReadsUMINotes(t *testing.T) {
	dir, _ := filepath.Abs(filepath.Join("..", "..", "testdata", "reads"))
	bx := filepath.Join(dir, "umi_bx.bam")
	cells := filepath.Join(dir, "cells_ub.bam")
	cases := []struct {
		args  []string
		want  []string
		avoid []string
	}{
		{[]string{bx}, []string{"the UMI tag RX is absent from 12214 of 12214 fragments, but BX is on 100% of them", "give --umi-tag BX"}, []string{"merged"}},
		{[]string{"--umi-tag", "BX", bx}, []string{"537 UMIs one base from a more abundant UMI at the same position were merged"}, []string{"absent"}},
		{[]string{"--umi-tag", "BX", "--umi-errors", "0", bx}, nil, []string{"merged", "absent"}},
		{[]string{"--umi-tag", "XY", bx}, []string{"the UMI tag XY is absent from 12214 of 12214 fragments"}, nil},
		{[]string{"--umi-tag", "UB", "--cell-tag", "XB", cells}, []string{"the cell tag XB is absent from 10183 of 10183 fragments"}, nil},
		{[]string{"--umi-tag", "UB", "--cell-tag", "CB", cells}, []string{"merged"}, []string{"absent"}},
	}
	for _, c := range cases {
		code, rows, stderr := runReadsIn(t, nil, c.args...)
		if code != 0 {
			t.Fatalf("%q: exit %d: %s", c.args, code, stderr)
		}
		var notes string
		for _, r := range rows {
			notes += rowField(r, "notes") + "\n"
		}
		for _, w := range c.want {
			if !strings.Contains(notes, w) {
				t.Errorf("%q: notes lack %q:\n%s", c.args, w, notes)
			}
		}
		for _, w := range c.avoid {
			if strings.Contains(notes, w) {
				t.Errorf("%q: notes have %q:\n%s", c.args, w, notes)
			}
		}
	}
}
