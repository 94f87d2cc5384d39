package sle

import (
	"fmt"
	"math"
	"strings"

	"lipoplan/catalogue"
)

// Polymorph is the crystal form whose melting properties the model uses.
type Polymorph int

// The three main TAG polymorphs, least to most stable. The zero value means
// "the package default" (DefaultPolymorph).
const (
	Alpha     Polymorph = iota + 1 // hexagonal subcell, least stable
	BetaPrime                      // orthorhombic subcell (beta')
	Beta                           // triclinic subcell, most stable
)

// DefaultPolymorph is used when Options leave the polymorph unset. Beta is
// the stable form, the one a solid-liquid *equilibrium* model describes, and
// the form of the DESIGN's check values (tristearin beta near 73 C). Many
// blends measured after the short tempering of a direct pulsed-NMR run
// (AOCS Cd 16b-93) are still beta' (common practice); Options can choose
// beta' or alpha, and FitStock shows how each does against measured curves.
const DefaultPolymorph = Beta

// String names the polymorph as the CLI and reports write it.
func (p Polymorph) String() string {
	switch p {
	case Alpha:
		return "alpha"
	case BetaPrime:
		return "beta'"
	case Beta:
		return "beta"
	}
	return DefaultPolymorph.String()
}

// ParsePolymorph reads "alpha", "beta'" (or "beta-prime", "betaprime") or
// "beta".
func ParsePolymorph(s string) (Polymorph, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "alpha", "a":
		return Alpha, nil
	case "beta'", "beta-prime", "betaprime", "b'":
		return BetaPrime, nil
	case "beta", "b":
		return Beta, nil
	}
	return 0, catalogue.Badf("polymorph %q is not known; use alpha, beta' or beta", s)
}

func (p Polymorph) resolve() Polymorph {
	if p < Alpha || p > Beta {
		return DefaultPolymorph
	}
	return p
}

// wesdorpSet holds the coefficients of Wesdorp's correlations for one
// polymorph. Enthalpies in kJ/mol, lengths in acyl carbons.
type wesdorpSet struct {
	h, h0, hxy, hodd float64 // enthalpy of fusion, saturated part
	k, x0            float64 // chain-length-difference function f_xy
	// melting point, saturated part: A and B as quadratics in x, y
	a0, aodd, ax, ax2, axy, ay, ay2 float64
	b0, bodd, bx, bx2, bxy, by, by2 float64
	// unsaturated increments to A (per chain, per like pair, per unlike pair)
	aO, aE, aJ, aN     float64
	aOO, aEE, aJJ, aNN float64
	aOJ, aON, aJN      float64
	// unsaturated increments to B (per chain)
	bO, bJ, bN float64
	// unsaturated increments to the enthalpy (per chain), kJ/mol
	hO, hE, hJ float64
}

// tInfinity is T-infinity of the melting-point correlation, K (the same for
// all three polymorphs in the table).
const tInfinity = 401.15

// wesdorp returns the coefficient set for a polymorph.
//
// Source: the correlations of Wesdorp (1990), "Liquid-multiple solid phase
// equilibria in fats: theory and experiments", thesis, Delft University of
// Technology, as re-published by Marangoni & Wesdorp (2013), Structure and
// Properties of Fat Crystal Networks, 2nd ed., CRC Press, ch. 9
// (doi:10.1201/b12883-10) and tabulated (42 parameters per polymorph) by
// Moorthy et al. (2016), J. Am. Oil Chem. Soc. (doi:10.1007/s11746-016-2935-1).
// We did not have the original papers; the values below were read from a
// secondary public copy of that table (three copies of it, rounded
// table and unrounded saturated A/B constants, agree) and should be checked
// against Moorthy et al. (2016), Table 1, when it is to hand. The 3-decimal
// table values are used. Values the table gives in parentheses
// ("guessed for lack of data": alpha h_J, beta' h_E, h_J) are used as given.
func wesdorp(p Polymorph) wesdorpSet {
	switch p.resolve() {
	case Alpha:
		return wesdorpSet{
			h: 2.7, h0: -31.95, hxy: -13.28, hodd: 0, k: 4.39, x0: 1.25,
			a0: -9.058, aodd: -0.196, ax: 0.003, ax2: -0.062, axy: 0.115, ay: -0.453, ay2: -0.006,
			b0: -4.484, bodd: -0.003, bx: -0.001, bx2: 0.149, bxy: -0.366, by: 1.412, by2: -0.002,
			aO: -3.46, aE: -1.38, aJ: -3.35, aN: -4.2,
			aOO: -0.01, aEE: 0.01, aJJ: -3.68, aNN: -0.98,
			aOJ: 0.53, aON: 0.83, aJN: -2.97,
			bO: 0, bJ: 5.4, bN: 2.6,
			hO: -31.7, hE: -11.7, hJ: -37.7,
		}
	case BetaPrime:
		return wesdorpSet{
			h: 3.86, h0: -35.86, hxy: -19.35, hodd: 0, k: 1.99, x0: 2.46,
			a0: -8.454, aodd: -0.308, ax: -0.104, ax2: -0.019, axy: 0.074, ay: -0.497, ay2: 0.012,
			b0: -0.265, bodd: 0.005, bx: 0.550, bx2: 0.074, bxy: -0.341, by: 2.342, by2: -0.136,
			aO: -2.2, aE: -1.34, aJ: -2.51, aN: -2.23,
			aOO: 0.27, aEE: 0.04, aJJ: 0.55, aNN: 1.51,
			aOJ: -1, aON: 0.76, aJN: 1.12,
			bO: -4.3, bJ: -7.8, bN: -13.7,
			hO: -28.3, hE: -15.9, hJ: -37.7,
		}
	default: // Beta
		return wesdorpSet{
			h: 3.89, h0: -17.16, hxy: -22.29, hodd: 2.29, k: 2.88, x0: 0.77,
			a0: -8.048, aodd: -0.019, ax: 0.074, ax2: -0.035, axy: 0.008, ay: -0.404, ay2: 0.011,
			b0: 2.670, bodd: 0.008, bx: -0.317, bx2: 0.086, bxy: 0.041, by: 0.550, by2: 0.0009,
			aO: -2.93, aE: -1.68, aJ: -4.69, aN: -5.18,
			aOO: 0.89, aEE: 0.4, aJJ: 1.21, aNN: 1.38,
			aOJ: 0.71, aON: 0.69, aJN: 0.73,
			bO: -3.7, bJ: -1.5, bN: -1.8,
			hO: -30.2, hE: -15.9, hJ: -37.7,
		}
	}
}

// chainKind is how Wesdorp's correlations see an acyl chain.
type chainKind int

const (
	kindSat chainKind = iota
	kindO             // cis monoene (oleic; other cis monoenes by analogy)
	kindE             // trans (elaidic; trans dienes by analogy)
	kindJ             // cis diene (linoleic)
	kindN             // cis triene (linolenic; more double bonds by analogy)
)

func kindOf(f catalogue.FattyAcid) chainKind {
	switch {
	case f.DoubleBonds == 0:
		return kindSat
	case f.Trans:
		return kindE
	case f.DoubleBonds == 1:
		return kindO
	case f.DoubleBonds == 2:
		return kindJ
	default:
		return kindN
	}
}

// Melting holds the melting properties of one pure TAG in one polymorph.
type Melting struct {
	Tm float64 // melting point, K
	DH float64 // enthalpy of fusion, J/mol
}

// TmCelsius is the melting point in deg C.
func (m Melting) TmCelsius() float64 { return m.Tm - 273.15 }

// MeltingOf returns the melting point and enthalpy of fusion of the TAG with
// acids a, b, c at sn-1, sn-2, sn-3 in polymorph p, from Wesdorp's
// correlations (see wesdorp for the source):
//
//	n = n1+n2+n3; P = min(n1,n3), Q = n2, R = max(n1,n3); x = Q-P, y = R-P
//	f_xy = 2 - exp(-((x-x0)/k)^2) - exp(-(y/k)^2)
//	dH = h n + h0 + h_xy f_xy + h_odd f_odd [beta only] + sum_i h_i n_i
//	A  = A0 + A_odd f_odd + A_x x + A_x2 x^2 + A_xy x y + A_y y + A_y2 y^2
//	     + sum_i A_i n_i + sum_i A_ii n_ii + sum_i<j A_ij n_i n_j
//	B  = B0 + B_odd f_odd + (same quadratic in x, y) + sum_i B_i n_i
//	Tm = T_inf (1 + A/n - A B / n^2)
//
// with n_i the number of chains of kind i (O oleic, E elaidic, J linoleic,
// N linolenic) and f_odd = 1 when any chain has an odd carbon number.
// Our reading, marked as such: n_ii counts like pairs, n_i (n_i - 1) / 2, as
// the unlike-pair terms count n_i n_j pairs (for n_i <= 2 it equals
// n_i - 1). Our analogies, not Wesdorp's: cis monoenes other than oleic count
// as O with their own chain length, trans dienes as E, trienes as N; the
// table has no enthalpy increment for N, so linoleic's h_J is used for it.
//
// Sn-1 and sn-3 enter only through P and R, so mirror images melt alike.
func MeltingOf(a, b, c catalogue.FattyAcid, p Polymorph) Melting {
	return meltingWith(wesdorp(p), p.resolve() == Beta, a, b, c)
}

// meltingWith is MeltingOf with the coefficient set already chosen.
func meltingWith(w wesdorpSet, beta bool, a, b, c catalogue.FattyAcid) Melting {
	n1, n2, n3 := a.Carbons, b.Carbons, c.Carbons
	n := float64(n1 + n2 + n3)
	pp, rr := min(n1, n3), max(n1, n3)
	x, y := float64(n2-pp), float64(rr-pp)
	fxy := 2 - math.Exp(-sq((x-w.x0)/w.k)) - math.Exp(-sq(y/w.k))
	odd := 0.0
	if n1%2 == 1 || n2%2 == 1 || n3%2 == 1 {
		odd = 1
	}
	var cnt [5]float64
	cnt[kindOf(a)]++
	cnt[kindOf(b)]++
	cnt[kindOf(c)]++
	nO, nE, nJ, nN := cnt[kindO], cnt[kindE], cnt[kindJ], cnt[kindN]
	pairs := func(v float64) float64 { return v * (v - 1) / 2 }

	dh := w.h*n + w.h0 + w.hxy*fxy + w.hO*nO + w.hE*nE + w.hJ*(nJ+nN)
	if beta {
		dh += w.hodd * odd
	}
	quad := func(c0, codd, cx, cx2, cxy, cy, cy2 float64) float64 {
		return c0 + codd*odd + cx*x + cx2*x*x + cxy*x*y + cy*y + cy2*y*y
	}
	A := quad(w.a0, w.aodd, w.ax, w.ax2, w.axy, w.ay, w.ay2) +
		w.aO*nO + w.aE*nE + w.aJ*nJ + w.aN*nN +
		w.aOO*pairs(nO) + w.aEE*pairs(nE) + w.aJJ*pairs(nJ) + w.aNN*pairs(nN) +
		w.aOJ*nO*nJ + w.aON*nO*nN + w.aJN*nJ*nN
	B := quad(w.b0, w.bodd, w.bx, w.bx2, w.bxy, w.by, w.by2) +
		w.bO*nO + w.bJ*nJ + w.bN*nN
	tm := tInfinity * (1 + A/n - A*B/(n*n))
	return Melting{Tm: tm, DH: 1000 * dh}
}

func sq(v float64) float64 { return v * v }

// MeltingOfCode is MeltingOf for a TAG named by letter codes ("SSS", "POP").
func MeltingOfCode(code string, p Polymorph) (Melting, error) {
	fs, err := catalogue.ParseTAGCode(code)
	if err != nil {
		return Melting{}, catalogue.Badf("melting properties: %w", err)
	}
	return MeltingOf(fs[0], fs[1], fs[2], p), nil
}

// TAGMass is the molar mass of the TAG (g/mol), glycerol + 3 acids - 3 water.
func TAGMass(a, b, c catalogue.FattyAcid) float64 { return catalogue.TAGMolarMass(a, b, c) }

func (m Melting) String() string {
	return fmt.Sprintf("Tm %.1f C, dH %.1f kJ/mol", m.TmCelsius(), m.DH/1000)
}
