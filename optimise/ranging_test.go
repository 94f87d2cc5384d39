package optimise

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// fullBasisRange is cost ranging done the long way, as the ranger's doc
// derives it: the tableau row e_pᵀB⁻¹[A -I] from the whole basis matrix B
// of [A -I] (basisFactor), then the same ratio test. It is the reference
// for the block-reduced ranger.
func fullBasisRange(t *testing.T, m *model, s *solution, j int) (lo, hi float64) {
	f, err := newBasisFactor(m, s.basis)
	require.NoError(t, err)
	lo, hi = math.Inf(-1), math.Inf(1)
	switch s.basis[j] {
	case stLower:
		return -s.d[j], hi
	case stUpper:
		return lo, -s.d[j]
	case stFixed:
		return lo, hi
	case stFree:
		return 0, 0
	}
	e := make([]float64, m.nRows)
	e[f.pos[j]] = 1
	rho, err := f.solveT(e)
	require.NoError(t, err)
	for k, st := range s.basis {
		if st == stBasic || st == stFixed {
			continue
		}
		var a, dk float64
		if k < m.nCols {
			for i := 0; i < m.nRows; i++ {
				a += rho[i] * m.at(i, k)
			}
			dk = s.d[k]
		} else {
			a, dk = -rho[k-m.nCols], s.y[k-m.nCols]
		}
		if math.Abs(a) <= 1e-9 {
			continue
		}
		ratio := dk / a
		switch {
		case st == stLower && a > 0, st == stUpper && a < 0:
			hi = math.Min(hi, ratio)
		case st == stLower, st == stUpper:
			lo = math.Max(lo, ratio)
		case st == stFree:
			lo, hi = math.Max(lo, 0), math.Min(hi, 0)
		}
	}
	return math.Min(lo, 0), math.Max(hi, 0)
}

// TestRangerMatchesFullBasis: on the 220 seeded random LPs (whose ranges
// reference_test.go checks against glpsol --ranges for 60 of them) and, for
// every other one, the same LP with each limit row's bound moved to the value
// the first answer gives it (every row binding, so A_TS is as large as the
// basis allows and the vertex degenerate), the block-reduced ranger gives
// the ranges of the full-basis computation to 1e-9 relative, for every
// engine's basis.
func TestRangerMatchesFullBasis(t *testing.T) {
	checked, big := 0, 0
	for k, c := range randomSuite(t, 220, "") {
		m, _, err := build(c.cat, c.spec)
		require.NoError(t, err)
		if k%2 == 1 {
			s, err := defaultEngine().solveLP(m)
			require.NoError(t, err)
			for i := 1; i < m.nRows; i++ {
				if !math.IsInf(m.rowUp[i], 1) {
					m.rowUp[i] = s.act[i]
				} else {
					m.rowLo[i] = s.act[i]
				}
			}
		}
		for _, eng := range engines() {
			s, err := eng.solveLP(m)
			if k%2 == 1 && err != nil {
				continue // gonum's simplex may give up on these degenerate vertices
			}
			require.NoError(t, err)
			if s.status != solOptimal {
				continue
			}
			rg, err := newRanger(m, s.basis, s.d, s.y, nil)
			require.NoError(t, err, "case %d %s", k, eng.name())
			if len(rg.rho) > m.nRows/2 {
				big++
			}
			for j := 0; j < m.nCols; j++ {
				lo, hi := rg.costRange(j)
				wlo, whi := fullBasisRange(t, m, s, j)
				assert.True(t, relClose(wlo, lo, 1e-9), "case %d %s column %d: low %v, full basis %v", k, eng.name(), j, lo, wlo)
				assert.True(t, relClose(whi, hi, 1e-9), "case %d %s column %d: high %v, full basis %v", k, eng.name(), j, hi, whi)
				checked++
			}
		}
	}
	t.Logf("%d column ranges compared; %d bases with |S| above half the rows", checked, big)
	assert.Greater(t, checked, 3000)
}
