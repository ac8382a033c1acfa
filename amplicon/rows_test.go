package amplicon

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestPipelinedRowsMatchSerial: with batches of one to three rows (so
// that every error falls at every place in a batch), the pipelined reader
// gives the serial reader's table or error on tables with a flaw at a
// random row: a bad cell, a repeated ID, both in one row, a short row, a
// quote that does not close, an overflow, or none.
func TestPipelinedRowsMatchSerial(t *testing.T) {
	defer func(v int) { batchVals = v }(batchVals)
	r := rand.New(rand.NewPCG(4, 2))
	failed := map[string]int{}
	flaws := []string{"none", "cell", "dup", "dup+cell", "short", "quote", "overflow", "spaces"}
	for trial := 0; trial < 600; trial++ {
		width := 1 + r.IntN(4)
		batchVals = width * (1 + r.IntN(3))
		rows := 1 + r.IntN(12)
		flaw, at := flaws[trial%len(flaws)], r.IntN(rows)
		var b strings.Builder
		b.WriteString("taxon")
		for j := 0; j < width; j++ {
			fmt.Fprintf(&b, "\tS%d", j)
		}
		b.WriteString("\n")
		for i := 0; i < rows; i++ {
			id := fmt.Sprintf("t%d", i)
			if i == at && (flaw == "dup" || flaw == "dup+cell") && i > 0 {
				id = "t0"
			}
			if i == at && flaw == "spaces" {
				id = " " + id + " "
			}
			b.WriteString(id)
			for j := 0; j < width; j++ {
				v := fmt.Sprint(r.IntN(20))
				switch {
				case i == at && j == width-1 && (flaw == "cell" || flaw == "dup+cell"):
					v = "x1"
				case i == at && j == 0 && flaw == "quote":
					v = "\"3"
				case i == at && flaw == "overflow":
					v = "9223372036854775807"
				case i == at && j == width-1 && flaw == "short":
					continue
				}
				b.WriteString("\t" + v)
			}
			b.WriteString("\n")
		}
		data := []byte(b.String())
		for _, l := range []Layout{TaxaAsRows, SamplesAsRows} {
			tab, err := Read(strings.NewReader(b.String()), Options{Layout: l})
			sameAsSerial(t, data, Options{Layout: l, Threads: 1}, tab, err)
			if err != nil {
				failed[flaw]++
			}
		}
	}
	// Every flaw but "none" and "spaces" (IDs are trimmed) must have
	// made errors, or the comparison above proved little.
	for _, f := range flaws[1:] {
		if f != "spaces" && failed[f] == 0 {
			t.Errorf("flaw %q never made an error", f)
		}
	}
	if failed["none"] > 0 {
		t.Errorf("%d tables without a flaw failed", failed["none"])
	}
}
