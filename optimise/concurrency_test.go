package optimise

import (
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// TestConcurrentSolves: Solve keeps no shared state, so parallel solves
// (several workspace sessions, each with Solve or a Solver of its own) must
// each get the answer a lone solve gets, for LPs and for MILPs.
func TestConcurrentSolves(t *testing.T) {
	if testing.Short() {
		t.Skip("skipped in -short mode")
	}
	cat := catalogue.DemoStocks()
	lam, ok := catalogue.DemoSpec("laminating")
	require.True(t, ok)
	rules := lam.Clone()
	rules.Rules = catalogue.Rules{MaxStocks: 3, SmallestShare: 8}
	specs := []*catalogue.Spec{lam, rules}
	want := make([]float64, len(specs))
	for i, s := range specs {
		r, err := Solve(cat, s, Options{})
		require.NoError(t, err)
		want[i] = r.CostPerTonne
	}
	var wg sync.WaitGroup
	errs := make(chan error, 8)
	for g := 0; g < 8; g++ {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			// Half the goroutines use Solve, half a Solver of their own.
			solve := Solve
			if g%2 == 1 {
				s := NewSolver()
				defer s.Close()
				solve = s.Solve
			}
			for k := 0; k < 10; k++ {
				i := (g + k) % len(specs)
				r, err := solve(cat, specs[i], Options{})
				if err != nil {
					errs <- err
					return
				}
				if !relClose(r.CostPerTonne, want[i], 1e-9) {
					errs <- assert.AnError
					return
				}
			}
		}(g)
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Fatal(err)
	}
}
