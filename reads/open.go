package reads

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/klauspost/compress/flate"
	"github.com/klauspost/compress/gzip"
)

// Format is a file format recognised by Open.
type Format int

// Formats recognised by Open.
const (
	FormatUnknown Format = iota
	FormatBAM
	FormatSAM
	FormatFASTQ
)

func (f Format) String() string {
	switch f {
	case FormatBAM:
		return "BAM"
	case FormatSAM:
		return "SAM"
	case FormatFASTQ:
		return "FASTQ"
	}
	return "unknown"
}

// Compression is the compression of an input stream.
type Compression int

// Compressions recognised by Open.
const (
	Uncompressed Compression = iota
	Gzip                     // RFC 1952, one or more members
	BGZF                     // blocked gzip (SAM specification section 4.1)
)

func (c Compression) String() string {
	switch c {
	case Gzip:
		return "gzip"
	case BGZF:
		return "BGZF"
	}
	return "uncompressed"
}

// Sentinel errors of Open and the readers.
var (
	ErrEmpty     = errors.New("reads: empty input")
	ErrCRAM      = errors.New("reads: CRAM is not supported; convert it to BAM first (samtools view -b -T REF.fa -o FILE.bam FILE.cram)")
	ErrUnknown   = errors.New("reads: not BAM, SAM or FASTQ")
	ErrTruncated = errors.New("reads: input ends early (truncated file?)")
	ErrNoEOF     = errors.New("reads: BGZF end-of-file marker missing: the file is truncated (re-copy or regenerate it)")
)

// maxBlockReaders bounds the BGZF inflating goroutines of one stream.
const maxBlockReaders = 64

// bgzfEOF is the 28-byte empty block that ends every BGZF file (SAM
// specification section 4.1.2).
var bgzfEOF = []byte("\x1f\x8b\x08\x04\x00\x00\x00\x00\x00\xff\x06\x00\x42\x43\x02\x00\x1b\x00\x03\x00\x00\x00\x00\x00\x00\x00\x00\x00")

// Input is an opened, decompressed input stream of a known format.
type Input struct {
	Format      Format
	Compression Compression

	r     *bufio.Reader
	dec   io.Reader // the decompressed stream under r
	bg    *bgzfReader
	gz    *gzip.Reader
	async *asyncReader
	tail  *tailReader
}

// Open recognises the compression and format of r from its first bytes and
// returns the decompressed stream. threads bounds the goroutines used to
// decompress: BGZF blocks are inflated in parallel (threads goroutines,
// see bgzf.go), and a gzip stream is inflated ahead of
// the parser in its own goroutine when threads > 1.
func Open(r io.Reader, threads int) (*Input, error) {
	if threads < 1 {
		threads = 1
	}
	in := &Input{}
	raw := bufio.NewReaderSize(r, 1<<16)
	head, err := raw.Peek(18)
	if len(head) == 0 {
		if err != nil && err != io.EOF {
			return nil, err
		}
		return nil, ErrEmpty
	}
	var dec io.Reader
	switch {
	case bytes.HasPrefix(head, []byte("CRAM")):
		return nil, ErrCRAM
	case len(head) >= 2 && head[0] == 0x1f && head[1] == 0x8b:
		if len(head) >= 16 && head[3]&4 != 0 && head[12] == 'B' && head[13] == 'C' {
			in.Compression = BGZF
			in.tail = &tailReader{r: raw}
			// 4 × threads goroutines inflate blocks (one, in Read, for
			// threads = 1), with twice as many blocks in flight so the
			// parser rarely waits (bgzf.go). More inflaters than cores
			// keep the cores busy while the parser takes one: on 2 cores
			// the sorted bench BAM took 1.30 s with 4 inflaters against
			// 1.42 s with 2, the same CPU, and later (five alternating
			// runs each, medians) 1.42 s with 4, 1.34 s with 6, 1.31 s
			// with 8, for 2 MB more memory (BENCHMARKS.md section 2). At
			// most maxBlockReaders, each holding an inflater and two
			// 64 KiB buffers per block in flight.
			workers := threads
			if threads > 1 {
				workers = 4 * threads
			}
			in.bg = newBGZFReader(in.tail, min(workers, maxBlockReaders))
			dec = in.bg
		} else {
			in.Compression = Gzip
			in.gz, err = gzip.NewReader(raw)
			if err != nil {
				return nil, wrapInflate(err)
			}
			dec = in.gz
			if threads > 1 {
				in.async = newAsyncReader(in.gz)
				dec = in.async
			}
		}
	default:
		dec = raw
	}
	in.dec = &errReader{r: dec}
	in.r = bufio.NewReaderSize(in.dec, 1<<20)
	b, err := in.r.Peek(4)
	if len(b) == 0 {
		if err != nil && err != io.EOF {
			return nil, err
		}
		if in.Compression != Uncompressed {
			if err := in.CheckEnd(); err != nil {
				return nil, err
			}
		}
		return nil, ErrEmpty
	}
	switch {
	case bytes.Equal(b, []byte("BAM\x01")):
		in.Format = FormatBAM
	case bytes.HasPrefix(b, []byte("CRAM")):
		return nil, ErrCRAM
	case b[0] == '@':
		if len(b) == 4 && b[1] >= 'A' && b[1] <= 'Z' && b[2] >= 'A' && b[2] <= 'Z' && b[3] == '\t' {
			in.Format = FormatSAM
		} else {
			in.Format = FormatFASTQ
		}
	default:
		// A SAM file without header: a first line of at least 11 tab-separated fields.
		line, _ := in.r.Peek(4096)
		if i := bytes.IndexByte(line, '\n'); i >= 0 {
			line = line[:i]
		}
		if bytes.Count(line, []byte{'\t'}) >= 10 && isText(line) {
			in.Format = FormatSAM
		} else if what, use := tableKind(in.r); what != "" {
			return nil, fmt.Errorf("%w: this looks like %s; use %s", ErrUnknown, what, use)
		} else {
			return nil, fmt.Errorf("%w (first bytes %q); give a BAM, SAM or FASTQ file, plain or gzip-compressed", ErrUnknown, printable(b))
		}
	}
	return in, nil
}

// Reader returns the decompressed stream.
func (in *Input) Reader() *bufio.Reader { return in.r }

// Unbuffered returns the decompressed stream without Reader's buffer, for
// a parser that keeps its own (FASTQReader), saving a copy of every byte.
// Call it at most once, before anything was read from Reader.
func (in *Input) Unbuffered() io.Reader {
	n := in.r.Buffered()
	head, _ := in.r.Peek(n)
	return io.MultiReader(bytes.NewReader(append([]byte(nil), head...)), in.dec)
}

// CheckEnd reports whether the input ended properly. Call it after the
// decompressed stream returned io.EOF: a BGZF file must end with the
// end-of-file marker block, or it was cut at a block boundary.
func (in *Input) CheckEnd() error {
	if in.Compression == BGZF && !in.tail.endsWith(bgzfEOF) {
		return ErrNoEOF
	}
	return nil
}

// Close releases the decompression goroutines.
func (in *Input) Close() error {
	if in.async != nil {
		in.async.close()
	}
	if in.bg != nil {
		return in.bg.Close()
	}
	return nil
}

// tableKind recognises the tables of the other headroom commands given
// to the reads reader by mistake: a BIOM table (JSON, BIOM 1.0; or HDF5,
// BIOM 2, by the HDF5 file signature) or a delimited taxon table (a first
// column named like #OTU ID, taxon, ASV, feature or sample with many
// columns) for headroom taxa; a frequency table (columns such as
// times_seen and units, or rows of two or three numbers) for headroom
// counts. It returns "" when the text is none of them.
func tableKind(r *bufio.Reader) (what, use string) {
	head, _ := r.Peek(4096)
	if bytes.HasPrefix(head, []byte("\x89HDF")) {
		return "a BIOM 2 (HDF5) taxon table", "headroom taxa"
	}
	t := bytes.TrimLeft(head, " \t\r\n")
	if len(t) > 0 && t[0] == '{' && (bytes.Contains(t, []byte("Biological Observation Matrix")) || bytes.Contains(t, []byte("\"rows\""))) {
		return "a BIOM taxon table", "headroom taxa"
	}
	if !isText(bytes.ReplaceAll(head, []byte{'\n'}, nil)) {
		return "", ""
	}
	for _, line := range bytes.Split(head, []byte{'\n'}) {
		line = bytes.TrimRight(line, "\r")
		low := bytes.ToLower(line)
		if len(line) == 0 || line[0] == '#' && !bytes.HasPrefix(low, []byte("#otu")) {
			continue
		}
		f := bytes.FieldsFunc(low, func(c rune) bool { return c == '\t' || c == ',' })
		if len(f) == 0 {
			return "", ""
		}
		first := string(bytes.Trim(f[0], "\" #"))
		switch {
		case bytes.Contains(low, []byte("times_seen")) || bytes.Contains(low, []byte("frequency")) && len(f) <= 4:
			return "a frequency table", "headroom counts"
		case len(f) >= 3 && (strings.HasPrefix(first, "otu") || strings.HasPrefix(first, "taxon") || strings.HasPrefix(first, "asv") ||
			strings.HasPrefix(first, "feature") || strings.HasPrefix(first, "sample")):
			return "a taxon table", "headroom taxa"
		case len(f) >= 2 && len(f) <= 3 && numeric(f):
			return "a frequency table", "headroom counts"
		}
		return "", ""
	}
	return "", ""
}

func numeric(fields [][]byte) bool {
	for _, f := range fields {
		if _, ok := atoi(bytes.TrimSpace(f), 1<<62); !ok {
			return false
		}
	}
	return true
}

func isText(b []byte) bool {
	for _, c := range b {
		if c < 0x20 && c != '\t' && c != '\r' || c > 0x7e {
			return false
		}
	}
	return true
}

func printable(b []byte) string {
	out := make([]byte, len(b))
	for i, c := range b {
		if c < 0x20 || c > 0x7e {
			c = '.'
		}
		out[i] = c
	}
	return string(out)
}

// wrapInflate turns decompression errors into errors that say what to do.
func wrapInflate(err error) error {
	switch {
	case err == nil, err == io.EOF:
		return err
	case errors.Is(err, io.ErrUnexpectedEOF):
		return ErrTruncated
	case errors.Is(err, gzip.ErrChecksum), errors.Is(err, errBGZFCRC):
		return fmt.Errorf("reads: compressed data corrupted (CRC mismatch); re-copy or regenerate the file")
	case errors.Is(err, gzip.ErrHeader), errors.Is(err, errBGZFHeader), errors.Is(err, errBGZFSize):
		return fmt.Errorf("reads: compressed data corrupted (%w); re-copy or regenerate the file", err)
	}
	var corrupt flate.CorruptInputError
	var internal flate.InternalError
	if errors.As(err, &corrupt) || errors.As(err, &internal) {
		return fmt.Errorf("reads: compressed data corrupted (%w); re-copy or regenerate the file", err)
	}
	return err
}

// errReader maps decompression errors to wrapInflate's messages. An error
// that comes with data is held back to the next call, so that every parser
// sees all the data before it (and reports the same line whatever the
// decompression path: io.Reader allows either way).
type errReader struct {
	r       io.Reader
	pending error
}

func (e *errReader) Read(p []byte) (int, error) {
	if e.pending != nil {
		return 0, e.pending
	}
	n, err := e.r.Read(p)
	err = wrapInflate(err)
	if n > 0 && err != nil {
		e.pending, err = err, nil
	}
	return n, err
}

// tailReader remembers the last bytes read through it, to check the BGZF
// end-of-file marker without seeking (so stdin works too). The BGZF
// reader serialises access to its source, so no lock is needed.
type tailReader struct {
	r    io.Reader
	last [28]byte
	n    int
}

func (t *tailReader) Read(p []byte) (int, error) {
	n, err := t.r.Read(p)
	if n > 0 {
		b := p[:n]
		if len(b) >= len(t.last) {
			copy(t.last[:], b[len(b)-len(t.last):])
			t.n = len(t.last)
		} else {
			keep := len(t.last) - len(b)
			copy(t.last[:], t.last[len(t.last)-keep:])
			copy(t.last[keep:], b)
			t.n += len(b)
			if t.n > len(t.last) {
				t.n = len(t.last)
			}
		}
	}
	return n, err
}

func (t *tailReader) endsWith(m []byte) bool {
	return t.n == len(t.last) && bytes.Equal(t.last[:], m)
}
