package optimise

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise/lp/lptest"
)

// TestFixedMPSAgainstGLPK: the demo blend, the demo blend with integer
// rules (max_stocks = 3, smallest_share = 5 %: binary columns between MARKER
// records) and a plan of 50 orders whose blocks are all distinct, written
// in fixed MPS, are read by GLPK's glpsol as fixed MPS (--mps) and solved
// to lipoplan's optimum (1e-7 relative); every name in them fits 8
// characters and the comment records at the top say what the replaced
// ones stand for.
func TestFixedMPSAgainstGLPK(t *testing.T) {
	needGlpsol(t)
	dir := t.TempDir()
	cat := catalogue.DemoStocks()
	spec, ok := catalogue.DemoSpec("laminating")
	require.True(t, ok)
	rules := spec.Clone()
	rules.Rules = catalogue.Rules{MaxStocks: 3, SmallestShare: 5}
	check := func(name string, b []byte, want float64) {
		path := filepath.Join(dir, name+".mps")
		require.NoError(t, os.WriteFile(path, b, 0o644))
		g := lptest.GlpsolWith(t, path, lptest.GlpsolOptions{Fixed: true})
		require.Equal(t, "optimal", g.Status, name)
		assert.True(t, relClose(want, g.Obj, 1e-7), "%s: glpsol %v, lipoplan %v", name, g.Obj, want)
		text := string(b)
		assert.True(t, strings.HasPrefix(text, "* lipoplan model "), name)
		assert.Contains(t, text, "* column C1       ", name)
	}
	for _, s := range []*catalogue.Spec{spec, rules} {
		r, err := Solve(cat, s, Options{})
		require.NoError(t, err)
		require.Equal(t, Optimal, r.Status)
		b, err := MPSIn(FixedMPS, cat, s)
		require.NoError(t, err)
		name := "blend"
		if s.Rules.Active() {
			name = "rules"
			assert.Contains(t, string(b), "    MARKER    'MARKER'                 'INTORG'\n")
		}
		check(name, b, r.CostPerTonne)
	}
	cat, orders := demoOrders(t, 50, true)
	r, err := Plan(cat, orders)
	require.NoError(t, err)
	require.Equal(t, Optimal, r.Status)
	b, err := PlanMPSIn(FixedMPS, cat, orders)
	require.NoError(t, err)
	assert.Contains(t, string(b), "laminating#50.shea-st")
	check("plan", b, r.TotalCost)
}
