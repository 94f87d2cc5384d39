//go:build coin && linux

package optimise

import (
	"os"
	"runtime/debug"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// rss is the resident set size of this process in bytes, from
// /proc/self/statm (second field, in pages; proc(5)).
func rss(t *testing.T) int64 {
	t.Helper()
	b, err := os.ReadFile("/proc/self/statm")
	require.NoError(t, err)
	f := strings.Fields(string(b))
	pages, err := strconv.ParseInt(f[1], 10, 64)
	require.NoError(t, err)
	return pages * int64(os.Getpagesize())
}

// solveMany runs Solve n times and returns the growth of the resident set
// after a warm-up. Each solve creates and frees its C models; a leak of even
// one CLP model per solve (tens of kB) would add hundreds of MB over 10,000.
func solveMany(t *testing.T, n int, cat *catalogue.Catalogue, spec *catalogue.Spec) int64 {
	t.Helper()
	run := func(k int) {
		for i := 0; i < k; i++ {
			r, err := Solve(cat, spec, Options{})
			require.NoError(t, err)
			require.Equal(t, Optimal, r.Status)
		}
		debug.FreeOSMemory()
	}
	run(n / 10)
	before := rss(t)
	run(n)
	return rss(t) - before
}

func TestTenThousandSolvesDoNotGrow(t *testing.T) {
	if testing.Short() {
		t.Skip("memory soak of the C models: skipped in -short mode")
	}
	cat := catalogue.DemoStocks()
	spec, ok := catalogue.DemoSpec("laminating")
	require.True(t, ok)
	growth := solveMany(t, 10000, cat, spec)
	t.Logf("10,000 LP solves: resident set grew by %d kB", growth/1024)
	require.Less(t, growth, int64(8<<20), "resident set grew by %d kB over 10,000 solves", growth/1024)
}

func TestMILPSolvesDoNotGrow(t *testing.T) {
	if testing.Short() {
		t.Skip("memory soak of the C models: skipped in -short mode")
	}
	cat := catalogue.DemoStocks()
	spec, ok := catalogue.DemoSpec("laminating")
	require.True(t, ok)
	spec = spec.Clone()
	spec.Rules = catalogue.Rules{MaxStocks: 4, SmallestShare: 5}
	growth := solveMany(t, 200, cat, spec)
	t.Logf("200 MILP solves: resident set grew by %d kB", growth/1024)
	require.Less(t, growth, int64(8<<20), "resident set grew by %d kB over 200 MILP solves", growth/1024)
}

// TestSolverDoesNotGrow: one Solver reloading its CLP model for 10,000
// solves keeps the resident set flat as well (Clp_loadProblem replaces the
// previous problem's arrays rather than adding to them).
func TestSolverDoesNotGrow(t *testing.T) {
	if testing.Short() {
		t.Skip("memory soak of the C models: skipped in -short mode")
	}
	cat := catalogue.DemoStocks()
	lam, ok := catalogue.DemoSpec("laminating")
	require.True(t, ok)
	short, ok := catalogue.DemoSpec("shortening")
	require.True(t, ok)
	s := NewSolver()
	defer s.Close()
	run := func(k int) {
		for i := 0; i < k; i++ {
			spec := lam
			if i%2 == 1 {
				spec = short // models of two sizes in turn
			}
			r, err := s.Solve(cat, spec, Options{})
			require.NoError(t, err)
			require.Equal(t, Optimal, r.Status)
		}
		debug.FreeOSMemory()
	}
	run(1000)
	before := rss(t)
	run(10000)
	growth := rss(t) - before
	t.Logf("10,000 solves in one Solver: resident set grew by %d kB", growth/1024)
	require.Less(t, growth, int64(8<<20), "resident set grew by %d kB over 10,000 solves", growth/1024)
}
