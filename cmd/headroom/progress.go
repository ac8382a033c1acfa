package main

import (
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
)

// bar is a progress bar on stderr over a count of items, or nil when
// progress is off; its methods do nothing on nil.
type bar struct {
	mu sync.Mutex // set is called from the estimating goroutines
	b  *progressbar.ProgressBar
}

// bar starts a bar over n items of work, described by what.
func (s *shared) bar(a *app, n int, what string) *bar {
	if !s.showProgress(a) || n == 0 {
		return nil
	}
	return &bar{b: progressbar.NewOptions(n,
		progressbar.OptionSetWriter(a.stderr),
		progressbar.OptionSetDescription(what),
		progressbar.OptionShowCount(),
		progressbar.OptionThrottle(200*time.Millisecond),
		progressbar.OptionSetWidth(30),
		progressbar.OptionClearOnFinish(),
	)}
}

// set says that k items are done.
func (b *bar) set(k int) {
	if b != nil {
		b.mu.Lock()
		if int64(k) > b.b.State().CurrentNum {
			b.b.Set(k)
		}
		b.mu.Unlock()
	}
}

// finish clears the bar.
func (b *bar) finish() {
	if b != nil {
		b.b.Finish()
	}
}
