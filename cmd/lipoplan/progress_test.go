package main

import (
	"bytes"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// tick is a clock that moves on by step at every reading.
func tick(step time.Duration) func() time.Time {
	t := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	return func() time.Time { t = t.Add(step); return t }
}

// Neither a pipe nor a regular file is a terminal, so progress goes
// nowhere when standard error is piped or redirected.
func TestIsTerminalNotForPipesOrFiles(t *testing.T) {
	r, w, err := os.Pipe()
	require.NoError(t, err)
	defer r.Close()
	defer w.Close()
	assert.False(t, isTerminal(w))
	f, err := os.Create(filepath.Join(t.TempDir(), "log"))
	require.NoError(t, err)
	defer f.Close()
	assert.False(t, isTerminal(f))
}

// The bar waits progressDelay before it draws, redraws at most every
// progressEvery, shows done/total in % and erases its line at the end; off
// a terminal it hands out no callback and writes nothing.
func TestProgressBar(t *testing.T) {
	var b bytes.Buffer
	a := &app{stderr: &b, stderrTerm: true, clock: tick(50 * time.Millisecond)}
	bar := a.progress("sweep")
	cb := bar.callback()
	require.NotNil(t, cb)
	for i := 0; i <= 40; i++ {
		cb(i, 40)
	}
	out := b.String()
	draws := strings.Count(out, "\r")
	// 41 calls 50 ms apart: none before 300 ms, then every other one.
	assert.InDelta(t, 18, draws, 1, out)
	line := regexp.MustCompile(`^sweep \[(#*)(\.*)\] +(\d+) %  (\d+\.\d) s$`)
	last := -1
	for _, l := range strings.Split(out, "\r")[1:] {
		m := line.FindStringSubmatch(l)
		require.NotNil(t, m, "%q", l)
		assert.Equal(t, progressWidth, len(m[1])+len(m[2]), l)
		pct, _ := strconv.Atoi(m[3])
		assert.Greater(t, pct, last, "the share drawn rises")
		assert.Equal(t, progressWidth*pct/100, len(m[1]), "%q: the bar matches the figure", l)
		last = pct
	}
	assert.Contains(t, out, "  0.3 s", "the first draw after progressDelay")
	bar.finish()
	assert.True(t, strings.HasSuffix(b.String(), "\r\x1b[K"), "the bar's line is erased")

	b.Reset()
	quiet := (&app{stderr: &b, clock: tick(time.Second)}).progress("sweep")
	assert.Nil(t, quiet.callback(), "off a terminal the work is not asked to report")
	quiet.update(1, 2)
	quiet.finish()
	assert.Empty(t, b.String())
}

// End to end: a sweep with integer rules (solved step by step) and a solve
// with integer rules draw the bar on a standard error that is a terminal
// and print the same report as without one; on a standard error that is
// not, they write nothing there.
func TestProgressEndToEnd(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "rules.toml")
	require.NoError(t, os.WriteFile(spec, append(catalogue.DemoFiles()["laminating.toml"], "\n[rules]\nmax_stocks = 3\nsmallest_share = 5.0\n"...), 0o644))
	for _, args := range [][]string{
		{"sweep", "--spec", spec, "--price", "palm,palm-olein=-10%:+20%:7"},
		{"solve", "--spec", spec},
	} {
		var out, errb bytes.Buffer
		code := (&app{stdout: &out, stderr: &errb, stderrTerm: true, clock: tick(time.Second)}).main(args)
		require.Equal(t, 0, code, errb.String())
		assert.Contains(t, errb.String(), "%", args)
		assert.True(t, strings.HasSuffix(errb.String(), "\r\x1b[K"), "%v: the bar is erased at the end", args)
		code, plain, errs := run(t, args...)
		require.Equal(t, 0, code)
		assert.Empty(t, errs, "%v: nothing on a standard error that is not a terminal", args)
		assert.Equal(t, plain, out.String(), args)
	}
}
