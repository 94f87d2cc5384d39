package sle

import (
	"fmt"
	"math"
)

// Phases is the equilibrium of an ideal liquid with solid phases that are
// ideal solid solutions of disjoint groups of components (a group of one is
// a pure solid). It minimises Michelsen's Q function,
//
//	Q(L, b) = L + Σ_g b_g − Σ_i z_i ln E_i,   E_i = L + b_g(i) w_i,
//
// over the liquid amount L >= 0 and solid amounts b_g >= 0, where
// w_i = 1/xs_i and xs_i = exp((dH_i/R)(1/Tm_i − 1/T)) is component i's
// ideal solubility, which for an ideal solid solution is also the ratio
// x_i(liquid)/x_i(solid) (Prigogine & Defay, Chemical Thermodynamics
// (1954), ideal solid solutions; Wesdorp (1990), thesis, ch. 2). For ideal
// phases the ratios do not depend on composition and Q is convex; at its
// minimum every phase present has mole fractions summing to one (∂Q/∂b = 0)
// and no absent phase could form (∂Q/∂b >= 0): Michelsen, M. L. (1994),
// "Calculation of multiphase equilibrium", Computers & Chemical Engineering
// 18:545-550.
//
// Solids do not couple to each other, so for a fixed L each b_g is a
// one-dimensional convex problem, solved by Newton's method from the left
// on Σ_(i in g) z_i w_i / E_i = 1 (a convex decreasing function, so the
// iterates rise monotonically onto the root). What remains is convex in L
// alone, with derivative F(L) = 1 − Σ_i x_iL (x_iL = z_i/E_i) by the
// envelope theorem, increasing in L; its root is found by Newton's method
// with the exact derivative (implicit differentiation of the inner
// conditions), safeguarded by bisection on a bracket. Each evaluation costs
// O(components) whatever the number of groups.
type Phases struct {
	b     []float64 // solid amount per group
	liq   float64
	valid bool
}

// maxOuter and maxInner bound the Newton iterations; both converge
// quadratically near the root, and the safeguards guarantee progress.
const (
	maxOuter = 200
	maxInner = 200
)

// Solve finds the phase amounts for components z (mole fractions summing to
// 1; zeros allowed) with inverse solubilities w (finite, > 0), ordered by
// group: the components of group g are z[start[g]:start[g+1]]. With warm set
// it starts from the previous answer when the number of groups agrees (a
// good start when stepping through temperatures). Liquid, Solid and
// SolidMoles read the answer.
func (ph *Phases) Solve(z, w []float64, start []int, warm bool) error {
	groups := len(start) - 1
	if groups < 1 || start[groups] != len(z) || len(w) != len(z) {
		return fmt.Errorf("sle: %d components, %d inverse solubilities, groups ending at %v", len(z), len(w), start[len(start)-1:])
	}
	if cap(ph.b) < groups {
		ph.b = make([]float64, groups)
		warm = false
	}
	if !warm || !ph.valid || len(ph.b) != groups {
		ph.b = ph.b[:groups]
		clear(ph.b)
		ph.liq = 1
	}
	ph.valid = false
	// Can any liquid coexist with the solids? F(0+) >= 0 means no: all solid.
	if noLiquid(z, w, start) >= 0 {
		for g := range ph.b {
			ph.b[g] = 0
			for _, zi := range z[start[g]:start[g+1]] {
				ph.b[g] += zi
			}
		}
		ph.liq = 0
		ph.valid = true
		return nil
	}
	L := ph.liq
	if !(L > 0) || L > 1 {
		L = 1
	}
	lo, hi := 0.0, math.Inf(1)
	for iter := 0; iter < maxOuter; iter++ {
		f, df, err := ph.evaluate(z, w, start, L)
		if err != nil {
			return err
		}
		if math.Abs(f) <= 1e-13 {
			ph.liq = L
			ph.valid = true
			return nil
		}
		if f < 0 {
			lo = L
		} else {
			hi = L
		}
		next := L - f/df
		if !(df > 0) || !(next > lo) || !(next < hi) {
			if math.IsInf(hi, 1) {
				next = 2 * L
			} else {
				next = (lo + hi) / 2
			}
		}
		if !math.IsInf(hi, 1) && hi-lo <= 1e-15*hi {
			if _, _, err := ph.evaluate(z, w, start, next); err != nil {
				return err
			}
			ph.liq = next
			ph.valid = true
			return nil
		}
		L = next
	}
	return fmt.Errorf("sle: phase equilibrium did not converge in %d steps", maxOuter)
}

// noLiquid returns F(0+) = 1 − Σ_i x_iL when there is no liquid and every
// group's solid holds all of its components (b_g = Z_g): one minus the sum
// over the liquid such solids would be in equilibrium with,
// Σ_g Σ_(i in g) (z_i/Z_g) xs_i.
func noLiquid(z, w []float64, start []int) float64 {
	f := 1.0
	for g := 0; g+1 < len(start); g++ {
		var zg float64
		for _, zi := range z[start[g]:start[g+1]] {
			zg += zi
		}
		if zg <= 0 {
			continue
		}
		for i := start[g]; i < start[g+1]; i++ {
			if z[i] > 0 {
				f -= z[i] / (zg * w[i])
			}
		}
	}
	return f
}

// evaluate solves every group's solid amount at liquid amount L (warm from
// ph.b) and returns F(L) = 1 − Σ x_iL and its derivative
//
//	dF/dL = Σ_i z_i (1 + w_i b_g') / E_i²,
//	b_g'  = −Σ_(i in g) z_i w_i/E_i² / Σ_(i in g) z_i w_i²/E_i²
//
// (implicit differentiation of Σ_(i in g) z_i w_i / E_i = 1; b_g' = 0 for a
// group with no solid).
func (ph *Phases) evaluate(z, w []float64, start []int, L float64) (float64, float64, error) {
	f, df := 1.0, 0.0
	for g := range ph.b {
		zg, wg := z[start[g]:start[g+1]], w[start[g]:start[g+1]]
		b, err := inner(zg, wg, L, ph.b[g])
		if err != nil {
			return 0, 0, err
		}
		ph.b[g] = b
		var s1, s2 float64
		if b > 0 {
			for i, zi := range zg {
				if zi > 0 {
					e := L + b*wg[i]
					t := zi * wg[i] / (e * e)
					s1 += t
					s2 += t * wg[i]
				}
			}
		}
		db := 0.0
		if s2 > 0 {
			db = -s1 / s2
		}
		for i, zi := range zg {
			if zi > 0 {
				e := L + b*wg[i]
				f -= zi / e
				df += zi * (1 + wg[i]*db) / (e * e)
			}
		}
	}
	return f, df, nil
}

// inner minimises b − Σ_i z_i ln(L + b w_i) over b >= 0 for one group: b = 0
// when Σ z_i w_i / L <= 1, else the root of φ(b) = Σ z_i w_i/(L + b w_i) − 1,
// reached by Newton's method from a point left of it (φ is convex and
// decreasing, so the iterates increase monotonically onto the root). A
// start right of the root is replaced by 0.
func inner(z, w []float64, L, start float64) (float64, error) {
	phi := func(b float64) (float64, float64) {
		v, dv := -1.0, 0.0
		for i, zi := range z {
			if zi > 0 {
				e := L + b*w[i]
				t := zi * w[i] / e
				v += t
				dv -= t * w[i] / e
			}
		}
		return v, dv
	}
	b := 0.0
	v, dv := phi(0)
	if v <= 0 {
		return 0, nil
	}
	if start > 0 {
		if vs, dvs := phi(start); vs >= 0 {
			b, v, dv = start, vs, dvs
		}
	}
	for k := 0; k < maxInner; k++ {
		if v <= 1e-15 || dv >= 0 {
			return b, nil
		}
		next := b - v/dv
		if next <= b {
			return b, nil
		}
		b = next
		v, dv = phi(b)
	}
	return 0, fmt.Errorf("sle: solid amount of a phase did not converge in %d steps", maxInner)
}

// Liquid is the moles of liquid per mole of mixture.
func (ph *Phases) Liquid() float64 { return ph.liq }

// Solid is the moles of the solid of group g per mole of mixture.
func (ph *Phases) Solid(g int) float64 { return ph.b[g] }

// SolidMoles is the moles of component i of group g in the solid, per mole
// of mixture: b_g z_i w_i / (L + b_g w_i).
func (ph *Phases) SolidMoles(z, w []float64, g, i int) float64 {
	if z[i] <= 0 {
		return 0
	}
	bg := ph.b[g]
	if bg == 0 {
		return 0
	}
	return bg * z[i] * w[i] / (ph.liq + bg*w[i])
}
