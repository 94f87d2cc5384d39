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
// the form of the published check values (tristearin beta: 221.6 J/g, J.
// Chem. Eng. Data 50 (2005) 1624; melting near 73 C, from memory). Many
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

// wesdorp returns the coefficient set of Wesdorp's correlations for a
// polymorph.
//
// Source: Wesdorp, L. H. (1990), "Liquid-multiple solid phase equilibria in
// fats: theory and experiments", PhD thesis, Delft University of
// Technology; re-published in Marangoni, A. G. & Wesdorp, L. H. (2013),
// Structure and Properties of Fat Crystal Networks, 2nd ed., CRC Press,
// ch. 9 (doi:10.1201/b12883-10), and tabulated with 42 parameters per
// polymorph by Moorthy, A. S. et al. (2016), J. Am. Oil Chem. Soc.
// (doi:10.1007/s11746-016-2935-1).
//
// Neither the thesis nor the 2013 chapter nor the 2016 paper could be read
// here. The values were read from two secondary public copies, and each
// line below says which:
//
//   - [ch9] a transcription of the tables of Marangoni & Wesdorp (2013),
//     ch. 9: the unrounded A and B constants of the saturated part
//     ("fitted to the experimental melting points of even saturated TAGs",
//     so no A_odd, B_odd), the enthalpy lines h, h0, h_xy, h_odd, k, x0,
//     T_inf, and the unsaturated enthalpy increments with their standard
//     errors (values in parentheses there are "guessed due to inadequate
//     data for fitting");
//   - [tab] a copy of the 42-row parameter table of Moorthy et al. (2016),
//     rounded to 3 decimals: A_odd, B_odd, and every unsaturated increment
//     to A and B.
//
// The copies agree on every value they share except two, where [ch9]'s
// unrounded value is used: beta B0 (2.66923; [tab] 2.670) and beta B_y²
// (−0.000945; [tab] +0.0009, the sign lost). The published table has no
// elaidic increment to B, no O-E, E-J or E-N cross terms and no linolenic
// enthalpy increment; those are gaps of the model, not of this copy, and
// are handled as MeltingOf says.
func wesdorp(p Polymorph) wesdorpSet {
	switch p.resolve() {
	case Alpha:
		return wesdorpSet{
			h: 2.70, h0: -31.95, hxy: -13.28, hodd: 0, k: 4.39, x0: 1.25, // [ch9]
			a0: -9.0581, ax: 0.00290, ax2: -0.0619116, axy: 0.115128, ay: -0.453461, ay2: -0.005827, // [ch9]
			b0: -4.4841, bx: -0.00111, bx2: 0.148938, bxy: -0.365917, by: 1.41154, by2: -0.001766, // [ch9]
			aodd: -0.196, bodd: -0.003, // [tab]
			aO: -3.46, aE: -1.38, aJ: -3.35, aN: -4.2, // [tab]
			aOO: -0.01, aEE: 0.01, aJJ: -3.68, aNN: -0.98, // [tab]
			aOJ: 0.53, aON: 0.83, aJN: -2.97, // [tab]
			bO: 0, bJ: 5.4, bN: 2.6, // [tab]
			hO: -31.7, hE: -11.7, hJ: -37.7, // [ch9] ±1.8, ±1.3, guessed
		}
	case BetaPrime:
		return wesdorpSet{
			h: 3.86, h0: -35.86, hxy: -19.35, hodd: 0, k: 1.99, x0: 2.46, // [ch9]
			a0: -8.4543, ax: -0.10360, ax2: -0.018881, axy: 0.0739411, ay: -0.49721, ay2: 0.0115995, // [ch9]
			b0: -0.26501, bx: 0.54997, bx2: 0.074136, bxy: -0.340928, by: 2.34238, by2: -0.135735, // [ch9]
			aodd: -0.308, bodd: 0.005, // [tab]
			aO: -2.2, aE: -1.34, aJ: -2.51, aN: -2.23, // [tab]
			aOO: 0.27, aEE: 0.04, aJJ: 0.55, aNN: 1.51, // [tab]
			aOJ: -1, aON: 0.76, aJN: 1.12, // [tab]
			bO: -4.3, bJ: -7.8, bN: -13.7, // [tab]
			hO: -28.3, hE: -15.9, hJ: -37.7, // [ch9] ±1.8, guessed, guessed
		}
	default: // Beta
		return wesdorpSet{
			h: 3.89, h0: -17.16, hxy: -22.29, hodd: 2.29, k: 2.88, x0: 0.77, // [ch9]
			a0: -8.0481, ax: 0.074130, ax2: -0.0348596, axy: 0.00771420, ay: -0.404136, ay2: 0.0111938, // [ch9]
			b0: 2.66923, bx: -0.31675, bx2: 0.085967, bxy: 0.040642, by: 0.55040, by2: -0.000945, // [ch9]
			aodd: -0.019, bodd: 0.008, // [tab]
			aO: -2.93, aE: -1.68, aJ: -4.69, aN: -5.18, // [tab]
			aOO: 0.89, aEE: 0.4, aJJ: 1.21, aNN: 1.38, // [tab]
			aOJ: 0.71, aON: 0.69, aJN: 0.73, // [tab]
			bO: -3.7, bJ: -1.5, bN: -1.8, // [tab]
			hO: -30.2, hE: -15.9, hJ: -37.7, // [ch9] ±1.4, ±0.9, ±2.5
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

// correlated returns the melting point and enthalpy of fusion that
// Wesdorp's correlations give for the TAG with acids a, b, c at sn-1, sn-2,
// sn-3 in polymorph p (see wesdorp for the source), before the corrections
// of MeltingOf:
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
// n_i - 1; the copies do not define it, and for triolein and trilinolein
// this reading is the one near their measured melting points). Terms the
// published table does not have (B_E, the O-E, E-J and E-N pairs, h_N) are
// zero, except that linolenic chains take linoleic's enthalpy increment h_J
// (a chain with three double bonds otherwise adds no enthalpy change at
// all). Our analogies: cis monoenes other than oleic count as O with their
// own chain length, trans dienes as E, trienes as N.
//
// Sn-1 and sn-3 enter only through P and R, so mirror images melt alike.
func correlated(a, b, c catalogue.FattyAcid, p Polymorph) Melting {
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
