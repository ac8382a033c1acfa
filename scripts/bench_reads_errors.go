//go:build ignore

// bench_reads_errors measures how the FASTQ molecule key of `headroom
// reads` copes with sequencing errors. It simulates paired FASTQ with
// known molecules (invented data: a random 5 Mb reference, fragments of
// 200-500 bp, 2 × 150 bp reads), PCR duplicates (molecule weights
// lognormal, σ = 1), optical duplicates (2% of clusters get a second read
// within 60 px on the same tile) and substitution errors on both mates at
// a per-base rate rising linearly along the read from 0.4× to 1.6× the
// mean rate (qualities are the Phred value of that rate). For each mean
// rate and each --key-bases it runs headroom and compares with the truth
// the simulator knows:
//
//	distinct:     molecules in the sample
//	distinct_10x: Σ_i 1 − exp(−10·N·p_i) over molecules i of weight p_i,
//	              N = read pairs (clusters) drawn
//
// Usage (from the repository root):
//
//	go build -o /tmp/hr ./cmd/headroom
//	go run scripts/bench_reads_errors.go -headroom /tmp/hr [-pairs 150000] [-keys 0,12,16,20,24,28]
package main

import (
	"bufio"
	"flag"
	"fmt"
	"log"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
)

const readLen = 150

func main() {
	hr := flag.String("headroom", "/tmp/hr", "headroom binary")
	pairs := flag.Int("pairs", 150000, "read pairs (clusters) drawn")
	pool := flag.Int("molecules", 120000, "molecules in the library")
	rates := flag.String("rates", "0,0.001,0.005,0.01", "mean per-base error rates")
	keys := flag.String("keys", "0,12,16,20,24,28", "--key-bases values to run")
	dir := flag.String("dir", "/tmp/headroom-errors", "work folder")
	seed := flag.Uint64("seed", 7, "random seed")
	flag.Parse()
	os.MkdirAll(*dir, 0o755)

	r := rand.New(rand.NewPCG(*seed, 1))
	ref := make([]byte, 5_000_000)
	for i := range ref {
		ref[i] = "ACGT"[r.IntN(4)]
	}
	type mol struct {
		start, ins int
		rev        bool
	}
	mols := make([]mol, *pool)
	w := make([]float64, *pool)
	var sum float64
	for i := range mols {
		mols[i] = mol{r.IntN(len(ref) - 600), 200 + r.IntN(301), r.IntN(2) == 1}
		w[i] = math.Exp(r.NormFloat64())
		sum += w[i]
	}
	cum := make([]float64, len(w))
	acc := 0.0
	for i := range w {
		w[i] /= sum
		acc += w[i]
		cum[i] = acc
	}
	draw := func() int {
		u := r.Float64()
		lo, hi := 0, len(cum)-1
		for lo < hi {
			m := (lo + hi) / 2
			if cum[m] < u {
				lo = m + 1
			} else {
				hi = m
			}
		}
		return lo
	}
	// One draw of clusters shared by all error rates.
	type cluster struct {
		m          int
		tile, x, y int
		optical    bool
	}
	var cl []cluster
	seen := map[int]bool{}
	for i := 0; i < *pairs; i++ {
		c := cluster{m: draw(), tile: 1101 + r.IntN(8), x: r.IntN(30000), y: r.IntN(30000)}
		seen[c.m] = true
		cl = append(cl, c)
		if r.Float64() < 0.02 {
			o := c
			o.x, o.y, o.optical = max(0, c.x+r.IntN(121)-60), max(0, c.y+r.IntN(121)-60), true
			cl = append(cl, o)
		}
	}
	truth := float64(len(seen))
	truth10 := 0.0
	for _, p := range w {
		truth10 += 1 - math.Exp(-10*float64(*pairs)*p)
	}
	fmt.Printf("# %d read pairs (+%d optical) of %d molecules; truth: distinct %.0f, distinct_10x %.0f\n", *pairs, len(cl)-*pairs, *pool, truth, truth10)
	fmt.Printf("rate\tkey_bases\tdistinct\terr_distinct\tdistinct_10x\terr_10x\tnotes\n")
	comp := func(s []byte) []byte {
		out := make([]byte, len(s))
		for i, b := range s {
			out[len(s)-1-i] = map[byte]byte{'A': 'T', 'C': 'G', 'G': 'C', 'T': 'A'}[b]
		}
		return out
	}
	for _, rs := range strings.Split(*rates, ",") {
		rate, _ := strconv.ParseFloat(rs, 64)
		p1 := filepath.Join(*dir, "e"+rs+"_R1.fastq")
		p2 := filepath.Join(*dir, "e"+rs+"_R2.fastq")
		f1, _ := os.Create(p1)
		f2, _ := os.Create(p2)
		b1, b2 := bufio.NewWriter(f1), bufio.NewWriter(f2)
		qual := make([]byte, readLen)
		perr := make([]float64, readLen)
		for i := range perr {
			perr[i] = rate * (0.4 + 1.2*float64(i)/float64(readLen-1))
			q := 41
			if perr[i] > 0 {
				q = min(41, int(-10*math.Log10(perr[i])))
			}
			qual[i] = byte(33 + q)
		}
		er := rand.New(rand.NewPCG(*seed, 2))
		for i, c := range cl {
			m := mols[c.m]
			frag := ref[m.start : m.start+m.ins]
			a, b := frag[:readLen], comp(frag[len(frag)-readLen:])
			if m.rev {
				a, b = b, a
			}
			a, b = append([]byte(nil), a...), append([]byte(nil), b...)
			for _, s := range [][]byte{a, b} {
				for j := range s {
					if er.Float64() < perr[j] {
						s[j] = "ACGT"[(strings.IndexByte("ACGT", s[j])+1+er.IntN(3))%4]
					}
				}
			}
			name := fmt.Sprintf("SIM%07d:9:FCE77:1:%d:%d:%d", i, c.tile, c.x, c.y)
			fmt.Fprintf(b1, "@%s 1:N:0:ACGTAC\n%s\n+\n%s\n", name, a, qual)
			fmt.Fprintf(b2, "@%s 2:N:0:ACGTAC\n%s\n+\n%s\n", name, b, qual)
		}
		b1.Flush()
		b2.Flush()
		f1.Close()
		f2.Close()
		for _, ks := range strings.Split(*keys, ",") {
			out, err := exec.Command(*hr, "reads", "--bootstrap", "0", "--progress", "never", "--at", "10x", "--key-bases", ks, p1, p2).Output()
			if err != nil {
				log.Fatalf("headroom --key-bases %s: %v", ks, err)
			}
			lines := strings.Split(strings.TrimSpace(string(out)), "\n")
			head, row := strings.Split(lines[0], "\t"), strings.Split(lines[1], "\t")
			col := func(n string) string {
				for i, h := range head {
					if h == n {
						return row[i]
					}
				}
				return ""
			}
			d, _ := strconv.ParseFloat(col("distinct"), 64)
			d10, _ := strconv.ParseFloat(col("distinct_10x"), 64)
			note := col("notes")
			if i := strings.Index(note, "read keys"); i >= 0 {
				note = "merged: " + strings.Fields(note[max(0, i-12):])[0]
			} else {
				note = ""
			}
			fmt.Printf("%s\t%s\t%.0f\t%+.2f%%\t%.0f\t%+.2f%%\t%s\n", rs, ks, d, 100*(d/truth-1), d10, 100*(d10/truth10-1), note)
		}
		os.Remove(p1)
		os.Remove(p2)
	}
}
