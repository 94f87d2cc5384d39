package optimise

import (
	"math"

	"lipoplan/blend"
	"lipoplan/catalogue"
)

// mix computes the properties of the blend parts (parts[k] is stock
// idx[k]) from the stocks' profiles that build already holds (lay.prof,
// computed here for a stock build did not profile), as the sums
// Σ_j (x_j/Σx)·P_j of the stocks' own values: blend.Mix documents every
// property but the mean molar mass as linear in mass share (the same
// linearity the model's rows rest on: a row's activity is that sum), and
// its mean molar mass is 3·M(KOH)/SV with SV_j·M_j = 3·M(KOH) for each
// stock, so the blend's is 1/Σ_j (w_j/M_j). SFC is blend.SFC. The result
// equals blend.Mix(parts, temps) to rounding (mix_test.go checks every
// field); a blend with a stock outside what the profiles cover (a fatty
// acid outside the reference table, a stock with no known fatty acid) is
// handed to blend.Mix itself.
func (l *layout) mix(parts []blend.Part, idx []int, temps []float64) (blend.Properties, error) {
	var total float64
	for _, pt := range parts {
		total += pt.Pct
	}
	if len(parts) == 0 || total <= 0 || math.IsNaN(total) || math.IsInf(total, 0) {
		return blend.Mix(parts, temps) // its own message
	}
	nref := 0
	for k, j := range idx {
		p := l.prof[j]
		if p == nil { // build needed no profile of this stock
			pp := blend.Profile(parts[k].Stock.FattyAcids)
			p, l.prof[j] = &pp, &pp
		}
		if p.MeanMolarMass <= 0 || p.SV <= 0 {
			return blend.Mix(parts, temps)
		}
		if s := l.share[j]; s != nil {
			nref = len(s)
		}
	}
	var out blend.Properties
	var inv float64 // Σ w_j / M_j
	var dense []float64
	if nref > 0 {
		dense = make([]float64, nref)
	}
	fa := map[string]float64{}
	for k, pt := range parts {
		j := idx[k]
		p := l.prof[j]
		w := pt.Pct / total
		out.IV += w * p.IV
		out.SV += w * p.SV
		out.SAFA += w * p.SAFA
		out.MUFA += w * p.MUFA
		out.PUFA += w * p.PUFA
		out.Trans += w * p.Trans
		out.Omega3 += w * p.Omega3
		out.Cox += w * p.Cox
		inv += w / p.MeanMolarMass
		if s := l.share[j]; s != nil && dense != nil {
			for r, v := range s {
				dense[r] += w * v
			}
			continue
		}
		for key, v := range pt.Stock.FattyAcids {
			fa[key] += w * v
		}
	}
	if dense != nil {
		keys := catalogue.Keys()
		for r, v := range dense {
			if v != 0 {
				fa[keys[r]] += v
			}
		}
	}
	for key, v := range fa {
		if v == 0 {
			delete(fa, key) // as blend.Profile: zero weights are left out
		}
	}
	out.FattyAcids = fa
	out.MeanMolarMass = 1 / inv
	out.SFC, out.SFCMissing = blend.SFC(parts, temps)
	return out, nil
}
