package reads

import "io"

// asyncReader reads its source ahead in a goroutine, so that inflating a
// gzip stream overlaps with parsing (and two mates' files inflate on two
// cores). Chunks are recycled: memory is bounded by asyncChunks chunks.
type asyncReader struct {
	full  chan chunk
	free  chan []byte
	done  chan struct{}
	cur   []byte
	err   error
	spare []byte
}

type chunk struct {
	b   []byte
	err error
}

const (
	asyncChunkSize = 1 << 18
	asyncChunks    = 4
)

func newAsyncReader(src io.Reader) *asyncReader {
	a := &asyncReader{full: make(chan chunk, asyncChunks), free: make(chan []byte, asyncChunks+1), done: make(chan struct{})}
	for i := 0; i < asyncChunks; i++ {
		a.free <- make([]byte, asyncChunkSize)
	}
	go func() {
		defer close(a.full)
		for {
			var b []byte
			select {
			case b = <-a.free:
			case <-a.done:
				return
			}
			b = b[:cap(b)]
			n := 0
			var err error
			for n < len(b) && err == nil {
				var m int
				m, err = src.Read(b[n:])
				n += m
			}
			select {
			case a.full <- chunk{b: b[:n], err: err}:
			case <-a.done:
				return
			}
			if err != nil {
				return
			}
		}
	}()
	return a
}

func (a *asyncReader) Read(p []byte) (int, error) {
	for len(a.cur) == 0 {
		if a.err != nil {
			return 0, a.err
		}
		if a.spare != nil {
			a.free <- a.spare[:cap(a.spare)]
			a.spare = nil
		}
		c, ok := <-a.full
		if !ok {
			if a.err == nil {
				a.err = io.EOF
			}
			return 0, a.err
		}
		a.cur, a.spare, a.err = c.b, c.b, c.err
	}
	n := copy(p, a.cur)
	a.cur = a.cur[n:]
	return n, nil
}

func (a *asyncReader) close() {
	select {
	case <-a.done:
	default:
		close(a.done)
	}
}
