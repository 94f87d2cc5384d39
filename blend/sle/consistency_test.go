package sle_test

import (
	"testing"

	"github.com/stretchr/testify/assert"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
)

// acidsOfTrade are the acids of the consistency checks: lauric, myristic,
// palmitic, stearic, oleic, linoleic, linolenic and elaidic.
func acidsOfTrade(t *testing.T) []catalogue.FattyAcid {
	var fs []catalogue.FattyAcid
	for _, c := range []string{"La", "M", "P", "S", "O", "L", "Ln", "E"} {
		f, ok := catalogue.LookupCode(c)
		if !ok {
			t.Fatalf("acid %s missing", c)
		}
		fs = append(fs, f)
	}
	return fs
}

// Thermodynamic consistency over all 512 positional TAGs of those acids:
// TAG polymorphism is monotropic, so alpha melts at or below beta', beta' at
// or below beta (Sato & Ueno in Bailey's Industrial Oil and Fat Products,
// 6th ed. (2005), ch. 3; Small (1986); from memory), and every enthalpy of
// fusion is positive (a solid that melts absorbs heat: second law).
func TestEveryTAGIsThermodynamicallyConsistent(t *testing.T) {
	fs := acidsOfTrade(t)
	n := 0
	for _, a := range fs {
		for _, b := range fs {
			for _, c := range fs {
				al, bp, be := sle.MeltingOf(a, b, c, sle.Alpha), sle.MeltingOf(a, b, c, sle.BetaPrime), sle.MeltingOf(a, b, c, sle.Beta)
				name := a.Code + b.Code + c.Code
				assert.LessOrEqual(t, al.Tm, bp.Tm, "%s: alpha melts above beta'", name)
				assert.LessOrEqual(t, bp.Tm, be.Tm, "%s: beta' melts above beta", name)
				for _, m := range []sle.Melting{al, bp, be} {
					assert.Greater(t, m.DH, 0.0, "%s: enthalpy of fusion", name)
					assert.Greater(t, m.Tm, 150.0, "%s: melting point above 150 K", name)
					assert.Less(t, m.Tm, 373.15, "%s: melting point below 100 C", name)
				}
				assert.LessOrEqual(t, al.DH, bp.DH, "%s: alpha enthalpy above beta'", name)
				// mirror images are one TAG
				assert.Equal(t, be, sle.MeltingOf(c, b, a, sle.Beta), "%s mirror", name)
				n++
			}
		}
	}
	assert.Equal(t, 512, n)
}

// The symmetric isomer melts above the asymmetric one in the stable form:
// SOS above SSO, POP above PPO (Sato & Ueno, Bailey's 6th ed., ch. 3; SOS
// beta-1 43.0 C and POP beta-1 36.7 C by Arishima et al. 1991, abstract
// read; SSO and PPO stay beta' near 41 and 35 C, from memory). Checked for
// every saturated acid S and cis-unsaturated acid U of the trade set:
// SUS above SSU, and USU above UUS... where both chains of the pair have the
// same length the correlations alone could not tell them apart.
func TestSymmetricIsomerMeltsAboveAsymmetric(t *testing.T) {
	fs := acidsOfTrade(t)
	var sat, unsat []catalogue.FattyAcid
	for _, f := range fs {
		switch {
		case f.DoubleBonds == 0:
			sat = append(sat, f)
		case !f.Trans:
			unsat = append(unsat, f)
		}
	}
	for _, s := range sat {
		for _, u := range unsat {
			sus := sle.MeltingOf(s, u, s, sle.Beta)
			ssu := sle.MeltingOf(s, s, u, sle.Beta)
			assert.Greater(t, sus.Tm, ssu.Tm, "%s%s%s above %s%s%s", s.Code, u.Code, s.Code, s.Code, s.Code, u.Code)
		}
	}
	sos, sso := melting(t, "SOS", sle.Beta), melting(t, "SSO", sle.Beta)
	assert.Greater(t, sos.Tm-sso.Tm, 1.0, "SOS at least 1 K above SSO")
	assert.Greater(t, melting(t, "OSO", sle.Beta).Tm, melting(t, "SOO", sle.Beta).Tm, "OSO above SOO")
}

func TestUnsaturationLowersMeltingPoint(t *testing.T) {
	// Each cis double bond lowers a TAG's melting point: SSS > SOS > SOO >
	// OOO > LLL (common practice; handbook ordering); a trans chain melts
	// above its cis isomer: EEE > OOO (common practice).
	order := []string{"SSS", "SOS", "SOO", "OOO", "LLL"}
	for i := 1; i < len(order); i++ {
		assert.Greater(t, melting(t, order[i-1], sle.Beta).Tm, melting(t, order[i], sle.Beta).Tm, "%s vs %s", order[i-1], order[i])
	}
	assert.Greater(t, melting(t, "EEE", sle.Beta).Tm, melting(t, "OOO", sle.Beta).Tm)
}
