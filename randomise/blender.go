package randomise

import (
	"fmt"
	"math"

	"lipoplan/catalogue"
)

// Blender forms the positional TAG distribution of final blends made from a
// fixed list of stocks: some blended as they are (their native TAGs, as
// Distribute takes them) and some fed to one reactor whose product is their
// interesterified mix (chemical or enzymatic, run to equilibrium). All
// blends share one acid set, so the result of Mix can go straight into one
// prepared TAG set of the solid-fat model; Mix uses no maps and allocates
// nothing, for an optimiser that forms many nearby blends.
//
// TAG moles are conserved by blending and by interesterification, so the
// final distribution is the mole-weighted sum of the native distributions of
// the directly blended stocks and of the reactor's product, each stock's TAG
// moles being its mass share over its mean TAG molar mass (as Distribute).
type Blender struct {
	Acids  []catalogue.FattyAcid
	Notes  []string // the TAG model's assumptions (e.g. a stock without sn-2 data)
	stocks []*catalogue.Stock
	src    []source
	m1     []float64 // scratch: the reactor feed's positional profiles
	m2     []float64
	m3     []float64
}

// NewBlender prepares the stocks. A stock whose composition the TAG model
// cannot use (no fatty-acid profile and no TAG profile, or a profile
// Stock.CheckProfiles refuses) is bad input naming it.
func NewBlender(stocks []*catalogue.Stock) (*Blender, error) {
	if len(stocks) == 0 {
		return nil, catalogue.Badf("the blend names no stock; give at least one")
	}
	parts := make([]catalogue.Part, len(stocks))
	for i, st := range stocks {
		if st == nil {
			return nil, fmt.Errorf("randomise: blender stock %d is nil", i)
		}
		if len(st.FattyAcids) == 0 && len(st.TAGs) == 0 {
			return nil, catalogue.Badf("stock %q has neither a fatty-acid profile nor a TAG profile, so the TAG model cannot predict its solid fat; add [stock.fatty_acids]", st.ID)
		}
		if err := st.CheckProfiles().Err(); err != nil {
			return nil, err
		}
		parts[i] = catalogue.Part{Stock: st, Pct: 1}
	}
	acids := acidSet(parts)
	n := len(acids)
	b := &Blender{Acids: acids, stocks: stocks, src: make([]source, len(stocks)),
		m1: make([]float64, n), m2: make([]float64, n), m3: make([]float64, n)}
	for i, st := range stocks {
		src, notes, err := stockSource(st, acids, true)
		if err != nil {
			return nil, err
		}
		src.weight = 1
		b.src[i] = src
		b.Notes = append(b.Notes, notes...)
	}
	return b, nil
}

// Len is the length of a distribution over the blender's acids (n^3).
func (b *Blender) Len() int { n := len(b.Acids); return n * n * n }

// Mix writes into out (length Len, indexed as Distribution.Mol) the mole
// fractions of the final blend with direct[j] % by mass of stock j blended
// as it is and feed[j] % by mass of stock j through the reactor (method
// Chemical or Enzymatic; either slice may be nil, shares need not add to
// 100). The reactor's product is the equilibrium of Distribute at degree 1:
// chemical x_i x_j x_k over the feed's overall acid fractions; enzymatic
// y13_i y2_j y13_k, each glycerol keeping its sn-2 acid.
func (b *Blender) Mix(direct, feed []float64, method Method, out []float64) error {
	n := len(b.Acids)
	if len(out) != n*n*n {
		return fmt.Errorf("randomise: blend distribution has room for %d species, want %d", len(out), n*n*n)
	}
	if (direct != nil && len(direct) != len(b.src)) || (feed != nil && len(feed) != len(b.src)) {
		return fmt.Errorf("randomise: blend shares for %d and %d stocks, want %d", len(direct), len(feed), len(b.src))
	}
	clear(out)
	var moles float64
	for j := range b.src {
		if direct == nil || direct[j] <= 0 {
			continue
		}
		w := direct[j] / b.src[j].meanMass
		b.src[j].addTo(out, n, w)
		moles += w
	}
	var feedMoles float64
	clear(b.m1)
	clear(b.m2)
	clear(b.m3)
	for j := range b.src {
		if feed == nil || feed[j] <= 0 {
			continue
		}
		s := &b.src[j]
		w := feed[j] / s.meanMass
		s.weight = w
		s.marginals(n, b.m1, b.m2, b.m3)
		s.weight = 1
		feedMoles += w
	}
	if feedMoles > 0 {
		y13, y2 := b.m1, b.m2
		switch method {
		case Chemical:
			for i := range y13 {
				y13[i] = (b.m1[i] + b.m2[i] + b.m3[i]) / (3 * feedMoles)
			}
			y2 = y13
		case Enzymatic:
			for i := range y13 {
				y13[i] = (b.m1[i] + b.m3[i]) / (2 * feedMoles)
				y2[i] = b.m2[i] / feedMoles
			}
		default:
			return catalogue.Badf("reactor method %q is not known; use chemical or enzymatic", method)
		}
		addProduct(out, n, feedMoles, y13, y2, y13)
		moles += feedMoles
	}
	if !(moles > 0) || math.IsInf(moles, 0) {
		return catalogue.Badf("the blend's shares add up to %v; give at least one stock a share above 0", moles)
	}
	for i := range out {
		out[i] /= moles
	}
	return nil
}
