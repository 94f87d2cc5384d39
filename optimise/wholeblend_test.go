package optimise

import (
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/blend"
	"lipoplan/blend/sle"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// A stock the TAG model makes two notes about has them in the report in
// the model's order on every call: the same files give the same report
// (reproducible reports, common practice); they used to be read back from a
// map, in Go's random order. The stock's measured TAG profile sums to 90
// mol% and disagrees with its FA profile (two notes, measuredSource).
func TestWholeBlendNotesInModelOrder(t *testing.T) {
	odd := &catalogue.Stock{ID: "odd", TAGs: map[string]float64{"POP": 50, "SOS": 40},
		FattyAcids: map[string]float64{"C16:0": 50, "C18:1": 50}}
	soy, ok := catalogue.DemoStocks().Find("soybean")
	require.True(t, ok)
	used := []blend.Part{{Stock: odd, Pct: 60}, {Stock: soy, Pct: 40}}
	var first []string
	for i := 0; i < 20; i++ {
		m, err := sle.NewBlendModel([]*catalogue.Stock{odd, soy}, randomise.Chemical, []float64{10, 20, 30}, sle.DefaultOptions())
		require.NoError(t, err)
		require.Len(t, m.Notes(), 2, "%q", m.Notes())
		wb := &wholeBlend{opt: sle.DefaultOptions(), model: m}
		got := wb.notes(used)
		require.Equal(t, m.Notes(), got[:2], "call %d", i)
		if first == nil {
			first = got
		}
		require.Equal(t, first, got, "call %d", i)
	}
}
