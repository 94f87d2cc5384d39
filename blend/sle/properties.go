package sle

import (
	"math"

	"lipoplan/catalogue"
)

// MeltingOf returns the melting point and enthalpy of fusion of the TAG with
// acids a, b, c at sn-1, sn-2, sn-3 as the model uses them for polymorph p.
// Three steps turn Wesdorp's correlations (correlated) into a set that is
// thermodynamically consistent and anchored to measurements:
//
//  1. Positional asymmetry in the stable forms. When the outer chains have
//     the same length but differ in unsaturation (SSO against SOS, SOO
//     against OSO), the correlations cannot tell the isomers apart: they see
//     chains only through their lengths P, Q, R and unsaturation only
//     through counts. Wesdorp's entropy of fusion carries a term R ln 2 for
//     an asymmetric TAG (a racemate: Wesdorp 1990; Marangoni & Wesdorp 2013,
//     ch. 9, the entropy equation), which the melting-point fit absorbed
//     for chain-length asymmetry (through y) but never saw for this kind. We
//     add it in beta' and beta at fixed enthalpy: 1/Tm' = 1/Tm + R ln2/dH.
//     Our reading, marked as such; it puts SSO about 3.6 K below SOS, as
//     the measured order has it (SOS beta-1 43.0 C, Arishima et al. 1991;
//     SSO's most stable form, beta', melts near 41 C, from memory).
//  2. Measured values replace correlated ones where a published melting
//     point or enthalpy of the pure TAG in that form is known
//     (measuredTAGs, each with its source).
//  3. Order of the polymorphs. TAG polymorphism is monotropic: the least
//     stable form, alpha, melts lowest. Where the correlations put alpha
//     above beta' (linoleic and linolenic TAGs, through alpha increments
//     that were partly guessed), alpha is capped at beta', and an alpha
//     enthalpy that is not positive or exceeds beta”s takes beta”s
//     entropy of fusion (dH = Tm_alpha dS_beta'). Where beta' melts above
//     beta, an asymmetric TAG (sn-1 and sn-3 acids differ) is taken as
//     beta'-stable, as asymmetric mixed TAGs such as PPO and SSO are: they
//     do not reach a beta form (Sato & Ueno in Bailey's Industrial Oil and
//     Fat Products, 6th ed. (2005), ch. 3, from memory), so the model's
//     beta entry for it is its beta' form. A symmetric TAG, or one whose
//     beta melting point was measured, is beta-stable (monoacid and SUS
//     TAGs are), so there the correlated beta' is the wrong one and is
//     capped at beta. Hence alpha <= beta' <= beta for every TAG.
//
// Sn-1 and sn-3 enter symmetrically, so mirror images melt alike.
func MeltingOf(a, b, c catalogue.FattyAcid, p Polymorph) Melting {
	return meltingSet(a, b, c, parsedAnchors())[p.resolve()-Alpha]
}

// meltingSet is MeltingOf for all three polymorphs (alpha, beta', beta),
// with the measured values already parsed.
func meltingSet(a, b, c catalogue.FattyAcid, anchors []anchor) [3]Melting {
	var m [3]Melting
	for i, p := range []Polymorph{Alpha, BetaPrime, Beta} {
		m[i] = correlated(a, b, c, p)
	}
	if a.Carbons == c.Carbons && kindOf(a) != kindOf(c) {
		for i := 1; i < 3; i++ {
			if m[i].DH > 0 {
				m[i].Tm = 1 / (1/m[i].Tm + GasConstant*math.Ln2/m[i].DH)
			}
		}
	}
	mass := catalogue.TAGMolarMass(a, b, c)
	var measuredBeta bool
	for _, v := range anchors {
		if v.sn2 != b.Key || !((v.sn1 == a.Key && v.sn3 == c.Key) || (v.sn1 == c.Key && v.sn3 == a.Key)) {
			continue
		}
		i := v.form - Alpha
		if !math.IsNaN(v.tmC) {
			m[i].Tm = v.tmC + 273.15
			measuredBeta = measuredBeta || v.form == Beta
		}
		if !math.IsNaN(v.dhJg) {
			m[i].DH = v.dhJg * mass
		}
	}
	if m[1].Tm > m[2].Tm {
		if a.Key != c.Key && !measuredBeta {
			// a beta'-stable TAG: the most stable form it reaches is beta'.
			m[2] = m[1]
		} else {
			// a symmetric TAG, or one whose beta form was measured: beta
			// is the stable form, and the correlated beta' is too high.
			m[1].Tm = m[2].Tm
			m[1].DH = min(m[1].DH, m[2].DH)
		}
	}
	// alpha is the least stable form.
	if m[0].Tm > m[1].Tm {
		m[0].Tm = m[1].Tm
	}
	if m[0].DH <= 0 || m[0].DH > m[1].DH {
		m[0].DH = m[1].DH * m[0].Tm / m[1].Tm
	}
	return m
}

// measuredTAG is a published melting point (deg C) and/or enthalpy of fusion
// (J/g) of a pure TAG in one polymorph; NaN where the source gives none.
type measuredTAG struct {
	code   string // letter code, sn-1 sn-2 sn-3 (its mirror image matches too)
	form   Polymorph
	tmC    float64
	dhJg   float64
	source string
}

// anchor is a measuredTAG with its acids' keys, ready for matching.
type anchor struct {
	measuredTAG
	sn1, sn2, sn3 string
}

// parsedAnchors returns measuredTAGs with their codes parsed. The table is
// ours and its codes are valid (TestMeasuredTAGsParse).
func parsedAnchors() []anchor {
	ms := measuredTAGs()
	out := make([]anchor, 0, len(ms))
	for _, v := range ms {
		fs, err := catalogue.ParseTAGCode(v.code)
		if err != nil {
			continue
		}
		out = append(out, anchor{measuredTAG: v, sn1: fs[0].Key, sn2: fs[1].Key, sn3: fs[2].Key})
	}
	return out
}

// measuredTAGs lists the published pure-TAG values that replace the
// correlations (MeltingOf, step 2). Values read in the source say so;
// values recalled from handbook tables say "from memory".
func measuredTAGs() []measuredTAG {
	nan := math.NaN()
	return []measuredTAG{
		// Saturated monoacid TAGs, stable beta form: the correlations give
		// them 1-2 K low (LaLaLa 45.0, MMM 56.0, PPP 64.5, SSS 71.2 C).
		{"LaLaLa", Beta, 46.4, nan, "trilaurin beta, handbook tables of pure-TAG polymorphs (e.g. Small (1986), The Physical Chemistry of Lipids), from memory"},
		{"MMM", Beta, 57.0, nan, "trimyristin beta, handbook tables (e.g. Small 1986), from memory"},
		{"PPP", Beta, 66.0, nan, "tripalmitin beta, handbook tables (e.g. Small 1986), from memory"},
		{"SSS", Beta, 73.1, 221.6, "tristearin beta: dH 221.6 +- 1 J/g by adiabatic calorimetry, J. Chem. Eng. Data 50 (2005) 1624-1630 (read in the abstract); Tm from handbook tables (e.g. Small 1986), from memory"},
		// Triolein and trielaidin.
		{"OOO", Beta, 5.1, nan, "triolein beta, handbook tables (e.g. Small 1986), from memory"},
		{"EEE", Beta, 314.83 - 273.15, 177.4, "trielaidin beta: triple point 314.83 K, dH 177.4 J/g, 'Investigation of the thermal behavior of trielaidin between 10 K and 360 K' (read in the abstract)"},
		{"EEE", Alpha, 288 - 273.15, 95.1, "trielaidin alpha: Tm about 288 K by DSC, dH 95.1 J/g calculated, same paper (read in the abstract)"},
		// Symmetric SUS TAGs of palm and shea fats, most stable form.
		{"POP", Beta, 36.7, nan, "POP beta-1, Arishima, Sagi, Mori & Sato (1991), J. Am. Oil Chem. Soc. 68, doi:10.1007/BF02662157 (read in the abstract)"},
		{"POS", Beta, 35.9, nan, "rac-POS beta, Arishima et al. (1991), same paper (read in the abstract)"},
		{"SOS", Beta, 43.0, nan, "SOS beta-1, Arishima et al. (1991), same paper (read in the abstract)"},
	}
}
