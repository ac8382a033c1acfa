package amplicon

import (
	"os"
	"testing"
)

// BenchmarkReadTable reads the table named by $HEADROOM_BENCH_TABLE (made
// by scripts/bench_taxa.sh); it is skipped when the variable is unset.
func BenchmarkReadTable(b *testing.B) {
	path := os.Getenv("HEADROOM_BENCH_TABLE")
	if path == "" {
		b.Skip("set HEADROOM_BENCH_TABLE to a table file (see scripts/bench_taxa.sh)")
	}
	st, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(st.Size())
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := Read(f, Options{}); err != nil {
			b.Fatal(err)
		}
		f.Close()
	}
}
