package randomise_test

import (
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// palmOil is a mid-range palm oil: fatty acids inside the Codex CXS 210-1999
// (Standard for Named Vegetable Oils, Table 1) ranges for palm oil
// (C16:0 39.3-47.5, C18:0 3.5-6.0, C18:1 36.0-44.0, C18:2 9.0-12.0, C14:0
// 0.5-2.0; ranges from memory). The sn-2 profile is a typical literature
// profile of palm oil, from memory: sn-2 mostly oleic and linoleic with
// about 12 % palmitic.
func palmOil() catalogue.Stock {
	return catalogue.Stock{
		ID: "palm",
		FattyAcids: map[string]float64{
			"C12:0": 0.2, "C14:0": 1.0, "C16:0": 44.0, "C16:1": 0.2, "C18:0": 4.5,
			"C18:1": 39.2, "C18:2": 10.1, "C18:3": 0.3, "C20:0": 0.4, "C20:1": 0.1,
		},
		SN2: map[string]float64{
			"C14:0": 0.5, "C16:0": 12.0, "C18:0": 1.0, "C18:1": 65.0, "C18:2": 21.0, "C18:3": 0.5,
		},
	}
}

// soybeanOil is a mid-range soybean oil inside the Codex CXS 210-1999 ranges
// (C16:0 8.0-13.5, C18:0 2.0-5.4, C18:1 17-30, C18:2 48.0-59.0, C18:3
// 4.5-11.0; from memory). Its sn-2 profile is typical of seed oils, from
// memory: almost no saturates at sn-2.
func soybeanOil() catalogue.Stock {
	return catalogue.Stock{
		ID: "soy",
		FattyAcids: map[string]float64{
			"C14:0": 0.1, "C16:0": 10.5, "C16:1": 0.1, "C18:0": 4.0, "C18:1": 23.1,
			"C18:2": 53.5, "C18:3": 7.5, "C20:0": 0.4, "C20:1": 0.3, "C22:0": 0.4, "C24:0": 0.1,
		},
		SN2: map[string]float64{
			"C16:0": 1.0, "C18:0": 0.3, "C18:1": 22.0, "C18:2": 69.7, "C18:3": 7.0,
		},
	}
}

// palmKernelOil is a mid-range palm kernel oil inside the Codex CXS
// 210-1999 ranges (C8:0 2.4-6.2, C10:0 2.6-5.0, C12:0 45.0-55.0, C14:0
// 14.0-18.0, C16:0 6.5-10.0, C18:1 12.0-19.0; from memory); no sn-2 data.
func palmKernelOil() catalogue.Stock {
	return catalogue.Stock{
		ID: "pko",
		FattyAcids: map[string]float64{
			"C8:0": 3.6, "C10:0": 3.5, "C12:0": 48.0, "C14:0": 16.0, "C16:0": 8.5,
			"C18:0": 2.4, "C18:1": 15.4, "C18:2": 2.6,
		},
	}
}

// single makes a stock of one pure TAG, with its FA profile (100 % of the
// one acid) and its measured TAG profile.
func single(id, code string) catalogue.Stock {
	fs, err := catalogue.ParseTAGCode(code)
	if err != nil {
		panic(err)
	}
	fa := map[string]float64{}
	for _, f := range fs {
		fa[f.Key] += 100.0 / 3
	}
	return catalogue.Stock{ID: id, FattyAcids: fa, TAGs: map[string]float64{code: 100}}
}

// fatWithMol builds a FAME wt% profile from wanted mole fractions, the
// inverse of the conversion under test (w_i = x_i M_i / sum x M).
func fatWithMol(t *testing.T, x map[string]float64) map[string]float64 {
	t.Helper()
	var total float64
	for k, v := range x {
		f, ok := catalogue.Lookup(k)
		require.True(t, ok, k)
		total += v * f.EsterMolarMass()
	}
	out := map[string]float64{}
	for k, v := range x {
		f, _ := catalogue.Lookup(k)
		out[k] = 100 * v * f.EsterMolarMass() / total
	}
	return out
}

func distribute(t testing.TB, parts []catalogue.Part, m randomise.Method, degree float64) *randomise.Distribution {
	t.Helper()
	d, err := randomise.Distribute(parts, m, degree)
	require.NoError(t, err)
	return d
}

func speciesByTag(ss []randomise.Species) map[string]randomise.Species {
	out := map[string]randomise.Species{}
	for _, s := range ss {
		out[s.Tag] = s
	}
	return out
}
