// Package blend computes the properties of a physical mix of stocks: the
// mass-weighted fatty-acid profile and what follows linearly from it
// (calculated iodine value, saponification value, saturates, trans, Cox value)
// and the SFC obtained by weighting measured curves.
package blend

import (
	"fmt"
	"sort"

	"lipoplan/catalogue"
)

// Molar mass of KOH in mg/mmol, used in the saponification value
// (AOCS Cd 3-25 defines the measurement; 56.106 g/mol from IUPAC weights).
const kohMilligramsPerMole = 56106.0

// IVFactor is the AOCS Cd 1c-85 factor for one fatty acid: the theoretical
// iodine value of its pure methyl ester per 1 % in a FAME profile. It is
// derived from structure: each C=C adds one I2 (253.808 g/mol) and the value is
// computed per 100 g of triacylglycerol made from that acid, so the factor equals
// the theoretical IV of the pure TAG / 100 (triolein 0.8601, trilinolein 1.7321,
// trilinolenin 2.6161, tripalmitolein 0.9502 in the published method).
func IVFactor(fa catalogue.FattyAcid) float64 {
	if fa.DoubleBonds == 0 {
		return 0
	}
	tag := catalogue.TAGMolarMass(fa, fa, fa)
	i2 := 2 * 126.90447 // IUPAC standard atomic weight of iodine
	return 3 * float64(fa.DoubleBonds) * i2 / tag
}

// TAGIodineValue is the theoretical IV (g I2 / 100 g) of the pure TAG of acid fa.
func TAGIodineValue(fa catalogue.FattyAcid) float64 { return 100 * IVFactor(fa) }

// SVFactor is the saponification value (mg KOH/g) of the pure TAG of acid fa:
// 3 x 56106 / M(TAG). Blended by weight % it gives the SV of a profile.
func SVFactor(fa catalogue.FattyAcid) float64 {
	return 3 * kohMilligramsPerMole / catalogue.TAGMolarMass(fa, fa, fa)
}

// Cox weights of Fatemi & Hammond (1980), Lipids 15:379: relative oxidation
// rates of C18:1, C18:2 and C18:3 of 1 : 10.3 : 21.6, per 100 %.
const (
	coxOleic     = 1.0
	coxLinoleic  = 10.3
	coxLinolenic = 21.6
)

// Properties of a mix. Percentages are in %, not fractions.
type Properties struct {
	FattyAcids    map[string]float64 // wt% as FAME
	IV            float64            // calculated iodine value, AOCS Cd 1c-85
	SV            float64            // saponification value, mg KOH/g
	MeanMolarMass float64            // mean TAG molar mass, g/mol
	SAFA          float64
	MUFA          float64 // cis monounsaturates
	PUFA          float64 // cis polyunsaturates
	Trans         float64
	Omega3        float64
	Cox           float64
	// SFC by weighting measured curves, keyed by temperature; a temperature
	// where any used stock has no measured value is listed in SFCMissing
	// instead (never silently zero).
	SFC        map[float64]float64
	SFCMissing map[float64][]string // temperature -> stock ids lacking data
}

// acidConst holds, per fatty acid, the constants Profile needs: derived once
// from the reference table and never changed (a read-only lookup table).
type acidConst struct {
	fa       catalogue.FattyAcid
	ivFactor float64
	ester    float64 // FAME molar mass
	acid     float64 // free acid molar mass
}

// maxAcids bounds the reference table, so that Profile can lay a profile
// out by table position in an array on the stack.
const maxAcids = 32

// acidConsts are the constants in reference-table order, acidRank the
// position of each key in it; both read-only.
var acidConsts, acidRank = func() ([]acidConst, map[string]int) {
	table := catalogue.FattyAcids()
	if len(table) > maxAcids {
		panic(fmt.Sprintf("blend: %d fatty acids in the reference table, more than maxAcids = %d", len(table), maxAcids))
	}
	cs := make([]acidConst, len(table))
	rank := make(map[string]int, len(table))
	for i, f := range table {
		cs[i] = acidConst{fa: f, ivFactor: IVFactor(f), ester: f.EsterMolarMass(), acid: f.MolarMass()}
		rank[f.Key] = i
	}
	return cs, rank
}()

// Profile computes the properties of one fatty-acid profile (wt% FAME). The
// SV and mean molar mass treat the profile as the fat it came from: the FAME
// weight fractions are turned into mole fractions with the methyl ester molar
// masses, and the mean TAG is glycerol + 3 mean acids - 3 water. The sums run
// in reference-table order, not the map's random one, so that the same
// profile gives bit-identical properties every time.
func Profile(fa map[string]float64) Properties {
	p := ProfileValues(fa)
	p.FattyAcids = make(map[string]float64, len(fa))
	for k, w := range fa {
		if w != 0 {
			p.FattyAcids[k] = w
		}
	}
	return p
}

// ProfileValues is Profile without its copy of the profile (FattyAcids is
// nil): the values each stock gives a linear row, for a caller that
// profiles every stock of a catalogue and mixes only a few of them (the
// optimiser's model build).
func ProfileValues(fa map[string]float64) Properties {
	var p Properties
	var byRank [maxAcids]float64
	for k, w := range fa {
		if r, ok := acidRank[k]; ok && w != 0 {
			byRank[r] = w
		}
	}
	var moles, acidMass float64
	for r := range acidConsts {
		w := byRank[r]
		if w == 0 {
			continue
		}
		c := &acidConsts[r]
		f := c.fa
		p.IV += w * c.ivFactor
		switch {
		case f.Trans:
			p.Trans += w
		case f.DoubleBonds == 0:
			p.SAFA += w
		case f.DoubleBonds == 1:
			p.MUFA += w
		default:
			p.PUFA += w
		}
		if f.Omega3 {
			p.Omega3 += w
		}
		if f.Carbons == 18 && !f.Trans {
			switch f.DoubleBonds {
			case 1:
				p.Cox += coxOleic * w / 100
			case 2:
				p.Cox += coxLinoleic * w / 100
			case 3:
				p.Cox += coxLinolenic * w / 100
			}
		}
		n := w / c.ester
		moles += n
		acidMass += n * c.acid
	}
	if moles > 0 {
		meanAcid := acidMass / moles
		p.MeanMolarMass = catalogue.Glycerol.Mass() + 3*meanAcid - 3*catalogue.Water.Mass()
		p.SV = 3 * kohMilligramsPerMole / p.MeanMolarMass
	}
	return p
}

// Part is one stock at a share of the mix (catalogue.Part: the recipe line
// lives with the stocks, so that randomise needs no blend).
type Part = catalogue.Part

// Mix computes the properties of a physical mix. Shares are % by mass and need
// not sum to 100: they are normalised. Every property but the SFC is linear in
// mass share (the FA profile, IV, SAFA, MUFA, PUFA, trans, omega-3 and Cox by
// the mass balance of the FAME profile; SV because moles of ester per gram
// are additive by mass), so each is the mass-weighted sum of the stocks'
// own values, which is what an LP row sees. SFC is evaluated at temps by
// linear weighting of measured curves.
func Mix(parts []Part, temps []float64) (Properties, error) {
	if _, err := catalogue.CheckParts(parts); err != nil {
		return Properties{}, err // before a nil stock is read
	}
	profiles := make([]*Properties, len(parts))
	for k, pt := range parts {
		p := Profile(pt.Stock.FattyAcids)
		profiles[k] = &p
	}
	return MixProfiles(parts, profiles, temps)
}

// MixProfiles is Mix for stocks whose profiles are already known:
// profiles[k] must be Profile(parts[k].Stock.FattyAcids). It lets a caller
// that profiled its stocks once (the optimiser) report a blend without
// profiling them again.
func MixProfiles(parts []Part, profiles []*Properties, temps []float64) (Properties, error) {
	if len(profiles) != len(parts) {
		return Properties{}, fmt.Errorf("mix: %d profiles for %d stocks", len(profiles), len(parts))
	}
	total, err := catalogue.CheckParts(parts)
	if err != nil {
		return Properties{}, err
	}
	out := Properties{FattyAcids: map[string]float64{}}
	for k, pt := range parts {
		w := pt.Pct / total
		p := profiles[k]
		for key, v := range p.FattyAcids {
			out.FattyAcids[key] += w * v
		}
		out.IV += w * p.IV
		out.SV += w * p.SV
		out.SAFA += w * p.SAFA
		out.MUFA += w * p.MUFA
		out.PUFA += w * p.PUFA
		out.Trans += w * p.Trans
		out.Omega3 += w * p.Omega3
		out.Cox += w * p.Cox
	}
	for key, v := range out.FattyAcids {
		if v == 0 {
			delete(out.FattyAcids, key) // as Profile: zero weights are left out
		}
	}
	if out.SV > 0 {
		out.MeanMolarMass = 3 * kohMilligramsPerMole / out.SV
	}
	out.SFC, out.SFCMissing = SFC(parts, temps)
	return out, nil
}

// SFC weights measured curves linearly by mass share (the usual first estimate;
// real blends deviate where eutectics form). Temperatures where a stock with a
// share above zero has no measured value go to missing with those stock ids.
func SFC(parts []Part, temps []float64) (map[float64]float64, map[float64][]string) {
	var total float64
	for _, pt := range parts {
		total += pt.Pct
	}
	out := map[float64]float64{}
	missing := map[float64][]string{}
	for _, t := range temps {
		var v float64
		var lack []string
		for _, pt := range parts {
			if pt.Pct <= 0 {
				continue
			}
			s, ok := pt.Stock.SFC.At(t)
			if !ok {
				lack = append(lack, pt.Stock.ID)
				continue
			}
			v += pt.Pct / total * s
		}
		if len(lack) > 0 {
			sort.Strings(lack)
			missing[t] = lack
			continue
		}
		out[t] = v
	}
	return out, missing
}

// Value returns the named property ("iv", "sv", "safa", "mufa", "pufa",
// "trans", "cox", "omega3") or the wt% of a fatty-acid key.
func (p Properties) Value(name string) (float64, bool) {
	switch name {
	case "iv":
		return p.IV, true
	case "sv":
		return p.SV, true
	case "safa":
		return p.SAFA, true
	case "mufa":
		return p.MUFA, true
	case "pufa":
		return p.PUFA, true
	case "trans":
		return p.Trans, true
	case "cox":
		return p.Cox, true
	case "omega3":
		return p.Omega3, true
	}
	if _, ok := catalogue.Lookup(name); ok {
		return p.FattyAcids[name], true
	}
	return 0, false
}

// Coefficient is the value of a linear property for one stock alone: the LP
// coefficient of that stock in a limit row. Every name Value accepts is linear
// in mass share (SV by mass additivity of ester moles per gram).
func Coefficient(s *catalogue.Stock, name string) (float64, bool) {
	return Profile(s.FattyAcids).Value(name)
}

// Temps merges the default SFC temperatures with any extra ones, sorted, unique.
func Temps(extra ...float64) []float64 {
	set := map[float64]bool{}
	for _, t := range catalogue.DefaultTemps {
		set[t] = true
	}
	for _, t := range extra {
		set[t] = true
	}
	out := make([]float64, 0, len(set))
	for t := range set {
		out = append(out, t)
	}
	sort.Float64s(out)
	return out
}

// SpecTemps are the SFC temperatures a report on spec lists: the defaults
// plus every temperature the spec limits (README, "Commands").
func SpecTemps(spec *catalogue.Spec) []float64 {
	extra := make([]float64, len(spec.SFC))
	for i, l := range spec.SFC {
		extra[i] = l.Temp
	}
	return Temps(extra...)
}
