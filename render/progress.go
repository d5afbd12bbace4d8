package render

import (
	"io"
	"time"

	"github.com/schollz/progressbar/v3"
)

// Progress draws a progress bar with a time estimate on w; a nil writer
// gives a silent one.
type Progress struct{ bar *progressbar.ProgressBar }

// NewProgress starts a bar of total steps described by what.
func NewProgress(w io.Writer, total int, what string) *Progress {
	if w == nil {
		return &Progress{}
	}
	return &Progress{bar: progressbar.NewOptions(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription(what),
		progressbar.OptionSetWidth(30),
		progressbar.OptionShowCount(),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionOnCompletion(func() { io.WriteString(w, "\n") }),
	)}
}

// Set moves the bar to n finished steps.
func (p *Progress) Set(n int) {
	if p.bar != nil {
		p.bar.Set(n)
	}
}

// Done completes the bar.
func (p *Progress) Done() {
	if p.bar != nil {
		p.bar.Finish()
	}
}
