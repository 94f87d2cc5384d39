package main

import (
	"fmt"
	"io"
	"os"
	"strings"
	"time"
)

// Progress bars: long work (branch and bound over many stocks, long
// sweeps) draws one line on standard error while it runs, only when
// standard error is a terminal, so that nothing reaches a pipe or a file.
const (
	progressDelay = 300 * time.Millisecond // no bar for work shorter than this
	progressEvery = 100 * time.Millisecond // at most ten redraws a second
	progressWidth = 30                     // characters of the bar itself
)

// progressBar draws done/total as a bar on one terminal line, throttled,
// and erases it when the work ends.
type progressBar struct {
	w           io.Writer // nil: not a terminal, draw nothing
	label       string
	now         func() time.Time
	start, last time.Time
	drawn       bool
}

// isTerminal reports whether f is a character device (a terminal), the
// test colorAllowed makes for colour.
func isTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// progress starts a bar labelled label on standard error; it draws
// nothing unless standard error is a terminal.
func (a *app) progress(label string) *progressBar {
	now := a.now()
	b := &progressBar{label: label, now: now, start: now()}
	if a.stderrTerm {
		b.w = a.stderr
	}
	return b
}

// now is the app's clock: a.clock, or time.Now when none is set.
func (a *app) now() func() time.Time {
	if a.clock != nil {
		return a.clock
	}
	return time.Now
}

// callback is the function to hand to optimise.Options.Progress: nil when
// nothing is drawn, so the work is not even told to report.
func (b *progressBar) callback() func(done, total int) {
	if b.w == nil {
		return nil
	}
	return b.update
}

// update redraws the bar for done of total, no sooner than progressDelay
// after the start and progressEvery after the last redraw.
func (b *progressBar) update(done, total int) {
	if b.w == nil || total <= 0 {
		return
	}
	t := b.now()
	if t.Sub(b.start) < progressDelay || b.drawn && t.Sub(b.last) < progressEvery {
		return
	}
	done = min(max(done, 0), total)
	n := progressWidth * done / total
	fmt.Fprintf(b.w, "\r%s [%s%s] %3d %%  %.1f s", b.label, strings.Repeat("#", n), strings.Repeat(".", progressWidth-n),
		100*done/total, t.Sub(b.start).Seconds())
	b.drawn, b.last = true, t
}

// finish erases the bar, if one was drawn.
func (b *progressBar) finish() {
	if b.drawn {
		fmt.Fprint(b.w, "\r\x1b[K")
		b.drawn = false
	}
}
