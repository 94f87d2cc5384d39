package randomise_test

import (
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// blend12 is a three-stock blend over 12 fatty acids (1,728 positional
// species): palm oil and palm kernel oil with a lauric-free seed oil.
func blend12(tb testing.TB) []catalogue.Part {
	palm, pko := palmOil(), palmKernelOil()
	delete(palm.FattyAcids, "C20:1")
	delete(palm.FattyAcids, "C12:0")
	seed := catalogue.Stock{ID: "seed", FattyAcids: map[string]float64{
		"C16:0": 6, "C18:0": 3, "C18:1": 60, "C18:2": 20, "C18:3": 9, "C20:0": 1, "C22:0": 1}}
	parts := []catalogue.Part{{Stock: &palm, Pct: 50}, {Stock: &pko, Pct: 30}, {Stock: &seed, Pct: 20}}
	d, err := randomise.Distribute(parts, randomise.Native, 0)
	require.NoError(tb, err)
	require.Len(tb, d.Acids, 12)
	return parts
}

// BenchmarkDistribution12 is a performance target (DEVELOPERS.md, "Project
// decisions"): 12 acids with grouping under 100 us. A partial chemical
// reaction is the heaviest case (start and equilibrium are both built).
func BenchmarkDistribution12(b *testing.B) {
	parts := blend12(b)
	b.ReportAllocs()
	for b.Loop() {
		d, err := randomise.Distribute(parts, randomise.Chemical, 0.5)
		if err != nil {
			b.Fatal(err)
		}
		s := d.Summarise()
		if s.Count != 1728 {
			b.Fatal(s.Count)
		}
	}
}

// BenchmarkDistribution12Species adds the sorted species list (what the CLI
// shows) to the grouping.
func BenchmarkDistribution12Species(b *testing.B) {
	parts := blend12(b)
	b.ReportAllocs()
	for b.Loop() {
		d, err := randomise.Distribute(parts, randomise.Enzymatic, 1)
		if err != nil {
			b.Fatal(err)
		}
		_ = d.Summarise()
		if len(d.SpeciesBy(randomise.Regio)) == 0 {
			b.Fatal("no species")
		}
	}
}

// BenchmarkReference12 is the plain map-keyed implementation of the same
// computation (the test oracle), the in-run reference for the ratio.
func BenchmarkReference12(b *testing.B) {
	parts := blend12(b)
	t := &testing.T{}
	for b.Loop() {
		ref := reference(t, parts, randomise.Chemical, 0.5)
		if len(ref) != 1728 {
			b.Fatal(len(ref))
		}
	}
}
