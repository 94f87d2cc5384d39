//go:build coin && linux

package coin

import (
	"os"
	"runtime/debug"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// rss is the resident set size in bytes (/proc/self/statm, field 2 in pages; proc(5)).
func rss(t *testing.T) int64 {
	b, err := os.ReadFile("/proc/self/statm")
	require.NoError(t, err)
	pages, err := strconv.ParseInt(strings.Fields(string(b))[1], 10, 64)
	require.NoError(t, err)
	return pages * int64(os.Getpagesize())
}

// TestCloseFreesModels: 10,000 create-load-solve-close cycles leave the
// resident set where it was, while keeping just 1,000 models open (the
// control) grows it measurably, so the measurement would catch a missing
// Clp_deleteModel.
func TestCloseFreesModels(t *testing.T) {
	if testing.Short() {
		t.Skip("memory soak skipped in -short mode")
	}
	p := paperLP()
	cycle := func(n int) {
		for i := 0; i < n; i++ {
			lp := NewLP()
			require.NoError(t, lp.Load(p))
			require.Equal(t, Optimal, lp.Solve())
			lp.Close()
		}
		debug.FreeOSMemory()
	}
	cycle(1000)
	before := rss(t)
	cycle(10000)
	grew := rss(t) - before
	t.Logf("10,000 closed models: resident set grew by %d kB", grew/1024)
	assert.Less(t, grew, int64(3<<20))

	before = rss(t)
	open := make([]*LP, 0, 1000)
	for i := 0; i < 1000; i++ {
		lp := NewLP()
		require.NoError(t, lp.Load(p))
		lp.Solve()
		open = append(open, lp)
	}
	leaked := rss(t) - before
	for _, lp := range open {
		lp.Close()
	}
	t.Logf("control, 1,000 models left open: resident set grew by %d kB", leaked/1024)
	assert.Greater(t, leaked, int64(6<<20), "the control leak should be visible")
}
