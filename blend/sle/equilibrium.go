package sle

import "math"

// GasConstant R in J/(mol K) (CODATA 2018 exact value).
const GasConstant = 8.314462618

// Solubility is the Hildebrand (ideal) solubility of a pure solid in an ideal
// liquid: the mole fraction x with ln x = (dH/R)(1/Tm - 1/T), T and Tm in K,
// dH in J/mol. It is capped at 1 (above Tm the TAG cannot be solid). A
// non-positive dH (outside the correlation's range) gives 1: never solid.
func Solubility(dH, tm, t float64) float64 {
	if dH <= 0 || t >= tm {
		return 1
	}
	return math.Exp(dH / GasConstant * (1/tm - 1/t))
}

// LiquidFraction solves the solid-liquid equilibrium of a mixture whose
// solid phases are the pure components and whose liquid is ideal. z are the
// overall mole fractions (sum 1), xs each component's solubility at the
// temperature (mole fraction in the liquid in equilibrium with its pure
// solid, capped at 1). The liquid holds x_i = min(z_i / L, xs_i) and
// sum x_i = 1 fixes the liquid fraction L (moles of liquid per mole).
//
// Method: f(L) = sum min(z_i/L, xs_i) - 1 is decreasing in L, and on each
// interval where the set of saturated components is fixed it is A/L + B - 1
// (A the dissolved z, B the saturated xs), whose root A/(1-B) is taken;
// starting from L = 1 the iterates fall monotonically onto the root (the
// piece through the current point never lies below f to its left), each
// step saturating at least one more component, so at most len(z)+1 steps.
// L = 1 when everything dissolves; L = 0 below the eutectic (sum xs <= 1).
func LiquidFraction(z, xs []float64) float64 { return LiquidFractionFrom(z, xs, 1) }

// LiquidFractionFrom is LiquidFraction started at L = start instead of 1; a
// start at or above the root (e.g. the liquid fraction at a higher
// temperature) saves steps. A start below the root is detected and replaced
// by 1.
func LiquidFractionFrom(z, xs []float64, start float64) float64 {
	var sumMin, sumXs, sumZ float64
	for i, zi := range z {
		if zi <= 0 {
			continue
		}
		sumZ += zi
		sumMin += min(zi, xs[i])
		sumXs += xs[i]
	}
	if sumZ <= 0 {
		return 1
	}
	if sumMin >= sumZ*(1-1e-12) {
		return 1
	}
	if sumXs <= 1 {
		return 0
	}
	L := 1.0
	if start > 0 && start < 1 {
		L = start
	}
	for iter := 0; iter <= len(z)+2; iter++ {
		var A, B float64
		for i, zi := range z {
			if zi <= 0 {
				continue
			}
			if zi <= L*xs[i] {
				A += zi
			} else {
				B += xs[i]
			}
		}
		if A/L+B-1 > 1e-12 { // left of the root: restart from L = 1
			if L == 1 {
				break
			}
			L = 1
			continue
		}
		if B >= 1 { // cannot happen right of the root; guard against round-off
			break
		}
		next := A / (1 - B)
		if next >= L*(1-1e-13) {
			return min(next, L)
		}
		L = next
	}
	return bisectLiquid(z, xs)
}

// bisectLiquid is the plain bisection fallback for LiquidFraction (never
// reached in exact arithmetic; kept so round-off cannot leave a wrong answer).
func bisectLiquid(z, xs []float64) float64 {
	lo, hi := 0.0, 1.0
	for range 200 {
		mid := (lo + hi) / 2
		var f float64
		for i, zi := range z {
			if zi > 0 {
				f += min(zi/mid, xs[i])
			}
		}
		if f > 1 {
			lo = mid
		} else {
			hi = mid
		}
		if hi-lo < 1e-15 {
			break
		}
	}
	return (lo + hi) / 2
}

// SolidMoles returns the moles of each component in the solid (per mole of
// mixture) at liquid fraction L: s_i = max(0, z_i - L xs_i).
func SolidMoles(z, xs []float64, L float64, out []float64) []float64 {
	out = out[:0]
	for i, zi := range z {
		out = append(out, max(0, zi-L*xs[i]))
	}
	return out
}
