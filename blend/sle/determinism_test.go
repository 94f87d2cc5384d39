package sle_test

import (
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// The TAG model gives a bit-identical SFC for the same stocks and shares on
// every build: a predicted-SFC limit the optimiser holds a blend to must not
// be met on one run and missed on the next (reproducible reports, common
// practice). Go ranges over a map in a new random order each time, so 50
// models built in one process see many orders of the stocks' sn-2 and TAG
// profiles; sums taken in that order differed in the last bits. A measured
// TAG profile naming both mirror images of an asymmetric TAG (POO and OOP)
// is among the stocks.
func TestBlendModelSameBitsEveryBuild(t *testing.T) {
	cat := catalogue.DemoStocks()
	var sts []*catalogue.Stock
	for i := range cat.Stocks {
		sts = append(sts, &cat.Stocks[i])
	}
	sts = append(sts, &catalogue.Stock{ID: "cbe", TAGs: map[string]float64{
		"POP": 31.7, "POS": 38.3, "SOS": 17.9, "POO": 2.3, "OOP": 1.9, "PPO": 1.1, "OPP": 0.7,
		"SOO": 2.9, "OOO": 1.6, "PLP": 1.6,
	}})
	direct, feed := make([]float64, len(sts)), make([]float64, len(sts))
	for j := range direct {
		direct[j] = 4
	}
	feed[7], feed[8] = 20, 10
	temps := []float64{10, 20, 30, 35, 40}
	for _, method := range []randomise.Method{randomise.Chemical, randomise.Enzymatic} {
		var first []float64
		for i := 0; i < 50; i++ {
			m, err := sle.NewBlendModel(sts, method, temps, sle.DefaultOptions())
			require.NoError(t, err)
			out := make([]float64, len(temps))
			require.NoError(t, m.SFC(direct, feed, out))
			if first == nil {
				first = out
			}
			require.Equal(t, first, out, "%s, build %d", method, i)
		}
	}
}

// A calibration's shifts are read in key order: the same file gets the
// same verdict every run, and two spellings of one class are refused
// rather than one of them winning at random.
func TestOptionsFromShiftOrder(t *testing.T) {
	bad := &catalogue.Calibration{Polymorph: "beta'", Shift: map[string]float64{"XXX": 1, "YYY": 2, "ZZZ": 3, "S3": 1}}
	_, err := sle.OptionsFrom(bad)
	require.Error(t, err)
	for i := 0; i < 50; i++ {
		_, e := sle.OptionsFrom(bad)
		require.EqualError(t, e, err.Error())
	}
	require.Contains(t, err.Error(), "[shift] XXX is not a TAG class")
	twice := &catalogue.Calibration{Polymorph: "beta'", Shift: map[string]float64{"SUS": 1, "sus": -1}}
	_, err = sle.OptionsFrom(twice)
	require.ErrorContains(t, err, "[shift] SUS and sus both name the class SUS")
	require.True(t, catalogue.IsBadInput(err))
}
