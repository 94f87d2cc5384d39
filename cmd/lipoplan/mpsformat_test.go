package main

import (
	"encoding/json"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise/lp/lptest"
)

// TestMPSFormatFixed: solve and plan with --mps-format fixed write a file
// GLPK's glpsol reads as fixed MPS (--mps) and solves to the reported
// cost; an unknown layout is bad input (exit 2) naming the flag.
func TestMPSFormatFixed(t *testing.T) {
	lptest.NeedGlpsol(t)
	dir := t.TempDir()
	mps := filepath.Join(dir, "solve.mps")
	code, out, errs := run(t, "solve", "--format", "json", "--mps", mps, "--mps-format", "fixed")
	require.Equal(t, 0, code, errs)
	var s struct {
		Cost float64 `json:"cost_per_tonne"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &s))
	g := lptest.GlpsolWith(t, mps, lptest.GlpsolOptions{Fixed: true})
	require.Equal(t, "optimal", g.Status)
	assert.InDelta(t, g.Obj, s.Cost, 1e-6*g.Obj+0.01) // JSON rounds

	mps = filepath.Join(dir, "plan.mps")
	code, out, errs = run(t, "plan", "--format", "json", "--mps", mps, "--mps-format", "fixed")
	require.Equal(t, 0, code, errs)
	var p struct {
		Total float64 `json:"total_cost"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &p))
	g = lptest.GlpsolWith(t, mps, lptest.GlpsolOptions{Fixed: true})
	require.Equal(t, "optimal", g.Status)
	assert.InDelta(t, g.Obj, p.Total, 1e-6*g.Obj+0.01)

	for _, cmd := range []string{"solve", "plan"} {
		code, _, errs = run(t, cmd, "--mps", filepath.Join(dir, "x.mps"), "--mps-format", "short")
		assert.Equal(t, 2, code, cmd)
		assert.Contains(t, errs, `--mps-format "short"`, cmd)
	}
}
