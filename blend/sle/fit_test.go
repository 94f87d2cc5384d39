package sle_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/blend/sle"
	"lipoplan/catalogue"
)

// TestFitDemoStocks is the model's report card: for every demo stock with a
// measured SFC curve, the error of the predicted curve (native TAGs) in
// % solid, for each polymorph. The demo curves are typical shapes recalled
// from memory (see catalogue/demo/stocks.toml), so the table shows the size
// of the model's error, not a validation. The assertions check only what
// the definitions guarantee; the model's quality is logged, not asserted.
func TestFitDemoStocks(t *testing.T) {
	cat := catalogue.DemoStocks()
	var table strings.Builder
	table.WriteString("\nstock           polymorph  MAE   max  (at C)  bias  points\n")
	for _, p := range []sle.Polymorph{sle.Beta, sle.BetaPrime, sle.Alpha} {
		fits, err := sle.FitCatalogue(cat, sle.Options{Polymorph: p})
		require.NoError(t, err)
		var sumMAE float64
		for _, f := range fits {
			st, ok := cat.Find(f.Stock)
			require.True(t, ok)
			assert.Equal(t, len(st.SFC), f.Points, f.Stock)
			assert.LessOrEqual(t, f.MAE, f.Max+1e-12, "mean absolute deviation never exceeds the largest")
			assert.LessOrEqual(t, math.Abs(f.Bias), f.MAE+1e-12, "|mean signed deviation| <= mean absolute deviation")
			assert.False(t, math.IsNaN(f.MAE) || math.IsInf(f.MAE, 0))
			table.WriteString(strings.TrimRight(
				fmt.Sprintf("%-15s %-9s %5.1f %5.1f  (%2.0f)  %+5.1f  %d", f.Stock, p, f.MAE, f.Max, f.MaxAt, f.Bias, f.Points), " ") + "\n")
			sumMAE += f.MAE
		}
		table.WriteString(fmt.Sprintf("%-15s %-9s %5.1f  (mean MAE over %d stocks)\n\n", "all", p, sumMAE/float64(len(fits)), len(fits)))
	}
	t.Log(table.String())
}

func TestFitStockNeedsAMeasuredCurve(t *testing.T) {
	st := catalogue.Stock{ID: "no-curve", FattyAcids: map[string]float64{"C16:0": 50, "C18:1": 50}}
	_, err := sle.FitStock(&st, sle.Options{})
	require.Error(t, err)
	assert.True(t, catalogue.IsBadInput(err))
	assert.Contains(t, err.Error(), `"no-curve"`)
}

func TestFitStockArithmetic(t *testing.T) {
	// Pure tristearin is all solid at 10 and 20 C and all liquid at 80 C
	// (beta melts near 73 C, DESIGN section 5). Against a curve that says
	// 100, 90, 0 the deviations are 0, 10, 0 % solid, worked by hand.
	st := catalogue.Stock{ID: "sss", FattyAcids: map[string]float64{"C18:0": 100},
		SFC: catalogue.Curve{{Temp: 10, Solid: 100}, {Temp: 20, Solid: 90}, {Temp: 80, Solid: 0}}}
	f, err := sle.FitStock(&st, sle.Options{Polymorph: sle.Beta})
	require.NoError(t, err)
	// predicted 100, 100, 0 against 100, 90, 0: deviations 0, 10, 0
	assert.InDelta(t, 10.0/3, f.MAE, 1e-9)
	assert.InDelta(t, 10, f.Max, 1e-9)
	assert.Equal(t, 20.0, f.MaxAt)
	assert.InDelta(t, 10.0/3, f.Bias, 1e-9)
	assert.Equal(t, 3, f.Points)
}
