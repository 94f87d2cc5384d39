package tui

import (
	"math"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

// The workspace re-solves each edit warm, through its session's Solver;
// what it shows must be what a fresh solve of the same scenario gives: the
// same status, cost per tonne (to 1e-9 relative) and blend (to 1e-7 % of
// batch). The edits are price nudges on several stocks and limit nudges,
// up and down, on the demo laminating and shortening specs and on
// testdata/process-margarine.toml (a successive LP per solve); a fresh solve is the reference (optimise.Solve,
// itself checked against CLP and GLPK in optimise/lp).
func TestWarmEvaluationsMatchFresh(t *testing.T) {
	process, ps := catalogue.LoadSpec(filepath.Join("..", "testdata", "process-margarine.toml"), catalogue.DemoStocks())
	require.Empty(t, ps.Errors())
	models := map[string]func() *Model{
		"laminating": func() *Model { return demoModel(t, "laminating", Files{}) },
		"shortening": func() *Model { return demoModel(t, "shortening", Files{}) },
		"process":    func() *Model { return New(catalogue.DemoStocks(), process, "test", Files{}) },
	}
	for name, mk := range models {
		t.Run(name, func(t *testing.T) {
			m := mk()
			defer m.Close()
			d := newDriver(t, m, 100, 30)
			costs := map[float64]bool{}
			check := func(step string) {
				t.Helper()
				snap := m.Snapshot()
				require.False(t, m.Pending(), step)
				cat, sp := m.Scenario().Effective()
				lo, hi := chartTemps(sp)
				fresh, err := optimise.Solve(cat, sp, optimise.Options{Temps: gridTemps(sp, lo, hi), Model: m.Scenario().Model})
				require.NoError(t, err, step)
				require.NoError(t, snap.Err, step)
				got := snap.Result
				require.Equal(t, fresh.Status, got.Status, step)
				if fresh.Status != optimise.Optimal {
					return
				}
				require.InDelta(t, fresh.CostPerTonne, got.CostPerTonne, 1e-9*math.Abs(fresh.CostPerTonne), step)
				costs[math.Round(got.CostPerTonne*1e6)] = true
				share := map[string]float64{}
				for _, l := range got.Blend {
					share[l.Stock] = l.Pct
				}
				for _, l := range fresh.Blend {
					require.InDelta(t, l.Pct, share[l.Stock], 1e-7, "%s: %s", step, l.Stock)
				}
			}
			check("first solve")
			d.keys("2")
			for i, k := range []string{"<down>]]]", "<down>[[", "<down><down>]]]]", "<up>[", "[[[[[["} {
				d.keys(k)
				check("stocks edit " + k + string(rune('0'+i)))
			}
			d.keys("3")
			for i, k := range []string{"]", "<down>[[", "<down><down>]]", "<down>[", "<up><up>]]]"} {
				d.keys(k)
				check("limits edit " + k + string(rune('0'+i)))
			}
			require.Greater(t, len(costs), 3, "the edits must move the cost, or the test shows nothing")
		})
	}
}

// The reactor's throughput ([process] through, % of batch) is a row of
// the limits panel when the spec has a [process] step: set, relaxed by R's
// name for it (process.through.min) and dropped like any other limit row,
// and the solve then reports the demand as the limit process.through.min.
// The share through the reactor is checked against the feed the report
// lists (the reactor's feed is the share of the batch it processes).
func TestThroughRow(t *testing.T) {
	process, ps := catalogue.LoadSpec(filepath.Join("..", "testdata", "process-margarine.toml"), catalogue.DemoStocks())
	require.Empty(t, ps.Errors())
	process.Process.SFC = "measured" // one LP per solve: the row's plumbing, not the TAG model, is under test
	process.Process.Through = nil
	sc := NewScenario(catalogue.DemoStocks(), process)
	row := func(s *Scenario) Row {
		for _, r := range s.Rows() {
			if r.Kind == RowThrough {
				return r
			}
		}
		t.Fatal("no throughput row")
		return Row{}
	}
	r := row(sc)
	require.Equal(t, "process.through", r.Key)
	require.False(t, r.Bound.HasMin() || r.Bound.HasMax(), "no demand yet")

	with, err := sc.WithBound(r, Min, 40)
	require.NoError(t, err)
	require.NotNil(t, with.Spec.Process.Through)
	require.Equal(t, 40.0, with.Spec.Process.Through.Min)
	snap := Evaluate(with, 1)
	require.NoError(t, snap.Err)
	require.True(t, snap.Feasible())
	lim, ok := snap.Limit("process.through.min")
	require.True(t, ok, "the demand is reported as a limit")
	fed := 0.0
	for _, l := range snap.Result.Process.Feed {
		fed += l.Pct
	}
	require.GreaterOrEqual(t, fed, 40-1e-6, "at least 40 % of the batch goes through")
	require.InDelta(t, fed, lim.Value, 1e-6)

	relaxed, skipped, err := with.WithRelaxation([]optimise.Relax{{Name: "process.through.min", By: 15}})
	require.NoError(t, err)
	require.Empty(t, skipped, "R can place the throughput demand")
	require.Equal(t, 25.0, relaxed.Spec.Process.Through.Min)

	dropped, err := relaxed.WithoutRow(row(relaxed))
	require.NoError(t, err)
	require.Nil(t, dropped.Spec.Process.Through)
	_, err = sc.WithBound(r, Min, 120)
	require.Error(t, err, "more than the whole batch is refused in the loader's words")
}
