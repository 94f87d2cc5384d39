package optimise

import (
	"math"
	"math/rand/v2"

	"lipoplan/blend"
	"lipoplan/catalogue"
)

// Random blend problems for the reference suites. The data are invented
// (synthetic stocks, not real oils); what the tests check is that engines
// and outside solvers agree on them, not the numbers themselves.

var genFAs = []string{"C12:0", "C14:0", "C16:0", "C18:0", "C18:1", "C18:2", "C18:3", "C18:1t"}

var genTemps = []float64{10, 20, 30, 40}

func inf() float64 { return math.Inf(1) }

func bound(lo, hi float64) catalogue.Bound { return catalogue.Bound{Min: lo, Max: hi} }

// genStocks makes n synthetic stocks: a few fatty acids each (weights summing
// to 100), a falling SFC curve at 10..40 °C, a price and sometimes a limited
// availability.
func genStocks(r *rand.Rand, n int) *catalogue.Catalogue {
	cat := &catalogue.Catalogue{File: "random.toml", Currency: "EUR"}
	for j := 0; j < n; j++ {
		s := catalogue.Stock{ID: "s" + string(rune('a'+j/26)) + string(rune('a'+j%26)), Price: 700 + 1800*r.Float64(), Available: math.Inf(1)}
		s.Name = "synthetic stock " + s.ID
		s.FattyAcids = map[string]float64{}
		k := 3 + r.IntN(5)
		var sum float64
		w := make(map[string]float64)
		for _, i := range r.Perm(len(genFAs))[:k] {
			v := r.ExpFloat64()
			if genFAs[i] == "C18:1t" {
				v *= 0.2
			}
			w[genFAs[i]] = v
			sum += v
		}
		for key, v := range w {
			s.FattyAcids[key] = 100 * v / sum
		}
		solid := 95 * r.Float64()
		for _, t := range genTemps {
			s.SFC = append(s.SFC, catalogue.Point{Temp: t, Solid: solid})
			solid *= 0.2 + 0.75*r.Float64()
		}
		cat.Stocks = append(cat.Stocks, s)
	}
	return cat
}

// genSpec makes a spec with up to nLimits limits that a hidden reference
// blend meets, so the programme is feasible: each limit sits a random margin
// around the reference blend's value, on one side or both. Availability and
// [use] caps are kept above the reference shares.
func genSpec(r *rand.Rand, cat *catalogue.Catalogue, nLimits int) *catalogue.Spec {
	n := len(cat.Stocks)
	spec := &catalogue.Spec{Name: "random spec", File: "random-spec.toml", Batch: 5 + 45*r.Float64()}
	ref := make([]float64, n)
	var sum float64
	for _, j := range r.Perm(n)[:1+r.IntN(min(n, 5))] {
		ref[j] = r.ExpFloat64()
		sum += ref[j]
	}
	var parts []blend.Part
	for j := range ref {
		ref[j] *= 100 / sum
		if ref[j] > 0 {
			parts = append(parts, blend.Part{Stock: &cat.Stocks[j], Pct: ref[j]})
		}
	}
	props, err := blend.Mix(parts, genTemps)
	if err != nil {
		panic(err)
	}
	for j := range cat.Stocks {
		s := &cat.Stocks[j]
		if r.Float64() < 0.3 {
			need := ref[j] * spec.Batch / 100
			s.Available = need*(1+r.Float64()) + spec.Batch*0.5*r.Float64()
		}
		if r.Float64() < 0.15 {
			spec.Use = append(spec.Use, catalogue.Use{Stock: s.ID, Bound: bound(math.Inf(-1), ref[j]+40*r.Float64())})
		}
	}
	type cand struct {
		name string
		temp float64
		sfc  bool
	}
	var cands []cand
	for _, p := range catalogue.Properties {
		cands = append(cands, cand{name: p})
	}
	for _, f := range genFAs {
		cands = append(cands, cand{name: f})
	}
	for _, t := range genTemps {
		cands = append(cands, cand{temp: t, sfc: true})
	}
	r.Shuffle(len(cands), func(a, b int) { cands[a], cands[b] = cands[b], cands[a] })
	if nLimits > len(cands) {
		nLimits = len(cands)
	}
	for _, c := range cands[:nLimits] {
		var v float64
		if c.sfc {
			v = props.SFC[c.temp]
		} else {
			v, _ = props.Value(c.name)
		}
		margin := (0.02 + 0.3*r.Float64()) * (1 + math.Abs(v))
		b := bound(v-margin, v+margin*(0.5+r.Float64()))
		switch r.IntN(3) {
		case 0:
			b.Min = math.Inf(-1)
		case 1:
			b.Max = math.Inf(1)
		}
		if c.sfc {
			spec.SFC = append(spec.SFC, catalogue.SFCLimit{Temp: c.temp, Bound: b})
		} else {
			spec.Limits = append(spec.Limits, catalogue.Limit{Name: c.name, Bound: b})
		}
	}
	spec.SortLimits()
	return spec
}

// nondegenerate reports whether every basic variable of an LP answer lies
// strictly inside its bounds: then the duals and cost ranges are unique and
// any two correct solvers must agree on them.
func nondegenerate(m *model, s *solution) bool {
	for k, st := range s.basis {
		if st != stBasic {
			continue
		}
		v, lo, up := 0.0, 0.0, 0.0
		if k < m.nCols {
			v, lo, up = s.x[k], m.colLo[k], m.colUp[k]
		} else {
			i := k - m.nCols
			v, lo, up = s.act[i], m.rowLo[i], m.rowUp[i]
		}
		if math.Abs(v-lo) < 1e-7*(1+math.Abs(lo)) || math.Abs(v-up) < 1e-7*(1+math.Abs(up)) {
			return false
		}
	}
	return true
}

func relClose(a, b, rel float64) bool {
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return a == b
	}
	return math.Abs(a-b) <= rel*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// propertyOf is a stock's own value of a limited quantity.
func propertyOf(s *catalogue.Stock, name string) (float64, bool) {
	return blend.Coefficient(s, name)
}
