//go:build ignore

// bench_reads_gen writes the benchmark inputs of scripts/bench_reads.sh: a
// coordinate-sorted paired BAM and the same read pairs as two gzip FASTQ
// files. Invented data: random reference, a library of PAIRS read pairs
// drawn from a pool of molecules with PCR duplicates, 150 bp reads with
// binned qualities, Illumina-style names with flow-cell positions.
//
//	go run scripts/bench_reads_gen.go -pairs 1100000 -out /tmp/headroom-bench
//
// -chimeric F puts the reverse mate of a share F of the molecules on
// another reference (as chimeric or discordant pairs are), for the memory
// bound of the sorted path (scripts/bench_memory_stdin.sh).
package main

import (
	"bufio"
	"compress/gzip"
	"flag"
	"fmt"
	"log"
	"math/rand/v2"
	"os"
	"path/filepath"
	"sort"
	"time"

	"github.com/biogo/hts/bam"
	"github.com/biogo/hts/sam"
)

const readLen = 150

type pair struct {
	name       string
	ref        int
	mref       int // reference of the reverse mate
	left       int // leftmost base of the forward mate
	right      int // leftmost base of the reverse mate
	seq1, seq2 []byte
	q1, q2     []byte
	clip1      int
}

func main() {
	pairs := flag.Int("pairs", 1100000, "read pairs")
	out := flag.String("out", "/tmp/headroom-bench", "output folder")
	seed := flag.Uint64("seed", 7, "random seed")
	withFASTQ := flag.Bool("fastq", true, "also write the pairs as gzip FASTQ")
	chimeric := flag.Float64("chimeric", 0, "share of molecules whose reverse mate lies on another reference")
	flag.Parse()
	if err := os.MkdirAll(*out, 0o755); err != nil {
		log.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(*seed, 99))
	refLens := []int{60_000_000, 50_000_000, 40_000_000}
	var refs []*sam.Reference
	for i, l := range refLens {
		r, err := sam.NewReference(fmt.Sprintf("bench%d", i+1), "", "", l, nil, nil)
		if err != nil {
			log.Fatal(err)
		}
		refs = append(refs, r)
	}
	h, err := sam.NewHeader(nil, refs)
	if err != nil {
		log.Fatal(err)
	}
	h.Version = "1.6" // biogo writes @HD only with a version
	h.SortOrder = sam.Coordinate
	rg, _ := sam.NewReadGroup("bench.L1", "", "", "BENCH-LIB", "", "ILLUMINA", "", "S1", "", "", time.Time{}, 0)
	h.AddReadGroup(rg)

	// Pool of molecules: about 70 % of pairs are distinct.
	pool := *pairs * 7 / 10
	bases := []byte("ACGT")
	quals := []byte("F:,F#FFFF") // binned qualities, mostly F
	ps := make([]pair, 0, *pairs)
	for i := 0; i < *pairs; i++ {
		m := rng.IntN(pool)
		mr := rand.New(rand.NewPCG(uint64(m), 1))
		ref := mr.IntN(len(refLens))
		left := 1000 + mr.IntN(refLens[ref]-3000)
		flen := 250 + mr.IntN(300)
		p := pair{
			name:  fmt.Sprintf("BEN1:1:HBENCHXX:%d:%d:%d:%d", 1+rng.IntN(2), 1101+rng.IntN(60), rng.IntN(32000), rng.IntN(32000)),
			ref:   ref,
			left:  left,
			right: left + flen - readLen,
			seq1:  make([]byte, readLen), seq2: make([]byte, readLen),
			q1: make([]byte, readLen), q2: make([]byte, readLen),
		}
		for j := 0; j < readLen; j++ {
			p.seq1[j] = bases[mr.IntN(4)]
			p.seq2[j] = bases[mr.IntN(4)]
			p.q1[j] = quals[rng.IntN(len(quals))]
			p.q2[j] = quals[rng.IntN(len(quals))]
		}
		p.mref = ref
		if *chimeric > 0 && mr.Float64() < *chimeric { // drawn last: -chimeric 0 writes the same file as before
			p.mref = (ref + 1 + mr.IntN(len(refLens)-1)) % len(refLens)
			p.right = 1000 + mr.IntN(refLens[p.mref]-3000)
		}
		if rng.IntN(10) == 0 {
			p.clip1 = 1 + rng.IntN(10)
		}
		ps = append(ps, p)
	}

	// FASTQ, in generation order.
	writeFQ := func(path string, mate int) {
		f, err := os.Create(path)
		if err != nil {
			log.Fatal(err)
		}
		z := gzip.NewWriter(f)
		w := bufio.NewWriterSize(z, 1<<20)
		for _, p := range ps {
			s, q := p.seq1, p.q1
			if mate == 2 {
				s, q = p.seq2, p.q2
			}
			fmt.Fprintf(w, "@%s/%d\n%s\n+\n%s\n", p.name, mate, s, q)
		}
		w.Flush()
		z.Close()
		f.Close()
	}
	if *withFASTQ {
		writeFQ(filepath.Join(*out, "bench_R1.fastq.gz"), 1)
		writeFQ(filepath.Join(*out, "bench_R2.fastq.gz"), 2)
	}

	// BAM, coordinate-sorted.
	type rec struct {
		ref, pos int
		r        *sam.Record
	}
	recs := make([]rec, 0, 2**pairs)
	for _, p := range ps {
		c1 := []sam.CigarOp{sam.NewCigarOp(sam.CigarMatch, readLen)}
		pos1 := p.left
		if p.clip1 > 0 {
			c1 = []sam.CigarOp{sam.NewCigarOp(sam.CigarSoftClipped, p.clip1), sam.NewCigarOp(sam.CigarMatch, readLen-p.clip1)}
			pos1 += p.clip1
		}
		c2 := []sam.CigarOp{sam.NewCigarOp(sam.CigarMatch, readLen)}
		mc1, _ := sam.NewAux(sam.NewTag("MC"), sam.Cigar(c2).String())
		mc2, _ := sam.NewAux(sam.NewTag("MC"), sam.Cigar(c1).String())
		rga, _ := sam.NewAux(sam.NewTag("RG"), "bench.L1")
		tlen := p.right + readLen - p.left
		proper := sam.ProperPair
		if p.mref != p.ref {
			tlen, proper = 0, 0
		}
		r1, err := sam.NewRecord(p.name, refs[p.ref], refs[p.mref], pos1, p.right, tlen, 60, c1, p.seq1, qualBytes(p.q1), []sam.Aux{mc1, rga})
		if err != nil {
			log.Fatal(err)
		}
		r1.Flags = sam.Paired | proper | sam.MateReverse | sam.Read1
		r2, err := sam.NewRecord(p.name, refs[p.mref], refs[p.ref], p.right, pos1, -tlen, 60, c2, p.seq2, qualBytes(p.q2), []sam.Aux{mc2, rga})
		if err != nil {
			log.Fatal(err)
		}
		r2.Flags = sam.Paired | proper | sam.Reverse | sam.Read2
		recs = append(recs, rec{p.ref, pos1, r1}, rec{p.mref, p.right, r2})
	}
	sort.SliceStable(recs, func(i, j int) bool {
		if recs[i].ref != recs[j].ref {
			return recs[i].ref < recs[j].ref
		}
		return recs[i].pos < recs[j].pos
	})
	f, err := os.Create(filepath.Join(*out, "bench.bam"))
	if err != nil {
		log.Fatal(err)
	}
	bw, err := bam.NewWriter(f, h, 2)
	if err != nil {
		log.Fatal(err)
	}
	for _, r := range recs {
		if err := bw.Write(r.r); err != nil {
			log.Fatal(err)
		}
	}
	if err := bw.Close(); err != nil {
		log.Fatal(err)
	}
	f.Close()
	fmt.Printf("wrote %d pairs (%d BAM records) to %s\n", len(ps), len(recs), *out)
}

func qualBytes(q []byte) []byte {
	b := make([]byte, len(q))
	for i, c := range q {
		b[i] = c - 33
	}
	return b
}
