package sle

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"lipoplan/blend"
	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// Options choose the model variant.
type Options struct {
	// Polymorph whose pure-TAG melting properties are used for every solid
	// phase; zero means DefaultPolymorph.
	Polymorph Polymorph
}

// DefaultOptions are the options the CLI uses.
func DefaultOptions() Options { return Options{Polymorph: DefaultPolymorph} }

// Set is the TAG list of one set of acids with each TAG's melting properties
// precomputed: the positional species (sn-1, sn-2, sn-3) of a distribution
// over those acids are grouped into TAG identities by merging mirror images
// (ABC with CBA), which melt alike. Build it once per acid set and call Curve
// for as many compositions as needed (no maps on that path). A Set is never
// changed after NewSet: goroutines may share it, each with its own Work.
type Set struct {
	Acids []catalogue.FattyAcid
	opt   Options
	n     int
	// group[idx] is the TAG identity of positional species idx (i*n+j)*n+k.
	group []int32
	// per TAG identity
	mass []float64 // g/mol
	tm   []float64 // K
	dhR  []float64 // dH/R, K
}

// NewSet precomputes the TAG identities of all species over acids and their
// melting properties in the chosen polymorph.
func NewSet(acids []catalogue.FattyAcid, opt Options) *Set {
	n := len(acids)
	m := n * n * (n + 1) / 2
	s := &Set{Acids: acids, opt: opt, n: n, group: make([]int32, n*n*n),
		mass: make([]float64, 0, m), tm: make([]float64, 0, m), dhR: make([]float64, 0, m)}
	form := opt.Polymorph.resolve() - Alpha
	anchors := parsedAnchors()
	mass := make([]float64, n)
	for i, f := range acids {
		mass[i] = f.MolarMass()
	}
	base := catalogue.Glycerol.Mass() - 3*catalogue.Water.Mass()
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			for k := i; k < n; k++ {
				g := int32(len(s.mass))
				s.group[(i*n+j)*n+k] = g
				s.group[(k*n+j)*n+i] = g
				a, b, c := acids[i], acids[j], acids[k]
				p := meltingSet(a, b, c, anchors)[form]
				// glycerol + 3 acids - 3 water (condensation), as catalogue.TAGMolarMass
				s.mass = append(s.mass, base+mass[i]+mass[j]+mass[k])
				s.tm = append(s.tm, p.Tm)
				s.dhR = append(s.dhR, p.DH/GasConstant)
			}
		}
	}
	return s
}

// Len is the number of TAG identities (n^2 (n+1) / 2 for n acids).
func (s *Set) Len() int { return len(s.mass) }

// Work holds the scratch slices of one Curve call; reuse it to avoid
// allocation in loops (a zero Work is ready to use; not safe for concurrent
// use).
type Work struct {
	z, xs, mass, tm, dhR []float64
	acc                  []float64
	order                []int
}

// Curve predicts the SFC (mass % solid) at each temperature (deg C) of the
// TAG composition mol (positional mole fractions over s.Acids, indexed as
// randomise.Distribution.Mol), writing into out (len(temps)). w may be nil.
func (s *Set) Curve(mol []float64, temps []float64, out []float64, w *Work) error {
	if len(mol) != s.n*s.n*s.n {
		return fmt.Errorf("sle: composition has %d species, want %d for %d acids", len(mol), s.n*s.n*s.n, s.n)
	}
	if len(out) < len(temps) {
		return fmt.Errorf("sle: output has room for %d temperatures, want %d", len(out), len(temps))
	}
	for _, t := range temps {
		if math.IsNaN(t) || math.IsInf(t, 0) || t <= -273.15 {
			return catalogue.Badf("SFC temperature %v C is not a finite temperature above absolute zero", t)
		}
	}
	if w == nil {
		w = &Work{}
	}
	// group positional species into TAG identities
	w.acc = grow(w.acc, len(s.mass))
	clear(w.acc)
	for idx, v := range mol {
		if v > 0 {
			w.acc[s.group[idx]] += v
		} else if v < 0 || math.IsNaN(v) {
			return fmt.Errorf("sle: species %d has mole fraction %v", idx, v)
		}
	}
	w.z, w.mass, w.tm, w.dhR = w.z[:0], w.mass[:0], w.tm[:0], w.dhR[:0]
	var total, totalMass float64
	for g, v := range w.acc {
		if v <= 0 {
			continue
		}
		w.z = append(w.z, v)
		w.mass = append(w.mass, s.mass[g])
		w.tm = append(w.tm, s.tm[g])
		w.dhR = append(w.dhR, s.dhR[g])
		total += v
		totalMass += v * s.mass[g]
	}
	if total <= 0 {
		return fmt.Errorf("sle: empty TAG composition")
	}
	for i := range w.z {
		w.z[i] /= total
	}
	totalMass /= total
	w.xs = grow(w.xs, len(w.z))
	// Solve from the highest temperature down: the liquid fraction rises
	// with temperature, so each solution bounds the next root from above,
	// which is where LiquidFractionFrom must start.
	w.order = w.order[:0]
	for i := range temps {
		w.order = append(w.order, i)
	}
	slices.SortFunc(w.order, func(a, b int) int { return cmp.Compare(temps[b], temps[a]) })
	L := 1.0
	for _, ti := range w.order {
		tk := temps[ti] + 273.15
		for i := range w.z {
			if w.dhR[i] <= 0 || tk >= w.tm[i] {
				w.xs[i] = 1
			} else {
				w.xs[i] = math.Exp(w.dhR[i] * (1/w.tm[i] - 1/tk))
			}
		}
		L = LiquidFractionFrom(w.z, w.xs, L)
		var solid float64
		for i, zi := range w.z {
			if si := zi - L*w.xs[i]; si > 0 {
				solid += si * w.mass[i]
			}
		}
		out[ti] = 100 * solid / totalMass
	}
	return nil
}

func grow(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	return s[:n]
}

// Predict is the SFC (% solid by mass, what pulsed NMR measures: AOCS Cd
// 16b-93, ISO 8292-1) of a TAG distribution at each temperature (deg C),
// from the solid-liquid equilibrium of an ideal liquid with pure-TAG solid
// phases in one polymorph; pure-TAG melting points and enthalpies from
// Wesdorp's correlations (MeltingOf), solubility from the Hildebrand
// equation (Solubility), phase split by LiquidFraction.
//
// Pure-TAG solids (no mixed crystals) and an ideal liquid are the simplest
// SLE model: it ignores solid solutions between similar TAGs, which would
// raise the solid, and non-ideal mixing and incomplete crystallisation in the
// tempering time of the measurement, which lower it. See FitStock for how
// far it is from measured curves.
func Predict(d *randomise.Distribution, temps []float64, opt Options) (map[float64]float64, error) {
	if d == nil || len(d.Acids) == 0 {
		return nil, fmt.Errorf("sle: no TAG distribution to predict from")
	}
	s := NewSet(d.Acids, opt)
	out := make([]float64, len(temps))
	if err := s.Curve(d.Mol, temps, out, nil); err != nil {
		return nil, err
	}
	res := make(map[float64]float64, len(temps))
	for i, t := range temps {
		res[t] = out[i]
	}
	return res, nil
}

// PredictParts predicts the SFC of a mix of stocks (shares in % by mass)
// after the process (native, chemical or enzymatic interesterification at
// the given degree, see randomise.Distribute). The notes are the TAG model's
// assumptions (e.g. missing sn-2 data).
func PredictParts(parts []blend.Part, method randomise.Method, degree float64, temps []float64, opt Options) (map[float64]float64, []string, error) {
	d, err := randomise.Distribute(parts, method, degree)
	if err != nil {
		return nil, nil, fmt.Errorf("predicted SFC: %w", err)
	}
	sfc, err := Predict(d, temps, opt)
	if err != nil {
		return nil, nil, fmt.Errorf("predicted SFC: %w", err)
	}
	return sfc, d.Notes, nil
}
