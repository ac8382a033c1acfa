package main

import (
	"fmt"
	"io"
	"sync/atomic"
	"time"

	"github.com/schollz/progressbar/v3"
)

// progress returns the dedup.Options.Progress callback that draws one bar
// per input on w over its compressed bytes.
func (f *readsFiles) progress(w io.Writer) func(i int, records int64, done bool) {
	f.bars = make([]*progressbar.ProgressBar, len(f.inputs))
	return func(i int, records int64, done bool) {
		bar := f.bars[i]
		if bar == nil {
			bar = progressbar.NewOptions64(f.sizes[i],
				progressbar.OptionSetWriter(w),
				progressbar.OptionSetDescription(f.inputs[i].Name),
				progressbar.OptionShowBytes(true),
				progressbar.OptionShowCount(),
				progressbar.OptionThrottle(200*time.Millisecond),
				progressbar.OptionSetWidth(30),
				progressbar.OptionClearOnFinish(),
			)
			f.bars[i] = bar
		}
		if done {
			bar.Finish()
			f.bars[i] = nil
			return
		}
		if records > 0 {
			bar.Describe(fmt.Sprintf("%s: %d records", f.inputs[i].Name, records))
			bar.Set64(f.counts[i].n.Load())
		}
	}
}

// readsCountingReader counts the compressed bytes read, for progress.
type readsCountingReader struct {
	r io.Reader
	n atomic.Int64
}

func (c *readsCountingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n.Add(int64(n))
	return n, err
}
