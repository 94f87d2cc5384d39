package sle

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestPhasesPureSolidsMatchLiquidFraction(t *testing.T) {
	// With every component its own group, an ideal solid solution of one is
	// a pure solid, so the Q minimum must equal the direct pure-solid
	// solution (LiquidFraction), which is checked by hand elsewhere.
	r := rand.New(rand.NewPCG(3, 4))
	var ph Phases
	for trial := 0; trial < 3000; trial++ {
		m := 1 + r.IntN(60)
		z, xs, w := make([]float64, m), make([]float64, m), make([]float64, m)
		start := make([]int, m+1)
		for i := range start {
			start[i] = i
		}
		var sum float64
		for i := range z {
			z[i] = r.Float64()
			if r.IntN(5) == 0 {
				z[i] = 0
			}
			sum += z[i]
			xs[i] = math.Exp(-8 * r.Float64())
			if r.IntN(4) == 0 {
				xs[i] = 1 + r.Float64() // above its melting point
			}
			w[i] = 1 / xs[i]
		}
		if sum == 0 {
			continue
		}
		for i := range z {
			z[i] /= sum
		}
		capped := make([]float64, m)
		for i := range xs {
			capped[i] = min(xs[i], 1)
		}
		want := LiquidFraction(z, capped)
		require.NoError(t, ph.Solve(z, w, start, trial%2 == 1))
		assert.InDelta(t, want, ph.Liquid(), 1e-9, "trial %d", trial)
		var solid float64
		for i := range z {
			solid += ph.SolidMoles(z, w, i, i)
		}
		assert.InDelta(t, 1-want, solid, 1e-9, "trial %d", trial)
	}
}

func TestPhasesBinaryIdealSolidSolutionByHand(t *testing.T) {
	// Ideal binary liquid and ideal binary solid solution (the "lens"
	// diagram; Prigogine & Defay (1954), ideal solid solutions): with
	// K_i = x_iS / x_iL = 1/xs_i, the tie line has x_1L = (1 - K_2)/(K_1 - K_2),
	// x_1S = K_1 x_1L, and the lever rule gives the solid fraction
	// S = (z_1 - x_1L)/(x_1S - x_1L) when 0 < S < 1.
	var ph Phases
	start := []int{0, 2}
	for _, c := range []struct{ k1, k2, z1 float64 }{
		{3, 0.5, 0.5}, {10, 0.2, 0.3}, {1.5, 0.9, 0.2}, {40, 0.01, 0.7},
	} {
		x1L := (1 - c.k2) / (c.k1 - c.k2)
		x1S := c.k1 * x1L
		s := (c.z1 - x1L) / (x1S - x1L)
		require.True(t, s > 0 && s < 1, "case %+v is two-phase", c)
		z := []float64{c.z1, 1 - c.z1}
		w := []float64{c.k1, c.k2}
		require.NoError(t, ph.Solve(z, w, start, false))
		assert.InDelta(t, s, ph.Solid(0), 1e-10, "%+v", c)
		assert.InDelta(t, 1-s, ph.Liquid(), 1e-10, "%+v", c)
		assert.InDelta(t, s*x1S, ph.SolidMoles(z, w, 0, 0), 1e-10, "%+v", c)
	}
	// Outside the lens: all liquid when the mixture is below the liquidus
	// (Σ z_i K_i < 1) and all solid above the solidus (Σ z_i / K_i < 1).
	require.NoError(t, ph.Solve([]float64{0.5, 0.5}, []float64{1.2, 0.5}, start, false))
	assert.InDelta(t, 1, ph.Liquid(), 1e-12)
	require.NoError(t, ph.Solve([]float64{0.5, 0.5}, []float64{5, 1.5}, start, false))
	assert.InDelta(t, 0, ph.Liquid(), 1e-12)
	assert.InDelta(t, 1, ph.Solid(0), 1e-12)
}

func TestPhasesEquilibriumConditions(t *testing.T) {
	// Random groupings: at the answer every phase present closes (its mole
	// fractions sum to 1), no absent solid is supersaturated, and mass
	// balances (the equilibrium conditions of ideal phases; Michelsen 1994).
	r := rand.New(rand.NewPCG(5, 6))
	var ph Phases
	for trial := 0; trial < 2000; trial++ {
		m := 2 + r.IntN(80)
		groups := 1 + r.IntN(min(m, 12))
		z, w := make([]float64, m), make([]float64, m)
		// components in group order: group g holds start[g]..start[g+1]-1
		cuts := map[int]bool{}
		for len(cuts) < groups-1 {
			cuts[1+r.IntN(m-1)] = true
		}
		start := []int{0}
		for i := 1; i < m; i++ {
			if cuts[i] {
				start = append(start, i)
			}
		}
		start = append(start, m)
		group := make([]int32, m)
		for g := 0; g+1 < len(start); g++ {
			for i := start[g]; i < start[g+1]; i++ {
				group[i] = int32(g)
			}
		}
		var sum float64
		for i := range z {
			z[i] = r.Float64()
			sum += z[i]
			w[i] = math.Exp(10*r.Float64() - 3)
		}
		for i := range z {
			z[i] /= sum
		}
		require.NoError(t, ph.Solve(z, w, start, trial%2 == 1))
		L := ph.Liquid()
		var liq float64
		closure := make([]float64, groups)
		for i := range z {
			e := L + ph.Solid(int(group[i]))*w[i]
			liq += z[i] / e
			closure[group[i]] += z[i] * w[i] / e
			// mass balance of component i
			assert.InDelta(t, z[i], L*z[i]/e+ph.SolidMoles(z, w, int(group[i]), i), 1e-12)
		}
		if L > 1e-12 {
			assert.InDelta(t, 1, liq, 1e-9, "liquid closes, trial %d", trial)
		}
		for g := 0; g < groups; g++ {
			if ph.Solid(g) > 1e-12 {
				assert.InDelta(t, 1, closure[g], 1e-9, "solid %d closes, trial %d", g, trial)
			} else {
				assert.LessOrEqual(t, closure[g], 1+1e-9, "absent solid %d would not form, trial %d", g, trial)
			}
		}
		total := L
		for g := 0; g < groups; g++ {
			total += ph.Solid(g)
		}
		assert.InDelta(t, 1, total, 1e-9)
	}
}
