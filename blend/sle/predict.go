package sle

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"lipoplan/catalogue"
	"lipoplan/randomise"
)

// Options choose the model variant.
type Options struct {
	// Polymorph whose pure-TAG melting properties are used for every solid
	// phase; zero means DefaultPolymorph.
	Polymorph Polymorph
	// Solids says which TAGs may share a solid phase; zero means
	// DefaultSolids.
	Solids SolidModel
	// Shift is added to the melting point of every TAG of a class (K),
	// indexed by ClassS3 ... ClassU3: the calibration's parameters (Fit).
	Shift Shifts
}

// Shifts are melting-point shifts in K per TAG class.
type Shifts [5]float64

// The TAG classes of Shifts: saturation patterns with S a straight chain
// (saturated or trans) and U a cis-unsaturated one.
const (
	ClassS3  = iota // SSS
	ClassSUS        // symmetric S2U
	ClassSSU        // asymmetric S2U
	ClassSU2        // SUU and USU
	ClassU3         // UUU
)

// ClassName is the name of class c (ClassS3 ... ClassU3) as calibration
// files and reports write it.
func ClassName(c int) string {
	return [...]string{"S3", "SUS", "SSU", "SU2", "U3"}[c]
}

// DefaultOptions are the options the CLI uses when no calibration is given.
func DefaultOptions() Options { return Options{Polymorph: DefaultPolymorph, Solids: DefaultSolids} }

// SolidModel says which TAGs crystallise together.
type SolidModel int

// The solid-phase models. Natural fats crystallise partly as mixed crystals:
// binary phase diagrams of palmitic and stearic TAGs show solid solutions
// where an asymmetric TAG is involved and eutectics elsewhere (Knoester, de
// Bruijne & van den Tempel (1972), Chem. Phys. Lipids 9:309, abstract read),
// and TAGs of different saturation patterns (POP with OOP) form eutectics
// (Zhang, Ueno, Miura & Sato (2007), JAOCS, abstract read). The solution
// model lets only TAGs of one saturation pattern and one acyl carbon
// number share an ideal solid solution (e.g. POS with PLS; LaLaM with
// LaMLa), the closest isomorphs. Measured against the typical curves of
// testdata/sfc-typical.toml it does better for lauric fats and worse for
// palm fractions than pure solids, and worse overall (README, Methods), so
// pure solids are the default.
const (
	// PureSolids: every TAG crystallises as its own pure solid.
	PureSolids SolidModel = iota + 1
	// IsomorphSolutions: ideal solid solutions of the TAGs of one
	// saturation pattern (SSS, SUS, SSU, USU, SUU, UUU; mirror images
	// together; trans chains count as straight, saturated-like chains) and
	// one acyl carbon number.
	IsomorphSolutions
)

// DefaultSolids is the solid model used when Options leave it unset.
const DefaultSolids = PureSolids

// String names the model as reports write it.
func (m SolidModel) String() string {
	if m.resolve() == IsomorphSolutions {
		return "ideal solid solutions of TAGs of one saturation pattern and carbon number"
	}
	return "pure-TAG solids"
}

// ParseSolidModel reads "pure" or "isomorph".
func ParseSolidModel(s string) (SolidModel, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "pure", "pure-tag", "":
		return PureSolids, nil
	case "isomorph", "isomorph-solutions", "solutions":
		return IsomorphSolutions, nil
	}
	return 0, catalogue.Badf("solid model %q is not known; use pure or isomorph", s)
}

// Key is the solid model's name in calibration files ("pure", "isomorph").
func (m SolidModel) Key() string {
	if m.resolve() == IsomorphSolutions {
		return "isomorph"
	}
	return "pure"
}

func (m SolidModel) resolve() SolidModel {
	if m < PureSolids || m > IsomorphSolutions {
		return DefaultSolids
	}
	return m
}

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
	// Identities are numbered so that those of one solid phase are
	// consecutive: phase g holds identities start[g]..start[g+1]-1.
	group []int32
	start []int
	// per TAG identity
	mass  []float64 // g/mol
	tm    []float64 // K, with opt.Shift applied
	dhR   []float64 // dH/R, K
	class []int8    // ClassS3 ... ClassU3
}

// NewSet precomputes the TAG identities of all species over acids, their
// melting properties in the chosen polymorph and their solid phases.
func NewSet(acids []catalogue.FattyAcid, opt Options) *Set {
	n := len(acids)
	m := n * n * (n + 1) / 2
	opt.Polymorph = opt.Polymorph.resolve()
	opt.Solids = opt.Solids.resolve()
	form := opt.Polymorph - Alpha
	anchors := parsedAnchors()
	mass := make([]float64, n)
	straight := make([]bool, n)
	for i, f := range acids {
		mass[i] = f.MolarMass()
		straight[i] = f.DoubleBonds == 0 || f.Trans
	}
	base := catalogue.Glycerol.Mass() - 3*catalogue.Water.Mass()
	type ident struct {
		i, j, k int
		phase   int
		class   int8
		m       Melting
	}
	ids := make([]ident, 0, m)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			for k := i; k < n; k++ {
				a, b, c := acids[i], acids[j], acids[k]
				pat := patternOf(straight[i], straight[j], straight[k])
				m := meltingSet(a, b, c, anchors)[form]
				m.Tm += opt.Shift[pat.class()]
				ids = append(ids, ident{i: i, j: j, k: k, phase: phaseOf(opt.Solids, pat, a.Carbons+b.Carbons+c.Carbons), class: int8(pat.class()), m: m})
			}
		}
	}
	if opt.Solids != PureSolids {
		slices.SortStableFunc(ids, func(x, y ident) int { return cmp.Compare(x.phase, y.phase) })
	}
	s := &Set{Acids: acids, opt: opt, n: n, group: make([]int32, n*n*n),
		mass: make([]float64, len(ids)), tm: make([]float64, len(ids)), dhR: make([]float64, len(ids)), class: make([]int8, len(ids))}
	for g, id := range ids {
		s.group[(id.i*n+id.j)*n+id.k] = int32(g)
		s.group[(id.k*n+id.j)*n+id.i] = int32(g)
		// glycerol + 3 acids - 3 water (condensation), as catalogue.TAGMolarMass
		s.mass[g] = base + mass[id.i] + mass[id.j] + mass[id.k]
		s.tm[g] = id.m.Tm
		s.dhR[g] = id.m.DH / GasConstant
		s.class[g] = id.class
		if opt.Solids != PureSolids && (g == 0 || ids[g-1].phase != id.phase) {
			s.start = append(s.start, g)
		}
	}
	s.start = append(s.start, len(ids))
	return s
}

// pattern is a TAG's saturation pattern with sn-1/sn-3 mirror images
// together (0 UUU, 1 SUU, 2 USU, 3 SSU, 4 SUS, 5 SSS); S is a straight chain
// (saturated or trans), U a cis-unsaturated one.
type pattern int

func patternOf(s1, s2, s3 bool) pattern {
	outer := 0
	if s1 {
		outer++
	}
	if s3 {
		outer++
	}
	switch {
	case s2 && outer == 2:
		return 5
	case !s2 && outer == 2:
		return 4
	case s2 && outer == 1:
		return 3
	case s2 && outer == 0:
		return 2
	case !s2 && outer == 1:
		return 1
	}
	return 0
}

// class is the index of the pattern's class in Shifts: S3, SUS, SSU, SU2
// (USU and SUU), U3.
func (p pattern) class() int {
	switch p {
	case 5:
		return ClassS3
	case 4:
		return ClassSUS
	case 3:
		return ClassSSU
	case 2, 1:
		return ClassSU2
	}
	return ClassU3
}

// phaseOf is the solid phase of a TAG under model sm: 0 for pure solids
// (unused), else its saturation pattern and acyl carbon number together.
func phaseOf(sm SolidModel, p pattern, cn int) int {
	if sm == PureSolids {
		return 0
	}
	return int(p)*1000 + cn
}

// Shifted returns a Set like s whose melting points carry the class shifts
// shift instead of s's own; it shares everything but the melting points
// with s.
func (s *Set) Shifted(shift Shifts) *Set {
	out := *s
	out.opt.Shift = shift
	out.tm = make([]float64, len(s.tm))
	for i, t := range s.tm {
		out.tm[i] = t - s.opt.Shift[s.class[i]] + shift[s.class[i]]
	}
	return &out
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
	w                    []float64
	ids                  []int32
	phases               Phases
}

// Curve predicts the SFC (mass % solid) at each temperature (deg C) of the
// TAG composition mol (positional mole fractions over s.Acids, indexed as
// randomise.Distribution.Mol), writing into out (len(temps)). w may be nil.
func (s *Set) Curve(mol []float64, temps []float64, out []float64, w *Work) error {
	return s.curve(mol, temps, out, w, nil)
}

// Prepared is a Set with every TAG's inverse solubility 1/xs tabulated at
// fixed temperatures, for the many Curve calls of an optimiser at those
// temperatures (no exponentials on that path).
type Prepared struct {
	set   *Set
	temps []float64
	inv   [][]float64 // [temperature][identity] exp((dH/R)(1/T - 1/Tm)), exponent clipped to ±600
}

// Prepare tabulates s at temps (deg C).
func (s *Set) Prepare(temps []float64) (*Prepared, error) {
	if err := checkTemps(temps); err != nil {
		return nil, err
	}
	p := &Prepared{set: s, temps: append([]float64(nil), temps...), inv: make([][]float64, len(temps))}
	for ti, t := range temps {
		p.inv[ti] = make([]float64, len(s.tm))
		s.inverseSolubility(t+273.15, p.inv[ti])
	}
	return p, nil
}

// Temps are the temperatures the table holds (deg C).
func (p *Prepared) Temps() []float64 { return p.temps }

// Set is the TAG set the table was made from.
func (p *Prepared) Set() *Set { return p.set }

// Curve is Set.Curve at the prepared temperatures.
func (p *Prepared) Curve(mol []float64, out []float64, w *Work) error {
	return p.set.curve(mol, p.temps, out, w, p.inv)
}

// inverseSolubility fills out[i] = 1/xs_i = exp((dH_i/R)(1/T - 1/Tm_i)) at
// T (K), the exponent clipped to ±600 so that it stays finite (far below
// Tm the TAG is simply solid, far above simply liquid).
func (s *Set) inverseSolubility(tk float64, out []float64) {
	for i := range out {
		out[i] = math.Exp(min(max(s.dhR[i]*(1/tk-1/s.tm[i]), -600), 600))
	}
}

func checkTemps(temps []float64) error {
	for _, t := range temps {
		if math.IsNaN(t) || math.IsInf(t, 0) || t <= -273.15 {
			return catalogue.Badf("SFC temperature %v C is not a finite temperature above absolute zero", t)
		}
	}
	return nil
}

// curve is Curve with an optional table of inverse solubilities per
// temperature (Prepared); nil computes them.
func (s *Set) curve(mol []float64, temps []float64, out []float64, w *Work, inv [][]float64) error {
	if len(mol) != s.n*s.n*s.n {
		return fmt.Errorf("sle: composition has %d species, want %d for %d acids", len(mol), s.n*s.n*s.n, s.n)
	}
	if len(out) < len(temps) {
		return fmt.Errorf("sle: output has room for %d temperatures, want %d", len(out), len(temps))
	}
	if inv == nil {
		if err := checkTemps(temps); err != nil {
			return err
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
	if s.opt.Solids != PureSolids {
		return s.curveSolutions(temps, out, w, inv)
	}
	w.z, w.mass, w.tm, w.dhR, w.ids = w.z[:0], w.mass[:0], w.tm[:0], w.dhR[:0], w.ids[:0]
	var total, totalMass float64
	for g, v := range w.acc {
		if v <= 0 {
			continue
		}
		w.z = append(w.z, v)
		w.mass = append(w.mass, s.mass[g])
		w.tm = append(w.tm, s.tm[g])
		w.dhR = append(w.dhR, s.dhR[g])
		w.ids = append(w.ids, int32(g))
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
	L := 1.0
	for _, ti := range w.hotFirst(temps) {
		tk := temps[ti] + 273.15
		if inv != nil {
			row := inv[ti]
			for i, g := range w.ids {
				w.xs[i] = min(1, 1/row[g])
			}
		} else {
			for i := range w.z {
				if w.dhR[i] <= 0 || tk >= w.tm[i] {
					w.xs[i] = 1
				} else {
					w.xs[i] = math.Exp(w.dhR[i] * (1/w.tm[i] - 1/tk))
				}
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

// hotFirst returns the indices of temps from the highest temperature down.
func (w *Work) hotFirst(temps []float64) []int {
	w.order = w.order[:0]
	for i := range temps {
		w.order = append(w.order, i)
	}
	slices.SortFunc(w.order, func(a, b int) int { return cmp.Compare(temps[b], temps[a]) })
	return w.order
}

// curveSolutions is Curve for the solid-solution models: the TAG mole
// fractions are in w.acc (identity order, phases consecutive); each
// temperature's equilibrium comes from Phases, warm-started from the
// previous (higher) temperature.
func (s *Set) curveSolutions(temps []float64, out []float64, w *Work, inv [][]float64) error {
	var total, totalMass float64
	for g, v := range w.acc {
		total += v
		totalMass += v * s.mass[g]
	}
	if total <= 0 {
		return fmt.Errorf("sle: empty TAG composition")
	}
	w.z = grow(w.z, len(w.acc))
	for g, v := range w.acc {
		w.z[g] = v / total
	}
	totalMass /= total
	w.w = grow(w.w, len(w.z))
	warm := false
	for _, ti := range w.hotFirst(temps) {
		wv := w.w
		if inv != nil {
			wv = inv[ti]
		} else {
			s.inverseSolubility(temps[ti]+273.15, wv)
		}
		if err := w.phases.Solve(w.z, wv, s.start, warm); err != nil {
			return err
		}
		warm = true
		var solid float64
		for g := 0; g+1 < len(s.start); g++ {
			if w.phases.Solid(g) == 0 {
				continue
			}
			for i := s.start[g]; i < s.start[g+1]; i++ {
				solid += w.phases.SolidMoles(w.z, wv, g, i) * s.mass[i]
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
func PredictParts(parts []catalogue.Part, method randomise.Method, degree float64, temps []float64, opt Options) (map[float64]float64, []string, error) {
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
