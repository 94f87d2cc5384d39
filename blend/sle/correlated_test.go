package sle

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"

	"lipoplan/catalogue"
)

// The correlations as transcribed, against the published equations worked
// by hand (Wesdorp 1990; Marangoni & Wesdorp 2013, ch. 9): a saturated
// monoacid TAG has x = y = 0, so Tm = T_inf (1 + A0/n - A0 B0 / n^2) and
// dH = h n + h0 + h_xy (1 - exp(-(x0/k)^2)).
//
//	SSS beta: n = 54, A0 = -8.0481, B0 = 2.66923:
//	  Tm = 401.15 (1 - 0.149039 + 0.0073667) = 344.32 K;
//	  dH = 3.89*54 - 17.16 - 22.29 (1 - exp(-(0.77/2.88)^2)) = 191.36 kJ/mol.
//	PPP beta' : n = 48, A0 = -8.4543, B0 = -0.26501:
//	  Tm = 401.15 (1 - 0.176131 - 0.0009724) = 330.10 K.
//	POP beta (x = 2, y = 0, one oleic chain): A = A0 + 2 Ax + 4 Ax2 + A_O
//	  = -8.0481 + 0.14826 - 0.13944 - 2.93 = -10.96928,
//	  B = B0 + 2 Bx + 4 Bx2 + B_O = 2.66923 - 0.6335 + 0.343868 - 3.7
//	  = -1.320402; n = 50: Tm = 401.15 (1 - 0.2193856 - 0.0057933) = 310.82 K.
func TestCorrelationsByHand(t *testing.T) {
	get := func(k string) catalogue.FattyAcid {
		f, _ := catalogue.Lookup(k)
		return f
	}
	s, p, o := get("C18:0"), get("C16:0"), get("C18:1")
	sss := correlated(s, s, s, Beta)
	assert.InDelta(t, 344.32, sss.Tm, 0.01)
	assert.InDelta(t, 191.36e3, sss.DH, 10)
	assert.InDelta(t, 330.10, correlated(p, p, p, BetaPrime).Tm, 0.01)
	assert.InDelta(t, 310.82, correlated(p, o, p, Beta).Tm, 0.01)
	// dH of SSS by hand
	want := 3.89*54 - 17.16 - 22.29*(1-math.Exp(-math.Pow(0.77/2.88, 2)))
	assert.InDelta(t, want*1000, sss.DH, 1e-6)
}
