// Package randomise predicts the positional triacylglycerol (TAG) composition
// of a fat or a blend of fats and what interesterification does to it:
//
//   - native: the 1,3-random-2-random distribution (Vander Wal 1960, JAOCS 37:18;
//     Coleman 1961, JAOCS 38:685 — references from memory) from each stock's sn-2
//     profile, or the stock's measured TAG profile when the catalogue has one;
//   - chemical interesterification: every position filled independently from
//     the whole reacting blend's fatty-acid mole fractions (fully random);
//   - enzymatic (sn-1,3-specific lipase) interesterification: each glycerol
//     keeps its sn-2 acid, positions 1 and 3 are randomised over the blend;
//   - partial reaction: a degree d in 0..1 mixes start and equilibrium.
//
// It groups the result the way the trade does (S3/S2U/SU2/U3 with SUS vs SSU,
// carbon number CN, equivalent carbon number ECN = CN - 2 x double bonds) and
// makes fully hydrogenated hardstocks (Harden).
//
// Representation: the acids of a distribution are an index into a small slice
// (Distribution.Acids) and the positional species are one flat []float64 of
// n^3 mole fractions, index (i*n+j)*n+k for the acids at sn-1, sn-2, sn-3.
// Grouping uses per-acid properties precomputed into slices; no maps are used
// on the n^3 paths.
package randomise

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"lipoplan/catalogue"
)

// Method is the process a blend goes through before its TAGs are counted.
type Method string

// The processes Distribute knows.
const (
	Native    Method = "native"    // no reaction: each stock's own TAGs
	Chemical  Method = "chemical"  // random interesterification (e.g. sodium methoxide)
	Enzymatic Method = "enzymatic" // sn-1,3-specific lipase interesterification
)

// ParseMethod reads a process name as written on the command line or in a
// spec ("native", "chemical", "enzymatic").
func ParseMethod(s string) (Method, error) {
	switch m := Method(strings.TrimSpace(s)); m {
	case Native, Chemical, Enzymatic:
		return m, nil
	}
	return "", catalogue.Badf("process %q is not known; use native, chemical or enzymatic", s)
}

// Distribution is the positional TAG composition of a fat.
type Distribution struct {
	// Acids are the fatty acids that occur, in reference-table order.
	Acids []catalogue.FattyAcid
	// Mol holds the mole fraction (sum 1) of every positional species: the
	// species with Acids[i] at sn-1, Acids[j] at sn-2, Acids[k] at sn-3 is
	// Mol[(i*n+j)*n+k] with n = len(Acids).
	Mol []float64
	// Method and Degree record how the distribution was made (Degree is 0
	// for Native).
	Method Method
	Degree float64
	// Notes are the assumptions and corrections a formulator should know
	// about (no sn-2 data, clamped sn-1,3 fractions, rescaled TAG profiles).
	Notes []string
}

// Index is the position of the species (sn-1 = i, sn-2 = j, sn-3 = k) in Mol.
func (d *Distribution) Index(i, j, k int) int {
	n := len(d.Acids)
	return (i*n+j)*n + k
}

// At returns the mole fraction of the species with acids i, j, k at sn-1,
// sn-2, sn-3.
func (d *Distribution) At(i, j, k int) float64 { return d.Mol[d.Index(i, j, k)] }

// Positions returns the mole fractions of each acid at sn-1, sn-2 and sn-3
// (each slice sums to 1).
func (d *Distribution) Positions() (sn1, sn2, sn3 []float64) {
	n := len(d.Acids)
	sn1, sn2, sn3 = make([]float64, n), make([]float64, n), make([]float64, n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			row := (i*n + j) * n
			for k := 0; k < n; k++ {
				v := d.Mol[row+k]
				sn1[i] += v
				sn2[j] += v
				sn3[k] += v
			}
		}
	}
	return sn1, sn2, sn3
}

// FattyAcidMol returns the overall mole fraction of each acid (mean of the
// three positions; sums to 1).
func (d *Distribution) FattyAcidMol() []float64 {
	a, b, c := d.Positions()
	out := make([]float64, len(a))
	for i := range out {
		out[i] = (a[i] + b[i] + c[i]) / 3
	}
	return out
}

// FattyAcids returns the fat's fatty-acid profile in wt% as FAME (what GC of
// the methyl esters reports), from the mole fractions and the methyl esters'
// molar masses.
func (d *Distribution) FattyAcids() map[string]float64 {
	x := d.FattyAcidMol()
	var total float64
	for i, f := range d.Acids {
		total += x[i] * f.EsterMolarMass()
	}
	out := make(map[string]float64, len(x))
	for i, f := range d.Acids {
		if x[i] > 0 {
			out[f.Key] = 100 * x[i] * f.EsterMolarMass() / total
		}
	}
	return out
}

// SN13 is the 1,3-random-2-random relation (Vander Wal; Coleman): with x the
// overall mole fraction of an acid and x2 its mole fraction at sn-2, the
// fraction at each of sn-1 and sn-3 is x13 = (3 x - x2) / 2, since the three
// positions together hold 3 x. Negative results (an sn-2 profile richer in an
// acid than the whole fat allows) are set to 0 and the sn-1,3 profile is
// renormalised; clamped lists the indices that were clamped.
func SN13(x, x2 []float64) (x13 []float64, clamped []int) {
	x13 = make([]float64, len(x))
	var sum float64
	for i := range x {
		v := (3*x[i] - x2[i]) / 2
		if v < 0 {
			if v < -1e-12 {
				clamped = append(clamped, i)
			}
			v = 0
		}
		x13[i] = v
		sum += v
	}
	if sum > 0 && (len(clamped) > 0 || math.Abs(sum-1) > 1e-12) {
		for i := range x13 {
			x13[i] /= sum
		}
	}
	return x13, clamped
}

// tagBase is the molar mass of glycerol less three water: a TAG's molar mass
// is tagBase plus the molar masses of its three free acids (condensation).
func tagBase() float64 { return catalogue.Glycerol.Mass() - 3*catalogue.Water.Mass() }

// source is one stock's starting TAGs: either factorised (a species has mole
// fraction p1[i] p2[j] p3[k]) or a sparse list of measured species.
type source struct {
	weight     float64 // share of the blend's TAG moles
	p1, p2, p3 []float64
	sparse     []entry
	meanMass   float64 // mean TAG molar mass, g/mol
}

type entry struct {
	idx  int
	frac float64
}

// Distribute predicts the positional TAG distribution of a mix of stocks
// (shares in % by mass, normalised) after the given process. For Chemical and
// Enzymatic, degree (0..1) is the extent of reaction: the result is
// (1 - degree) x start + degree x equilibrium in mole fractions, where start
// is the native blend; degree is ignored for Native.
//
// Native TAGs of a stock are its measured profile (Stock.TAGs, letter codes in
// sn-1, sn-2, sn-3 order) when present, otherwise the 1,3-random-2-random
// distribution from its FA profile and sn-2 profile, or a fully random one when
// the stock has no sn-2 data (and a note says so). Each stock's TAG moles are
// its mass share over its mean TAG molar mass. The reactions work on the mole
// fractions of the native blend, so the fatty-acid composition is conserved:
// chemical equilibrium is x_i x_j x_k with x the overall acid fractions;
// enzymatic equilibrium is y13_i y2_j y13_k with y2 the blend's sn-2 profile
// (every glycerol keeps its sn-2 acid; acyl migration is neglected) and y13 the
// blend's sn-1,3 profile.
func Distribute(parts []catalogue.Part, method Method, degree float64) (*Distribution, error) {
	if _, err := ParseMethod(string(method)); err != nil {
		return nil, err
	}
	if math.IsNaN(degree) || degree < 0 || degree > 1 {
		return nil, catalogue.Badf("degree of reaction %v is outside 0..1; give a fraction such as 0.5 (1 = full equilibrium)", degree)
	}
	total, err := catalogue.CheckParts(parts)
	if err != nil {
		return nil, err
	}
	for _, p := range parts {
		if p.Pct > 0 {
			if err := p.Stock.CheckProfiles().Err(); err != nil {
				return nil, err
			}
		}
	}
	acids := acidSet(parts)
	n := len(acids)
	d := &Distribution{Acids: acids, Mol: make([]float64, n*n*n), Method: method}
	if method != Native {
		d.Degree = degree
	}

	// The sn-2 profile matters unless a chemical reaction runs to the end.
	needSN2 := method != Chemical || degree < 1
	srcs := make([]source, 0, len(parts))
	var moles float64
	for _, p := range parts {
		if p.Pct == 0 {
			continue
		}
		src, notes, err := stockSource(p.Stock, acids, needSN2)
		if err != nil {
			return nil, err
		}
		d.Notes = append(d.Notes, notes...)
		src.weight = p.Pct / total / src.meanMass
		moles += src.weight
		srcs = append(srcs, src)
	}
	for i := range srcs {
		srcs[i].weight /= moles
	}

	startShare, eqShare := 1.0, 0.0
	if method != Native {
		startShare, eqShare = 1-degree, degree
	}
	if startShare > 0 {
		for i := range srcs {
			srcs[i].addTo(d.Mol, n, startShare*srcs[i].weight)
		}
	}
	if eqShare > 0 {
		m1, m2, m3 := make([]float64, n), make([]float64, n), make([]float64, n)
		for i := range srcs {
			srcs[i].marginals(n, m1, m2, m3)
		}
		var y13, y2 []float64
		switch method {
		case Chemical:
			y13 = make([]float64, n)
			for i := range y13 {
				y13[i] = (m1[i] + m2[i] + m3[i]) / 3
			}
			y2 = y13
		case Enzymatic:
			y13 = make([]float64, n)
			for i := range y13 {
				y13[i] = (m1[i] + m3[i]) / 2
			}
			y2 = m2
		}
		addProduct(d.Mol, n, eqShare, y13, y2, y13)
	}
	var sum float64
	for _, v := range d.Mol {
		sum += v
	}
	if sum <= 0 {
		return nil, fmt.Errorf("randomise: empty distribution")
	}
	for i := range d.Mol {
		d.Mol[i] /= sum
	}
	return d, nil
}

// addProduct adds share x p1[i] p2[j] p3[k] to every species. The product is
// formed as (p1[i] p3[k]) p2[j] so that mirror-image species get bit-identical
// values when p1 and p3 are the same profile.
func addProduct(mol []float64, n int, share float64, p1, p2, p3 []float64) {
	for i := 0; i < n; i++ {
		a := p1[i]
		if a == 0 {
			continue
		}
		for j := 0; j < n; j++ {
			b := p2[j]
			if b == 0 {
				continue
			}
			row := mol[(i*n+j)*n : (i*n+j)*n+n]
			for k, c := range p3[:n] {
				row[k] += a * c * b * share
			}
		}
	}
}

func (s *source) addTo(mol []float64, n int, share float64) {
	if s.sparse == nil {
		addProduct(mol, n, share, s.p1, s.p2, s.p3)
		return
	}
	for _, e := range s.sparse {
		mol[e.idx] += e.frac * share
	}
}

// marginals adds the source's weighted positional profiles to m1, m2, m3.
func (s *source) marginals(n int, m1, m2, m3 []float64) {
	if s.sparse == nil {
		for i := 0; i < n; i++ {
			m1[i] += s.weight * s.p1[i]
			m2[i] += s.weight * s.p2[i]
			m3[i] += s.weight * s.p3[i]
		}
		return
	}
	for _, e := range s.sparse {
		i, j, k := e.idx/(n*n), (e.idx/n)%n, e.idx%n
		m1[i] += s.weight * e.frac
		m2[j] += s.weight * e.frac
		m3[k] += s.weight * e.frac
	}
}

// acidSet collects every acid named by the stocks' FA, sn-2 and TAG profiles,
// in reference-table order. The profiles have passed Stock.CheckProfiles.
func acidSet(parts []catalogue.Part) []catalogue.FattyAcid {
	table := catalogue.FattyAcids()
	used := make([]bool, len(table))
	mark := func(key string) {
		if r := catalogue.Rank(key); r >= 0 {
			used[r] = true
		}
	}
	for _, p := range parts {
		if p.Pct == 0 {
			continue
		}
		st := p.Stock
		if len(st.TAGs) > 0 {
			for code, v := range st.TAGs {
				if fs, err := catalogue.ParseTAGCode(code); err == nil && v != 0 {
					for _, f := range fs {
						mark(f.Key)
					}
				}
			}
			continue
		}
		for k, v := range st.FattyAcids {
			if v != 0 {
				mark(k)
			}
		}
		for k, v := range st.SN2 {
			if v != 0 {
				mark(k)
			}
		}
	}
	var out []catalogue.FattyAcid
	for i, u := range used {
		if u {
			out = append(out, table[i])
		}
	}
	return out
}

func indexOf(acids []catalogue.FattyAcid, key string) int {
	return slices.IndexFunc(acids, func(f catalogue.FattyAcid) bool { return f.Key == key })
}

// stockSource builds the native TAGs of one stock over the given acids.
// needSN2 says whether to note a missing sn-2 profile.
func stockSource(st *catalogue.Stock, acids []catalogue.FattyAcid, needSN2 bool) (source, []string, error) {
	if len(st.TAGs) > 0 {
		return measuredSource(st, acids)
	}
	n := len(acids)
	fa, fx, err := catalogue.MolFractions(st.FattyAcids)
	if err != nil {
		return source{}, nil, catalogue.Badf("stock %q: %w", st.ID, err)
	}
	x := make([]float64, n)
	for i, f := range fa {
		x[indexOf(acids, f.Key)] = fx[i]
	}
	var notes []string
	var x2 []float64
	if len(st.SN2) == 0 {
		x2 = x
		if needSN2 {
			notes = append(notes, fmt.Sprintf("stock %q has no sn-2 profile: its acids are taken as randomly distributed over all three positions (natural vegetable oils carry more unsaturates at sn-2)", st.ID))
		}
	} else {
		x2 = make([]float64, n)
		for k, v := range st.SN2 {
			if v > 0 {
				x2[indexOf(acids, k)] = v
			}
		}
		var sum float64 // in acid order, not the map's random one
		for _, v := range x2 {
			sum += v
		}
		if sum <= 0 {
			return source{}, nil, catalogue.Badf("stock %q: the sn-2 profile adds up to 0; give mol%% at sn-2 or leave [stock.sn2] out", st.ID)
		}
		for i := range x2 {
			x2[i] /= sum
		}
	}
	x13, clamped := SN13(x, x2)
	if len(clamped) > 0 {
		var what []string
		for _, i := range clamped {
			what = append(what, fmt.Sprintf("%s %.2f mol%%", acids[i].Key, 100*(3*x[i]-x2[i])/2))
		}
		notes = append(notes, fmt.Sprintf("stock %q: sn-2 profile holds more of an acid than the whole fat allows; sn-1,3 fraction (3x - x2)/2 set to 0 for %s and sn-1,3 renormalised (the stock's overall FA composition shifts accordingly)",
			st.ID, strings.Join(what, ", ")))
	}
	src := source{p1: x13, p2: x2, p3: x13}
	ma := acidMasses(acids)
	src.meanMass = tagBase()
	for i := range acids {
		src.meanMass += (2*x13[i] + x2[i]) * ma[i]
	}
	return src, notes, nil
}

// measuredSource takes a stock's measured TAG profile (mol% by letter code in
// sn-1, sn-2, sn-3 order). Routine analysis (HPLC, GC by CN) does not tell
// sn-1 from sn-3, so a code naming different acids at the outer positions
// (e.g. "PPO") is shared equally between the two mirror images (PPO and OPP).
func measuredSource(st *catalogue.Stock, acids []catalogue.FattyAcid) (source, []string, error) {
	n := len(acids)
	ma := acidMasses(acids)
	// codes in byte order: a code and its mirror image (PPO, OPP) add to
	// the same species, and the sums must not follow Go's random map order
	codes := make([]string, 0, len(st.TAGs))
	for code, v := range st.TAGs {
		if v != 0 {
			codes = append(codes, code)
		}
	}
	slices.Sort(codes)
	acc := map[int]float64{}
	var sum float64
	for _, code := range codes {
		v := st.TAGs[code]
		fs, err := catalogue.ParseTAGCode(code)
		if err != nil { // Stock.CheckProfiles refuses it first
			return source{}, nil, fmt.Errorf("randomise: stock %q: %w", st.ID, err)
		}
		i, j, k := indexOf(acids, fs[0].Key), indexOf(acids, fs[1].Key), indexOf(acids, fs[2].Key)
		acc[(i*n+j)*n+k] += v / 2
		acc[(k*n+j)*n+i] += v / 2
		sum += v
	}
	if sum <= 0 {
		return source{}, nil, catalogue.Badf("stock %q: the measured TAG profile adds up to 0; give mol%% by letter code or leave [stock.tags] out", st.ID)
	}
	var notes []string
	if math.Abs(sum-100) > 1 {
		notes = append(notes, fmt.Sprintf("stock %q: measured TAG profile sums to %.1f mol%%; scaled to 100", st.ID, sum))
	}
	src := source{sparse: make([]entry, 0, len(acc))}
	for idx, v := range acc {
		src.sparse = append(src.sparse, entry{idx: idx, frac: v / sum})
	}
	slices.SortFunc(src.sparse, func(a, b entry) int { return a.idx - b.idx })
	src.meanMass = tagBase()
	x := make([]float64, n)
	for _, e := range src.sparse {
		i, j, k := e.idx/(n*n), (e.idx/n)%n, e.idx%n
		src.meanMass += e.frac * (ma[i] + ma[j] + ma[k])
		x[i] += e.frac / 3
		x[j] += e.frac / 3
		x[k] += e.frac / 3
	}
	if len(st.FattyAcids) > 0 {
		if fa, fx, err := catalogue.MolFractions(st.FattyAcids); err == nil {
			cat := make([]float64, n)
			for i, f := range fa {
				if r := indexOf(acids, f.Key); r >= 0 {
					cat[r] = fx[i]
				}
			}
			worst, at := 0.0, -1
			for i := range x {
				if dv := math.Abs(x[i] - cat[i]); dv > worst {
					worst, at = dv, i
				}
			}
			if worst > 0.02 {
				notes = append(notes, fmt.Sprintf("stock %q: the measured TAG profile implies %s %.1f mol%% against %.1f mol%% from its FA profile; the TAG profile is used",
					st.ID, acids[at].Key, 100*x[at], 100*cat[at]))
			}
		}
	}
	return src, notes, nil
}

func acidMasses(acids []catalogue.FattyAcid) []float64 {
	out := make([]float64, len(acids))
	for i, f := range acids {
		out[i] = f.MolarMass()
	}
	return out
}
