package sle

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Tristearin beta as published: dH 221.6 J/g by adiabatic calorimetry
// ("Thermal properties of tristearin by adiabatic and differential scanning
// calorimetry", J. Chem. Eng. Data 50 (2005) 1624-1630); Tm near 73 C and
// M = 891.5 g/mol (PubChem), both from memory.
const (
	sssTm = 73 + 273.15
	sssDH = 221.6 * 891.5 // J/mol
)

func TestHildebrandSolubilityByHand(t *testing.T) {
	// Hand-computed: ln x = (197556.4 / 8.314462618) (1/346.15 - 1/T);
	// T = 323.15 K: ln x = 23760.6 x (-2.0562e-4) = -4.8856, x = 0.0075547;
	// T = 343.15 K: x = 0.54875 (computed with a pocket calculator / python).
	assert.InDelta(t, 0.0075547, Solubility(sssDH, sssTm, 323.15), 1e-6)
	assert.InDelta(t, 0.54875, Solubility(sssDH, sssTm, 343.15), 1e-5)
	assert.Equal(t, 1.0, Solubility(sssDH, sssTm, sssTm+1), "above Tm the solid cannot exist")
	assert.Equal(t, 1.0, Solubility(-5, sssTm, 300), "no enthalpy of fusion: never solid")
}

func TestBinaryEutecticByHand(t *testing.T) {
	// Ideal binary with one component (OOO) far above its melting point and
	// so fully dissolved: the liquid is saturated in SSS, x_S = xs_S, and
	// x_O = z_O / L, so L = z_O / (1 - xs_S). Hand-computed for 50:50 mol
	// at 50 C: xs_S = 0.0075547, L = 0.5 / 0.9924453 = 0.503806, solid
	// SSS = 0.5 - L xs_S = 0.496194 mol per mol; at 60 C: xs_S = 0.068664,
	// L = 0.536863, solid 0.463137.
	z := []float64{0.5, 0.5}
	for _, c := range []struct{ t, L, solid float64 }{{323.15, 0.5038061, 0.4961939}, {333.15, 0.5368633, 0.4631367}} {
		xs := []float64{Solubility(sssDH, sssTm, c.t), 1}
		L := LiquidFraction(z, xs)
		assert.InDelta(t, c.L, L, 1e-6, "T = %v K", c.t)
		s := SolidMoles(z, xs, L, nil)
		assert.InDelta(t, c.solid, s[0], 1e-6)
		assert.Zero(t, s[1], "OOO stays liquid")
	}
	// Below the ideal eutectic (sum of solubilities <= 1) nothing is liquid.
	assert.Equal(t, 0.0, LiquidFraction(z, []float64{0.3, 0.6}))
	// Everything soluble: all liquid.
	assert.Equal(t, 1.0, LiquidFraction(z, []float64{0.6, 0.5}))
}

func TestEquilibriumMassBalance(t *testing.T) {
	// Mass balance and the equilibrium conditions on random mixtures: each
	// component splits into liquid L x_i and solid s_i >= 0 with
	// L x_i + s_i = z_i, sum x_i = 1, x_i <= xs_i, and x_i = xs_i wherever a
	// solid is present (the definition of solid-liquid equilibrium with pure
	// solids; any thermodynamics text).
	r := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 2000; trial++ {
		m := 1 + r.IntN(40)
		z, xs := make([]float64, m), make([]float64, m)
		var sum float64
		for i := range z {
			z[i] = r.Float64()
			sum += z[i]
			xs[i] = math.Min(1, r.ExpFloat64()*0.3)
		}
		for i := range z {
			z[i] /= sum
		}
		L := LiquidFraction(z, xs)
		require.GreaterOrEqual(t, L, 0.0)
		require.LessOrEqual(t, L, 1.0)
		s := SolidMoles(z, xs, L, nil)
		var sumX float64
		for i := range z {
			liquid := z[i] - s[i]
			assert.GreaterOrEqual(t, s[i], 0.0)
			if L > 0 {
				x := liquid / L
				sumX += x
				assert.LessOrEqual(t, x, xs[i]+1e-9)
				if s[i] > 1e-12 {
					assert.InDelta(t, xs[i], x, 1e-9, "saturated component")
				}
			}
		}
		if L > 0 {
			assert.InDelta(t, 1, sumX, 1e-9, "trial %d: liquid mole fractions sum to 1", trial)
		} else {
			var sxs float64
			for _, v := range xs {
				sxs += v
			}
			assert.LessOrEqual(t, sxs, 1+1e-12, "no liquid only below the eutectic")
		}
		// a warm start anywhere in (0, 1) gives the same answer (a start left
		// of the root is detected and replaced by 1)
		assert.InDelta(t, L, LiquidFractionFrom(z, xs, r.Float64()), 1e-12)
		// the plain bisection finds the same liquid fraction
		if L > 0 && L < 1 {
			assert.InDelta(t, bisectLiquid(z, xs), L, 1e-9)
		}
	}
}

func TestLiquidFractionRisesWithSolubility(t *testing.T) {
	// Raising every solubility (a higher temperature) never lowers the
	// liquid fraction: f(L) = sum min(z_i/L, xs_i) - 1 rises with each xs_i.
	r := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 500; trial++ {
		m := 2 + r.IntN(30)
		z, xs := make([]float64, m), make([]float64, m)
		for i := range z {
			z[i] = 1 / float64(m)
			xs[i] = r.Float64() * 0.5
		}
		prev := LiquidFraction(z, xs)
		for step := 0; step < 10; step++ {
			for i := range xs {
				xs[i] = math.Min(1, xs[i]*1.3)
			}
			L := LiquidFraction(z, xs)
			assert.GreaterOrEqual(t, L, prev-1e-12)
			prev = L
		}
	}
}
