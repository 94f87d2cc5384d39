package randomise_test

import (
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// cocoaButterEquivalent is a measured TAG profile (mol% by letter code)
// that names both mirror images of two asymmetric TAGs (POO and OOP, PPO
// and OPP), so that two codes add to the same species; the shares are
// chosen for the test, not a standard.
func cocoaButterEquivalent() catalogue.Stock {
	return catalogue.Stock{ID: "cbe", TAGs: map[string]float64{
		"POP": 31.7, "POS": 38.3, "SOS": 17.9, "POO": 2.3, "OOP": 1.9, "PPO": 1.1, "OPP": 0.7,
		"SOO": 2.9, "OOO": 1.6, "PLP": 1.6,
	}}
}

// The same blend gives a bit-identical distribution, and the same stock a
// bit-identical hardstock, every time: the TAG model's SFC and every report
// built on it must not change in the last digits between runs on the same
// files (reproducible reports, common practice). Go ranges over a map in a
// new random order each time, so 50 calls in one process see many orders;
// the sums of the sn-2 profile, of a measured TAG profile and of a
// hardened profile were taken in that order and differed in the last bits.
func TestSameInputSameBits(t *testing.T) {
	palm, soy, pko, cbe := palmOil(), soybeanOil(), palmKernelOil(), cocoaButterEquivalent()
	parts := []catalogue.Part{{Stock: &palm, Pct: 40}, {Stock: &soy, Pct: 25}, {Stock: &pko, Pct: 20}, {Stock: &cbe, Pct: 15}}
	for _, m := range []randomise.Method{randomise.Native, randomise.Chemical, randomise.Enzymatic} {
		first, err := randomise.Distribute(parts, m, 0.5)
		require.NoError(t, err)
		for i := 0; i < 50; i++ {
			d, err := randomise.Distribute(parts, m, 0.5)
			require.NoError(t, err)
			require.Equal(t, first, d, "%s, call %d", m, i)
		}
	}
	soy.TAGs = map[string]float64{"LLL": 15, "LLO": 20, "OLL": 10, "LLLn": 5, "LnLL": 5, "PLL": 15, "LLP": 15, "OOL": 15}
	first, err := randomise.Harden(soy)
	require.NoError(t, err)
	for i := 0; i < 50; i++ {
		h, err := randomise.Harden(soy)
		require.NoError(t, err)
		require.Equal(t, first, h, "Harden, call %d", i)
	}
}
