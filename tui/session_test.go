package tui

import (
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// TestSessionCloseDoesNotWait: leaving the workspace (close) while one of
// its solves is still running returns at once instead of waiting for the
// solve; that solve frees the Solver when it ends, and later solves are
// fresh ones with the same answer as optimise.Solve. The solve is held
// inside branch and bound by its progress callback until close is back.
func TestSessionCloseDoesNotWait(t *testing.T) {
	cat := catalogue.DemoStocks()
	spec := *catalogue.DemoSpecs()[0]
	spec.Rules.MaxStocks = 3
	ss := newSessionSolver()
	started, release := make(chan struct{}), make(chan struct{})
	var once sync.Once
	hold := func(done, total int) { once.Do(func() { close(started); <-release }) }
	type answer struct {
		r   *optimise.Result
		err error
	}
	solved := make(chan answer, 1)
	go func() {
		r, err := ss.solve(cat, &spec, optimise.Options{Progress: hold})
		solved <- answer{r, err}
	}()
	<-started
	closed := make(chan struct{})
	go func() {
		ss.close()
		close(closed)
	}()
	select {
	case <-closed:
	case <-time.After(20 * time.Second):
		close(release)
		t.Fatal("close waited for the solve still running")
	}
	close(release)
	got := <-solved
	require.NoError(t, got.err)
	require.Equal(t, optimise.Optimal, got.r.Status)
	require.Nil(t, ss.take(), "the solve that ended after close kept the Solver instead of freeing it")

	want, err := optimise.Solve(cat, &spec, optimise.Options{})
	require.NoError(t, err)
	again, err := ss.solve(cat, &spec, optimise.Options{})
	require.NoError(t, err)
	require.InDelta(t, want.CostPerTonne, again.CostPerTonne, 1e-9)
	require.InDelta(t, want.CostPerTonne, got.r.CostPerTonne, 1e-9)
}
