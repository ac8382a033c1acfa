package dedup

import (
	"strings"
	"testing"
)

// TestCountOrderAndSequenced: libraries come out in the order the header
// declares their read groups (SAM specification 1.3: @RG lines), not the
// order records first use them; Sequenced counts a pair once and leaves
// out secondary and supplementary records (SAM specification 1.4 FLAG).
func TestCountOrderAndSequenced(t *testing.T) {
	sam := "@HD\tVN:1.6\tSO:unsorted\n@SQ\tSN:chr1\tLN:100000\n" +
		"@RG\tID:rgB\tLB:LIB-B\n@RG\tID:rgA\tLB:LIB-A\n" +
		// LIB-A: one pair (flags 99/147), a secondary (355) and a supplementary (2145) record.
		"p1\t99\tchr1\t100\t60\t20M\t=\t300\t220\tACGTACGTACGTACGTACGT\t*\tRG:Z:rgA\tMC:Z:20M\n" +
		"p1\t147\tchr1\t300\t60\t20M\t=\t100\t-220\tACGTACGTACGTACGTACGT\t*\tRG:Z:rgA\tMC:Z:20M\n" +
		"p1\t355\tchr1\t500\t0\t20M\t=\t300\t0\tACGTACGTACGTACGTACGT\t*\tRG:Z:rgA\n" +
		"p1\t2145\tchr1\t700\t60\t20M\t=\t300\t0\tACGTACGTACGTACGTACGT\t*\tRG:Z:rgA\n" +
		// LIB-B: two single-end reads, seen after LIB-A.
		"s1\t0\tchr1\t1000\t60\t20M\t*\t0\t0\tACGTACGTACGTACGTACGT\t*\tRG:Z:rgB\n" +
		"s2\t16\tchr1\t2000\t60\t20M\t*\t0\t0\tACGTACGTACGTACGTACGT\t*\tRG:Z:rgB\n"
	libs, err := Count([]Input{{Name: "t.sam", R: strings.NewReader(sam)}}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(libs) != 2 || libs[0].Name != "LIB-B" || libs[1].Name != "LIB-A" {
		var names []string
		for _, l := range libs {
			names = append(names, l.Name)
		}
		t.Fatalf("libraries %v, want [LIB-B LIB-A] (header order)", names)
	}
	if libs[0].Sequenced != 2 || libs[1].Sequenced != 1 {
		t.Errorf("sequenced LIB-B %d LIB-A %d, want 2 and 1 (a pair once, no secondary or supplementary)", libs[0].Sequenced, libs[1].Sequenced)
	}
}
