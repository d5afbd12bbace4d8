package main

import (
	"io"
	"time"

	"github.com/schollz/progressbar/v3"
)

// progress draws a progress bar with a time estimate on w once the first
// step is reported; a nil writer gives a silent one.
type progress struct {
	w    io.Writer
	what string
	bar  *progressbar.ProgressBar
}

// newProgress prepares a bar described by what.
func newProgress(w io.Writer, what string) *progress { return &progress{w: w, what: what} }

// set moves the bar to done of total steps.
func (p *progress) set(done, total int) {
	if p.w == nil {
		return
	}
	if p.bar == nil {
		w := p.w
		p.bar = progressbar.NewOptions(total,
			progressbar.OptionSetWriter(w),
			progressbar.OptionSetDescription(p.what),
			progressbar.OptionSetWidth(30),
			progressbar.OptionShowCount(),
			progressbar.OptionSetPredictTime(true),
			progressbar.OptionThrottle(100*time.Millisecond),
			progressbar.OptionOnCompletion(func() { io.WriteString(w, "\n") }),
		)
	}
	p.bar.Set(done)
}

// done completes the bar, if one was drawn.
func (p *progress) done() {
	if p.bar != nil {
		p.bar.Finish()
	}
}
