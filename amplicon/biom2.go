package amplicon

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"

	"headroom/internal/hdf5"
)

// biomBatch is how many elements of a BIOM 2.1 dataset are read at once
// (a variable so that a test can make every batch boundary occur).
var biomBatch = 1 << 16

// readBIOM2 reads a BIOM 2.1 table (BIOM format specification, version
// 2.1) from the HDF5 file r of size bytes. It streams sample/matrix, the
// matrix stored by sample (CSC: sample i's counts are
// data[indptr[i]:indptr[i+1]] of taxa indices[...]), so memory holds one
// sample's accumulator, the IDs and one taxon total per taxon.
func readBIOM2(r io.ReaderAt, size int64) (*Table, error) {
	f, err := hdf5.Open(r, size)
	if err != nil {
		return nil, h5err(err)
	}
	b := &biom2{f: f}
	t, err := b.read()
	if err != nil {
		return nil, h5err(err)
	}
	return t, nil
}

// h5err turns an *hdf5.Error into a ParseError naming the object.
func h5err(err error) error {
	var he *hdf5.Error
	if !errors.As(err, &he) {
		return err
	}
	where := "HDF5: "
	if he.Path != "" {
		where = "HDF5 object " + he.Path + ": "
	}
	switch {
	case errors.Is(err, hdf5.ErrUnsupported):
		return perr(0, 0, ErrHDF5, "%sHDF5 feature not supported: %s; convert the table to TSV or BIOM 1.0 JSON "+
			"(biom convert --to-tsv or --to-json)", where, he.Msg)
	case errors.Is(err, hdf5.ErrNotFound):
		return perr(0, 0, ErrSyntax, "%s%s: a BIOM 2.1 table has groups /observation and /sample, each with ids and "+
			"matrix/data, matrix/indices, matrix/indptr (BIOM format specification 2.1)", where, he.Msg)
	case errors.Is(err, hdf5.ErrType):
		return perr(0, 0, ErrNotCount, "%s%s", where, he.Msg)
	}
	return perr(0, 0, ErrTruncated, "%s%s", where, he.Msg)
}

type biom2 struct {
	f *hdf5.File
}

func (b *biom2) dataset(path string) (*hdf5.Dataset, error) { return b.f.Dataset(path) }

// malformed is an error in the BIOM 2.1 structure at an object.
func malformed(path string, kind error, format string, args ...any) *ParseError {
	return perr(0, 0, kind, "HDF5 object %s: %s", path, fmt.Sprintf(format, args...))
}

func (b *biom2) read() (*Table, error) {
	root, err := b.f.Root()
	if err != nil {
		return nil, err
	}
	for _, g := range []string{"/observation", "/sample"} {
		if _, err := b.f.Lookup(g); errors.Is(err, hdf5.ErrNotFound) {
			return nil, perr(0, 0, ErrSyntax, "an HDF5 file, but not a BIOM 2.1 table: it has no %s group "+
				"(BIOM format specification 2.1)", g)
		} else if err != nil {
			return nil, err
		}
	}
	if a, err := root.Attr("format-version"); err == nil {
		v, err := a.Ints()
		if err != nil || len(v) != 2 || v[0] != 2 {
			return nil, malformed("/", ErrSyntax, "attribute format-version is %v, BIOM 2.x expected", v)
		}
	}
	taxa, err := b.ids("/observation/ids", "taxon")
	if err != nil {
		return nil, err
	}
	samples, err := b.ids("/sample/ids", "sample")
	if err != nil {
		return nil, err
	}
	nobs, nsamp := int64(len(taxa)), int64(len(samples))
	if a, err := root.Attr("shape"); err == nil {
		if v, err := a.Ints(); err != nil || len(v) != 2 || v[0] != nobs || v[1] != nsamp {
			return nil, malformed("/", ErrShape, "attribute shape %v does not match %d taxa in /observation/ids and %d samples in /sample/ids", v, nobs, nsamp)
		}
	}
	if nsamp == 0 {
		return nil, perr(0, 0, ErrEmpty, "empty table: the BIOM 2.1 file has no samples (/sample/ids is empty)")
	}
	if nobs == 0 {
		return nil, perr(0, 0, ErrEmpty, "empty table: the BIOM 2.1 file has no taxa (/observation/ids is empty)")
	}
	nnz, err := b.matrix("/observation/matrix", nobs, -1)
	if err != nil {
		return nil, err
	}
	if a, err := root.Attr("nnz"); err == nil {
		if v, err := a.Ints(); err != nil || len(v) != 1 || v[0] != nnz {
			return nil, malformed("/", ErrShape, "attribute nnz %v does not match the %d entries of /observation/matrix", v, nnz)
		}
	}
	if _, err := b.matrix("/sample/matrix", nsamp, nnz); err != nil {
		return nil, err
	}
	return b.stream(taxa, samples)
}

// ids reads a dataset of unique IDs. biom-format writes an empty ID list
// as an empty dataset of numbers, so any empty dataset is accepted.
func (b *biom2) ids(path, what string) ([]string, error) {
	d, err := b.dataset(path)
	if err != nil {
		return nil, err
	}
	n := d.Len()
	if n > math.MaxInt32 {
		return nil, malformed(path, ErrTooLarge, "%d IDs", n)
	}
	if n == 0 {
		return []string{}, nil
	}
	ids := make([]string, 0, min(n, uint64(biomBatch)))
	seen := map[string]int{}
	buf := make([]string, biomBatch)
	for start := uint64(0); start < n; start += uint64(biomBatch) {
		part := buf[:min(uint64(biomBatch), n-start)]
		if err := d.Strings(start, part); err != nil {
			return nil, err
		}
		for _, id := range part {
			if k, dup := seen[id]; dup {
				return nil, malformed(path, ErrDuplicate, "%s ID %s repeated (entries %d and %d); IDs must be unique", what, quote(id), k, len(ids))
			}
			seen[id] = len(ids)
			ids = append(ids, id)
		}
	}
	return ids, nil
}

// matrix checks the shape of one compressed-sparse matrix group: indptr
// of n+1 entries from 0 to nnz, data and indices of nnz entries. want is
// the nnz the other matrix has (-1: not known yet). It returns nnz.
func (b *biom2) matrix(group string, n, want int64) (int64, error) {
	ip, err := b.dataset(group + "/indptr")
	if err != nil {
		return 0, err
	}
	path := group + "/indptr"
	if ip.Len() != uint64(n)+1 {
		return 0, malformed(path, ErrShape, "%d entries, want %d (one more than the %d IDs)", ip.Len(), n+1, n)
	}
	var ends [1]int64
	if err := ip.Ints(uint64(n), ends[:]); err != nil {
		return 0, err
	}
	nnz := ends[0]
	for _, name := range []string{"/data", "/indices"} {
		d, err := b.dataset(group + name)
		if err != nil {
			return 0, err
		}
		if nnz < 0 || d.Len() != uint64(nnz) {
			return 0, malformed(path, ErrShape, "last entry %d, but %s%s has %d entries", nnz, group, name, d.Len())
		}
	}
	if want >= 0 && nnz != want {
		return 0, malformed(path, ErrShape, "%d entries in the matrix, but /observation/matrix has %d", nnz, want)
	}
	return nnz, nil
}

// stream reads sample/matrix sample by sample.
func (b *biom2) stream(taxa, samples []string) (*Table, error) {
	const grp = "/sample/matrix"
	data, err := b.dataset(grp + "/data")
	if err != nil {
		return nil, err
	}
	indices, err := b.dataset(grp + "/indices")
	if err != nil {
		return nil, err
	}
	indptr, err := b.dataset(grp + "/indptr")
	if err != nil {
		return nil, err
	}
	nobs := int64(len(taxa))
	t := &Table{Format: "biom-hdf5", Layout: TaxaAsRows, Taxa: nobs}
	totals := make([]int64, nobs)
	last := make([]int32, nobs) // 1 + the last sample that had the taxon
	isInt := data.Class() == hdf5.Integer
	if c := data.Class(); c != hdf5.Integer && c != hdf5.Float {
		return nil, malformed(grp+"/data", ErrNotCount, "holds %s values; the table must hold counts", c)
	}
	var (
		ptr   = make([]int64, 0, biomBatch+1)
		vals  = make([]float64, biomBatch)
		ivals = make([]int64, biomBatch)
		idx   = make([]int64, biomBatch)
		acc   accum
	)
	ptrAt := uint64(0) // element of indptr at ptr[0]
	prev := int64(0)
	for i := range samples {
		// Keep indptr[i] and indptr[i+1] in ptr.
		if uint64(i)+1 >= ptrAt+uint64(len(ptr)) {
			ptrAt = uint64(i)
			n := min(uint64(biomBatch+1), indptr.Len()-ptrAt)
			ptr = ptr[:n]
			if err := indptr.Ints(ptrAt, ptr); err != nil {
				return nil, err
			}
		}
		lo, hi := ptr[uint64(i)-ptrAt], ptr[uint64(i)+1-ptrAt]
		if i == 0 && lo != 0 {
			return nil, malformed(grp+"/indptr", ErrSyntax, "first entry is %d, not 0", lo)
		}
		if lo != prev || hi < lo || uint64(hi) > data.Len() {
			return nil, malformed(grp+"/indptr", ErrSyntax, "entries %d and %d are %d and %d: indptr must rise from 0 to %d, "+
				"the length of %s/data", i, i+1, lo, hi, data.Len(), grp)
		}
		prev = hi
		name := samples[i]
		for at := lo; at < hi; {
			n := min(int64(biomBatch), hi-at)
			if err := indices.Ints(uint64(at), idx[:n]); err != nil {
				return nil, err
			}
			if isInt {
				err = data.Ints(uint64(at), ivals[:n])
			} else {
				err = data.Floats(uint64(at), vals[:n])
			}
			if err != nil {
				return nil, err
			}
			for k := int64(0); k < n; k++ {
				row := idx[k]
				if row < 0 || row >= nobs {
					return nil, malformed(grp+"/indices", ErrSyntax, "entry %d is taxon index %d, outside [0, %d)", at+k, row, nobs)
				}
				if last[row] == int32(i+1) {
					return nil, malformed(grp+"/indices", ErrDuplicate, "sample %s lists taxon %s twice (entry %d)", quote(name), quote(taxa[row]), at+k)
				}
				last[row] = int32(i + 1)
				var v int64
				var ce *cellErr
				if isInt {
					if v = ivals[k]; v < 0 {
						_, ce = parseCount([]byte(strconv.FormatInt(v, 10)))
					}
				} else {
					v, ce = parseCount([]byte(strconv.FormatFloat(vals[k], 'g', -1, 64)))
				}
				if ce != nil {
					return nil, malformed(grp+"/data", ce.kind, "entry %d (sample %s, taxon %s): %s", at+k, quote(name), quote(taxa[row]), ce.msg)
				}
				if v == 0 {
					continue
				}
				if !acc.add(v) || totals[row] > math.MaxInt64-v {
					return nil, malformed(grp+"/data", ErrTooLarge, "sample %s: counts add up to more than %d reads", quote(name), int64(math.MaxInt64))
				}
				totals[row] += v
			}
			at += n
		}
		c, err := acc.counts()
		if err != nil {
			return nil, perr(0, 0, ErrTooLarge, "sample %s: %v", quote(name), err)
		}
		t.Samples = append(t.Samples, Sample{Name: name, Counts: c})
		acc.reset()
	}
	var tot accum
	for _, v := range totals {
		if v > 0 {
			tot.add(v)
		}
	}
	if t.TaxonTotals, err = tot.counts(); err != nil {
		return nil, perr(0, 0, ErrTooLarge, "%v", err)
	}
	return t, nil
}

// hdf5Input returns random access to an HDF5 table given as a stream:
// the reader itself when it is a file or an in-memory reader, otherwise
// (standard input, gzip) a temporary file that the stream is copied to;
// cleanup removes it.
func hdf5Input(r io.Reader, rest io.Reader, gz bool) (io.ReaderAt, int64, func(), error) {
	if !gz {
		switch v := r.(type) {
		case *os.File:
			if st, err := v.Stat(); err == nil && st.Mode().IsRegular() {
				return v, st.Size(), func() {}, nil
			}
		case interface {
			io.ReaderAt
			Size() int64
		}:
			return v, v.Size(), func() {}, nil
		}
	}
	tmp, err := os.CreateTemp("", "headroom-*.h5")
	if err != nil {
		return nil, 0, nil, err
	}
	cleanup := func() { tmp.Close(); os.Remove(tmp.Name()) }
	n, err := io.Copy(tmp, rest)
	if err != nil {
		cleanup()
		return nil, 0, nil, err
	}
	return tmp, n, cleanup, nil
}
