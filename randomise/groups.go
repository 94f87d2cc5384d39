package randomise

import (
	"cmp"
	"math"
	"slices"
	"strings"

	"lipoplan/catalogue"
)

// Shares are the trade's saturation classes of TAGs, in % (mol or wt). S is a
// saturated acid, U an unsaturated one. Trans acids (C18:1t, C18:2t) count as
// U here: the classes describe double bonds, as silver-ion and CN/ECN analyses
// do, even though elaidic acid melts closer to a saturated acid. SUS and SSU
// are the two S2U isomers (SSU includes its mirror image USS); USU and UUS the
// two SU2 isomers (UUS includes SUU).
type Shares struct {
	S3, S2U, SU2, U3 float64
	SUS, SSU         float64
	USU, UUS         float64
}

// Classes holds the saturation classes by moles and by mass.
type Classes struct {
	Mol Shares
	Wt  Shares
}

// Group is one carbon-number or equivalent-carbon-number class.
type Group struct {
	Key    int // CN or ECN
	MolPct float64
	WtPct  float64
}

// Summary is every grouping of a distribution, computed in one pass over the
// full distribution (never over a display cut-off).
type Summary struct {
	Classes Classes
	// CN is by carbon number (acyl carbons of the three acids, glycerol not
	// counted: POP = 50); ECN by equivalent carbon number CN - 2 x double
	// bonds (POP = 48), the order of elution in reversed-phase HPLC. Both are
	// sorted by key and list only groups that occur.
	CN, ECN []Group
	// MeanMolarMass is the mean TAG molar mass in g/mol.
	MeanMolarMass float64
	// Count is the number of positional species with a mole fraction above 0.
	Count int
}

// acidProps are the per-acid properties grouping needs, in slices.
type acidProps struct {
	sat      []int // 1 if saturated
	cn, ecn  []int
	mass     []float64 // free-acid molar mass
	minE     int
	maxC     int
	maxE     int
	tagBasis float64
}

func props(acids []catalogue.FattyAcid) acidProps {
	p := acidProps{
		sat: make([]int, len(acids)), cn: make([]int, len(acids)), ecn: make([]int, len(acids)),
		mass: make([]float64, len(acids)), minE: math.MaxInt, tagBasis: tagBase(),
	}
	for i, f := range acids {
		if f.DoubleBonds == 0 {
			p.sat[i] = 1
		}
		p.cn[i] = f.Carbons
		p.ecn[i] = f.Carbons - 2*f.DoubleBonds
		p.mass[i] = f.MolarMass()
		p.maxC = max(p.maxC, f.Carbons)
		p.maxE = max(p.maxE, p.ecn[i])
		p.minE = min(p.minE, p.ecn[i])
	}
	if len(acids) == 0 {
		p.minE = 0
	}
	return p
}

// pattern index: sn-1 saturated = 4, sn-2 = 2, sn-3 = 1.
const (
	patUUU = 0
	patUUS = 1
	patUSU = 2
	patUSS = 3
	patSUU = 4
	patSUS = 5
	patSSU = 6
	patSSS = 7
)

// Summarise computes the saturation classes (mol% and wt%), the CN and ECN
// groups and the mean TAG molar mass over the full distribution. TAG molar
// masses are glycerol + three acids - three water (IUPAC atomic weights).
func (d *Distribution) Summarise() Summary {
	n := len(d.Acids)
	p := props(d.Acids)
	var molPat, wtPat [8]float64
	cnMol := make([]float64, 3*p.maxC+1)
	cnWt := make([]float64, 3*p.maxC+1)
	ecnMol := make([]float64, 3*(p.maxE-p.minE)+1)
	ecnWt := make([]float64, 3*(p.maxE-p.minE)+1)
	var totMol, totMass float64
	count := 0
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			row := d.Mol[(i*n+j)*n : (i*n+j)*n+n]
			pat2 := p.sat[i]<<2 | p.sat[j]<<1
			cn2 := p.cn[i] + p.cn[j]
			ecn2 := p.ecn[i] + p.ecn[j] - 3*p.minE
			m2 := p.tagBasis + p.mass[i] + p.mass[j]
			for k, v := range row {
				if v == 0 {
					continue
				}
				count++
				w := v * (m2 + p.mass[k])
				pat := pat2 | p.sat[k]
				molPat[pat] += v
				wtPat[pat] += w
				c := cn2 + p.cn[k]
				cnMol[c] += v
				cnWt[c] += w
				e := ecn2 + p.ecn[k]
				ecnMol[e] += v
				ecnWt[e] += w
				totMol += v
				totMass += w
			}
		}
	}
	s := Summary{Count: count}
	if totMol == 0 {
		return s
	}
	s.MeanMolarMass = totMass / totMol
	s.Classes.Mol = shares(molPat, 100/totMol)
	s.Classes.Wt = shares(wtPat, 100/totMass)
	s.CN = groups(cnMol, cnWt, 0, 100/totMol, 100/totMass)
	s.ECN = groups(ecnMol, ecnWt, 3*p.minE, 100/totMol, 100/totMass)
	return s
}

func shares(pat [8]float64, scale float64) Shares {
	s := Shares{
		S3:  pat[patSSS],
		SUS: pat[patSUS],
		SSU: pat[patSSU] + pat[patUSS],
		USU: pat[patUSU],
		UUS: pat[patUUS] + pat[patSUU],
		U3:  pat[patUUU],
	}
	s.S2U = s.SUS + s.SSU
	s.SU2 = s.USU + s.UUS
	for _, f := range []*float64{&s.S3, &s.S2U, &s.SU2, &s.U3, &s.SUS, &s.SSU, &s.USU, &s.UUS} {
		*f *= scale
	}
	return s
}

func groups(mol, wt []float64, offset int, molScale, wtScale float64) []Group {
	var out []Group
	for i, v := range mol {
		if v > 0 {
			out = append(out, Group{Key: i + offset, MolPct: v * molScale, WtPct: wt[i] * wtScale})
		}
	}
	return out
}

// Classes returns the saturation classes (S3, S2U, SU2, U3 and isomers) in
// mol% and wt%.
func (d *Distribution) Classes() Classes { return d.Summarise().Classes }

// ByCN returns mol% by carbon number.
func (d *Distribution) ByCN() map[int]float64 { return groupMap(d.Summarise().CN) }

// ByECN returns mol% by equivalent carbon number (CN - 2 x double bonds).
func (d *Distribution) ByECN() map[int]float64 { return groupMap(d.Summarise().ECN) }

func groupMap(gs []Group) map[int]float64 {
	out := make(map[int]float64, len(gs))
	for _, g := range gs {
		out[g.Key] = g.MolPct
	}
	return out
}

// Isomers says which positional isomers a species list keeps apart.
type Isomers int

const (
	// Stereo keeps sn-1, sn-2 and sn-3 apart: PPO and OPP are two species.
	Stereo Isomers = iota
	// Regio merges mirror images (sn-1 <-> sn-3) but keeps the sn-2 acid:
	// PPO (with OPP) and POP are two species. The name puts the acid that
	// comes first in the reference table at sn-1.
	Regio
	// Combined merges all positional isomers: POP, PPO and OPP are one
	// species, named with its acids in reference-table order ("PPO").
	Combined
)

// String names the level as the CLI writes it.
func (m Isomers) String() string {
	switch m {
	case Regio:
		return "regio"
	case Combined:
		return "combined"
	}
	return "stereo"
}

// ParseIsomers reads "stereo", "regio" or "combined".
func ParseIsomers(s string) (Isomers, error) {
	for _, m := range []Isomers{Stereo, Regio, Combined} {
		if s == m.String() {
			return m, nil
		}
	}
	return Stereo, catalogue.Badf("isomer level %q is not known; use stereo (sn-1, sn-2, sn-3 apart), regio (POP vs PPO) or combined", s)
}

// Species is one TAG of a distribution.
type Species struct {
	// Tag is the letter-code name with the acids in sn-1, sn-2, sn-3 order
	// (for Combined: in reference-table order).
	Tag       string
	Acids     [3]catalogue.FattyAcid
	Positions [3]string // shorthand keys, in the same order as Tag
	// Pattern is the S/U pattern in sn order ("SUS", "USS"); for Combined
	// the class ("S3", "S2U", "SU2", "U3").
	Pattern   string
	MolPct    float64
	WtPct     float64
	MolarMass float64 // g/mol
	Formula   catalogue.Formula
	CN, ECN   int
}

// Species lists every positional species (sn-1, sn-2, sn-3 apart) with a mole
// fraction above 0, most abundant first.
func (d *Distribution) Species() []Species { return d.SpeciesBy(Stereo) }

// SpeciesBy lists the species at the given isomer level, most abundant first
// (ties in table order of the acids). Percentages are of the full
// distribution, so any head of the list is a true share.
func (d *Distribution) SpeciesBy(level Isomers) []Species {
	n := len(d.Acids)
	p := props(d.Acids)
	mol := d.Mol
	if level != Stereo {
		mol = make([]float64, len(d.Mol))
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				for k := 0; k < n; k++ {
					v := d.Mol[(i*n+j)*n+k]
					if v == 0 {
						continue
					}
					a, b, c := i, j, k
					switch level {
					case Regio:
						if a > c {
							a, c = c, a
						}
					case Combined:
						a, b, c = sort3(a, b, c)
					}
					mol[(a*n+b)*n+c] += v
				}
			}
		}
	}
	type item struct {
		idx  int
		mol  float64
		mass float64
	}
	var items []item
	var totMol, totMass float64
	for idx, v := range mol {
		if v <= 0 {
			continue
		}
		i, j, k := idx/(n*n), (idx/n)%n, idx%n
		m := p.tagBasis + p.mass[i] + p.mass[j] + p.mass[k]
		items = append(items, item{idx, v, m})
		totMol += v
		totMass += v * m
	}
	slices.SortFunc(items, func(a, b item) int {
		if c := cmp.Compare(math.Round(b.mol*1e12), math.Round(a.mol*1e12)); c != 0 {
			return c
		}
		return a.idx - b.idx
	})
	out := make([]Species, len(items))
	for x, it := range items {
		i, j, k := it.idx/(n*n), (it.idx/n)%n, it.idx%n
		fs := [3]catalogue.FattyAcid{d.Acids[i], d.Acids[j], d.Acids[k]}
		sp := Species{
			Tag:       fs[0].Code + fs[1].Code + fs[2].Code,
			Acids:     fs,
			Positions: [3]string{fs[0].Key, fs[1].Key, fs[2].Key},
			MolPct:    100 * it.mol / totMol,
			WtPct:     100 * it.mol * it.mass / totMass,
			MolarMass: it.mass,
			Formula:   catalogue.TAGFormula(fs[0], fs[1], fs[2]),
			CN:        p.cn[i] + p.cn[j] + p.cn[k],
			ECN:       p.ecn[i] + p.ecn[j] + p.ecn[k],
		}
		if level == Combined {
			sp.Pattern = [4]string{"U3", "SU2", "S2U", "S3"}[p.sat[i]+p.sat[j]+p.sat[k]]
		} else {
			var b strings.Builder
			for _, s := range []int{p.sat[i], p.sat[j], p.sat[k]} {
				b.WriteByte("US"[s])
			}
			sp.Pattern = b.String()
		}
		out[x] = sp
	}
	return out
}

func sort3(a, b, c int) (int, int, int) {
	if a > b {
		a, b = b, a
	}
	if b > c {
		b, c = c, b
	}
	if a > b {
		a, b = b, a
	}
	return a, b, c
}
