package randomise_test

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// randomStock draws a stock over a random subset of the reference acids,
// with or without an sn-2 profile or a measured TAG profile.
func randomStock(r *rand.Rand, id string) catalogue.Stock {
	table := catalogue.FattyAcids()
	s := catalogue.Stock{ID: id, FattyAcids: map[string]float64{}}
	for _, f := range table {
		if r.Float64() < 0.4 {
			s.FattyAcids[f.Key] = 100 * r.Float64()
		}
	}
	if len(s.FattyAcids) == 0 {
		s.FattyAcids["C16:0"] = 100
	}
	switch r.IntN(3) {
	case 1:
		s.SN2 = map[string]float64{}
		for k := range s.FattyAcids {
			if r.Float64() < 0.7 {
				s.SN2[k] = 100 * r.Float64()
			}
		}
		if len(s.SN2) == 0 {
			s.SN2 = nil
		}
	case 2:
		s.TAGs = map[string]float64{}
		for n := 1 + r.IntN(6); n > 0; n-- {
			code := ""
			for p := 0; p < 3; p++ {
				code += table[r.IntN(len(table))].Code
			}
			if _, err := catalogue.ParseTAGCode(code); err == nil {
				s.TAGs[code] += 100 * r.Float64()
			}
		}
		if len(s.TAGs) == 0 {
			s.TAGs = nil
		}
	}
	return s
}

func randomParts(r *rand.Rand) []catalogue.Part {
	n := 1 + r.IntN(4)
	parts := make([]catalogue.Part, n)
	for i := range parts {
		s := randomStock(r, string(rune('a'+i)))
		parts[i] = catalogue.Part{Stock: &s, Pct: 1 + 99*r.Float64()}
	}
	return parts
}

// Property checks on random compositions: mole and mass shares of species
// and groups sum to 100, classes partition the fat, degree 0 is the start and
// degree 1 the equilibrium, and the fast grouping agrees with a plain
// map-based reference implementation written from the definitions.
func TestPropertiesOnRandomCompositions(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 11))
	for trial := 0; trial < 150; trial++ {
		parts := randomParts(r)
		method := []randomise.Method{randomise.Native, randomise.Chemical, randomise.Enzymatic}[trial%3]
		deg := r.Float64()
		d := distribute(t, parts, method, deg)
		s := d.Summarise()
		for _, sh := range []randomise.Shares{s.Classes.Mol, s.Classes.Wt} {
			require.InDelta(t, 100, sh.S3+sh.S2U+sh.SU2+sh.U3, 1e-9)
			require.InDelta(t, sh.S2U, sh.SUS+sh.SSU, 1e-9)
			require.InDelta(t, sh.SU2, sh.USU+sh.UUS, 1e-9)
		}
		var cnMol, cnWt, ecnMol, ecnWt float64
		for _, g := range s.CN {
			cnMol += g.MolPct
			cnWt += g.WtPct
		}
		for _, g := range s.ECN {
			ecnMol += g.MolPct
			ecnWt += g.WtPct
		}
		require.InDelta(t, 100, cnMol, 1e-9)
		require.InDelta(t, 100, cnWt, 1e-9)
		require.InDelta(t, 100, ecnMol, 1e-9)
		require.InDelta(t, 100, ecnWt, 1e-9)
		require.InDelta(t, 100, sumMol(d), 1e-9)
		var spMol, spWt float64
		for _, sp := range d.Species() {
			spMol += sp.MolPct
			spWt += sp.WtPct
		}
		require.InDelta(t, 100, spMol, 1e-9)
		require.InDelta(t, 100, spWt, 1e-9)

		ref := reference(t, parts, method, deg)
		compareWithReference(t, d, s, ref)

		if method != randomise.Native {
			start := distribute(t, parts, randomise.Native, 0)
			zero := distribute(t, parts, method, 0)
			require.InDeltaSlice(t, start.Mol, zero.Mol, 1e-12)
			one := distribute(t, parts, method, 1)
			sn1, _, sn3 := one.Positions()
			require.InDeltaSlice(t, sn1, sn3, 1e-12)
			require.InDeltaSlice(t, start.FattyAcidMol(), one.FattyAcidMol(), 1e-12)
		}
	}
}

// refDist is the reference result: mol fractions keyed "k1|k2|k3".
type refDist map[[3]string]float64

// reference recomputes a distribution from the definitions with maps keyed
// by acid names: wt% FAME -> mol through the FAME masses, x13 = (3x - x2)/2
// with clamping, TAG moles per stock = mass / mean TAG molar mass, then
// random (chemical) or sn-2-preserving (enzymatic) reshuffling and the
// linear partial mix.
func reference(t *testing.T, parts []catalogue.Part, method randomise.Method, deg float64) refDist {
	t.Helper()
	tagMass := func(k [3]string) float64 {
		var fs [3]catalogue.FattyAcid
		for p := range k {
			fs[p], _ = catalogue.Lookup(k[p])
		}
		return catalogue.TAGMolarMass(fs[0], fs[1], fs[2])
	}
	start := refDist{}
	var totalPct float64
	for _, p := range parts {
		totalPct += p.Pct
	}
	var totalMoles float64
	stockDists := []refDist{}
	weights := []float64{}
	for _, p := range parts {
		sd := refDist{}
		st := p.Stock
		if len(st.TAGs) > 0 {
			var sum float64
			for _, v := range st.TAGs {
				sum += v
			}
			for code, v := range st.TAGs {
				fs, err := catalogue.ParseTAGCode(code)
				require.NoError(t, err)
				sd[[3]string{fs[0].Key, fs[1].Key, fs[2].Key}] += v / sum / 2
				sd[[3]string{fs[2].Key, fs[1].Key, fs[0].Key}] += v / sum / 2
			}
		} else {
			x := map[string]float64{}
			var n float64
			for k, w := range st.FattyAcids {
				f, _ := catalogue.Lookup(k)
				x[k] = w / f.EsterMolarMass()
				n += x[k]
			}
			for k := range x {
				x[k] /= n
			}
			x2 := x
			if len(st.SN2) > 0 {
				x2 = map[string]float64{}
				var s2 float64
				for _, v := range st.SN2 {
					s2 += v
				}
				for k, v := range st.SN2 {
					x2[k] = v / s2
				}
			}
			x13 := map[string]float64{}
			var s13 float64
			for k := range x {
				v := (3*x[k] - x2[k]) / 2
				if v < 0 {
					v = 0
				}
				x13[k] = v
				s13 += v
			}
			for k := range x13 {
				x13[k] /= s13
			}
			for a, va := range x13 {
				for b, vb := range x2 {
					for c, vc := range x13 {
						sd[[3]string{a, b, c}] += va * vb * vc
					}
				}
			}
		}
		var mean float64
		for k, v := range sd {
			mean += v * tagMass(k)
		}
		w := p.Pct / totalPct / mean
		totalMoles += w
		stockDists = append(stockDists, sd)
		weights = append(weights, w)
	}
	for i, sd := range stockDists {
		for k, v := range sd {
			start[k] += v * weights[i] / totalMoles
		}
	}
	if method == randomise.Native {
		return start
	}
	pos := [3]map[string]float64{{}, {}, {}}
	for k, v := range start {
		for p := 0; p < 3; p++ {
			pos[p][k[p]] += v
		}
	}
	y13, y2 := map[string]float64{}, map[string]float64{}
	for a := range pos[0] {
		y13[a] += 0
	}
	for p := 0; p < 3; p++ {
		for a, v := range pos[p] {
			if method == randomise.Chemical {
				y13[a] += v / 3
				y2[a] += v / 3
			} else if p == 1 {
				y2[a] += v
			} else {
				y13[a] += v / 2
			}
		}
	}
	out := refDist{}
	for k, v := range start {
		out[k] += (1 - deg) * v
	}
	for a, va := range y13 {
		for b, vb := range y2 {
			for c, vc := range y13 {
				if va*vb*vc > 0 {
					out[[3]string{a, b, c}] += deg * va * vb * vc
				}
			}
		}
	}
	return out
}

func compareWithReference(t *testing.T, d *randomise.Distribution, s randomise.Summary, ref refDist) {
	t.Helper()
	n := len(d.Acids)
	var refTotal float64
	for _, v := range ref {
		refTotal += v
	}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			for k := 0; k < n; k++ {
				key := [3]string{d.Acids[i].Key, d.Acids[j].Key, d.Acids[k].Key}
				require.InDelta(t, ref[key]/refTotal, d.At(i, j, k), 1e-12, "%v", key)
			}
		}
	}
	classes := map[string]float64{}
	cn := map[int]float64{}
	ecn := map[int]float64{}
	for key, v := range ref {
		pat := ""
		c, e := 0, 0
		for _, a := range key {
			f, _ := catalogue.Lookup(a)
			if f.DoubleBonds == 0 {
				pat += "S"
			} else {
				pat += "U"
			}
			c += f.Carbons
			e += f.Carbons - 2*f.DoubleBonds
		}
		classes[pat] += 100 * v / refTotal
		cn[c] += 100 * v / refTotal
		ecn[e] += 100 * v / refTotal
	}
	m := s.Classes.Mol
	assert.InDelta(t, classes["SSS"], m.S3, 1e-9)
	assert.InDelta(t, classes["SUS"], m.SUS, 1e-9)
	assert.InDelta(t, classes["SSU"]+classes["USS"], m.SSU, 1e-9)
	assert.InDelta(t, classes["USU"], m.USU, 1e-9)
	assert.InDelta(t, classes["SUU"]+classes["UUS"], m.UUS, 1e-9)
	assert.InDelta(t, classes["UUU"], m.U3, 1e-9)
	for _, g := range s.CN {
		assert.InDelta(t, cn[g.Key], g.MolPct, 1e-9, "CN %d", g.Key)
	}
	for _, g := range s.ECN {
		assert.InDelta(t, ecn[g.Key], g.MolPct, 1e-9, "ECN %d", g.Key)
	}
}

// FuzzDistribute feeds arbitrary profiles, TAG codes, shares and degrees:
// Distribute must either fail with an error or return a distribution whose
// classes sum to 100; it never panics.
func FuzzDistribute(f *testing.F) {
	f.Add("C16:0", 44.0, "C18:1", 40.0, "POP", 50.0, 1.0, 0.5, uint8(1))
	f.Add("C18:9", -1.0, "", 0.0, "PQP", 10.0, 0.0, 2.0, uint8(2))
	f.Add("C12:0", 1e308, "C18:1t", 1e-300, "LnLnLn", 1e308, 5.0, 1.0, uint8(0))
	f.Fuzz(func(t *testing.T, k1 string, v1 float64, k2 string, v2 float64, code string, tv, pct, deg float64, m uint8) {
		s := catalogue.Stock{ID: "f", FattyAcids: map[string]float64{k1: v1, k2: v2}}
		switch m % 3 {
		case 1:
			s.SN2 = map[string]float64{k2: v2, k1: v1 / 2}
		case 2:
			s.TAGs = map[string]float64{code: tv}
		}
		method := []randomise.Method{randomise.Native, randomise.Chemical, randomise.Enzymatic}[m%3]
		d, err := randomise.Distribute([]catalogue.Part{{Stock: &s, Pct: pct}}, method, deg)
		if err != nil {
			return
		}
		c := d.Classes().Mol
		if sum := c.S3 + c.S2U + c.SU2 + c.U3; !(sum > 100-1e-6 && sum < 100+1e-6) {
			t.Fatalf("classes sum to %v", sum)
		}
		_, _ = randomise.Harden(s)
	})
}
