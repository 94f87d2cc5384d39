package catalogue

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"
)

// Standard atomic weights, IUPAC abridged values (IUPAC CIAAW, "Standard atomic
// weights of the elements 2021", conventional values for C, H and O).
const (
	AtomicC = 12.011
	AtomicH = 1.008
	AtomicO = 15.999
)

// Formula is an elemental formula CcHhOo.
type Formula struct {
	C, H, O int
}

// Mass is the molar mass in g/mol from the IUPAC standard atomic weights.
func (f Formula) Mass() float64 {
	return float64(f.C)*AtomicC + float64(f.H)*AtomicH + float64(f.O)*AtomicO
}

// Add returns f + g.
func (f Formula) Add(g Formula) Formula { return Formula{f.C + g.C, f.H + g.H, f.O + g.O} }

// Sub returns f - g.
func (f Formula) Sub(g Formula) Formula { return Formula{f.C - g.C, f.H - g.H, f.O - g.O} }

// String writes the formula in Hill order, e.g. "C57H104O6".
func (f Formula) String() string {
	var b strings.Builder
	for _, p := range []struct {
		sym string
		n   int
	}{{"C", f.C}, {"H", f.H}, {"O", f.O}} {
		switch {
		case p.n == 1:
			b.WriteString(p.sym)
		case p.n > 1:
			fmt.Fprintf(&b, "%s%d", p.sym, p.n)
		}
	}
	return b.String()
}

// Formulae of the small molecules in esterification.
var (
	Water    = Formula{C: 0, H: 2, O: 1}
	Glycerol = Formula{C: 3, H: 8, O: 3}
	Methanol = Formula{C: 1, H: 4, O: 1}
)

// FattyAcid is one entry of the reference table.
type FattyAcid struct {
	Key         string // lipid shorthand, e.g. "C18:1" or "C18:1t"
	Carbons     int
	DoubleBonds int
	Trans       bool   // true for trans isomers (counted as trans fat, not MUFA/PUFA)
	Name        string // common name
	Code        string // trade letter code used in TAG names (P, O, S, ...)
	Omega3      bool   // n-3 family (counted in omega-3)
}

// Saturated reports whether the acid has no double bond.
func (f FattyAcid) Saturated() bool { return f.DoubleBonds == 0 }

// Formula of the free acid: a saturated acid is CnH2nO2 (acyl chain CnH2n+1
// plus COOH); each C=C removes two hydrogens (common practice: structural rule).
func (f FattyAcid) Formula() Formula {
	return Formula{C: f.Carbons, H: 2*f.Carbons - 2*f.DoubleBonds, O: 2}
}

// EsterFormula is the methyl ester (FAME): acid + methanol - water.
func (f FattyAcid) EsterFormula() Formula {
	return f.Formula().Add(Methanol).Sub(Water)
}

// MolarMass of the free acid in g/mol.
func (f FattyAcid) MolarMass() float64 { return f.Formula().Mass() }

// EsterMolarMass of the methyl ester (FAME) in g/mol.
func (f FattyAcid) EsterMolarMass() float64 { return f.EsterFormula().Mass() }

// TAGFormula is the triacylglycerol made from glycerol and three acids with
// loss of three water molecules (condensation).
func TAGFormula(a, b, c FattyAcid) Formula {
	return Glycerol.Add(a.Formula()).Add(b.Formula()).Add(c.Formula()).
		Sub(Water).Sub(Water).Sub(Water)
}

// TAGMolarMass is the molar mass of the TAG with acids a, b, c in g/mol.
func TAGMolarMass(a, b, c FattyAcid) float64 { return TAGFormula(a, b, c).Mass() }

// reference is the fatty-acid table. Letter codes follow trade usage
// (Bu, Co, Cy, La, M, P, S, O, L, Ln, A, B ...); a few rarer acids carry a
// two-letter code of our own so that every TAG has a readable name.
var reference = [...]FattyAcid{
	{Key: "C4:0", Carbons: 4, Name: "butyric", Code: "Bu"},
	{Key: "C6:0", Carbons: 6, Name: "caproic", Code: "Co"},
	{Key: "C8:0", Carbons: 8, Name: "caprylic", Code: "Cy"},
	{Key: "C10:0", Carbons: 10, Name: "capric", Code: "C"},
	{Key: "C12:0", Carbons: 12, Name: "lauric", Code: "La"},
	{Key: "C14:0", Carbons: 14, Name: "myristic", Code: "M"},
	{Key: "C14:1", Carbons: 14, DoubleBonds: 1, Name: "myristoleic", Code: "Mo"},
	{Key: "C16:0", Carbons: 16, Name: "palmitic", Code: "P"},
	{Key: "C16:1", Carbons: 16, DoubleBonds: 1, Name: "palmitoleic", Code: "Po"},
	{Key: "C17:0", Carbons: 17, Name: "margaric", Code: "Ma"},
	{Key: "C18:0", Carbons: 18, Name: "stearic", Code: "S"},
	{Key: "C18:1", Carbons: 18, DoubleBonds: 1, Name: "oleic", Code: "O"},
	{Key: "C18:1t", Carbons: 18, DoubleBonds: 1, Trans: true, Name: "elaidic (trans C18:1)", Code: "E"},
	{Key: "C18:2", Carbons: 18, DoubleBonds: 2, Name: "linoleic", Code: "L"},
	{Key: "C18:2t", Carbons: 18, DoubleBonds: 2, Trans: true, Name: "trans linoleic isomers", Code: "Lt"},
	{Key: "C18:3", Carbons: 18, DoubleBonds: 3, Name: "alpha-linolenic", Code: "Ln", Omega3: true},
	{Key: "C20:0", Carbons: 20, Name: "arachidic", Code: "A"},
	{Key: "C20:1", Carbons: 20, DoubleBonds: 1, Name: "gondoic (eicosenoic)", Code: "G"},
	{Key: "C22:0", Carbons: 22, Name: "behenic", Code: "B"},
	{Key: "C22:1", Carbons: 22, DoubleBonds: 1, Name: "erucic", Code: "Er"},
	{Key: "C24:0", Carbons: 24, Name: "lignoceric", Code: "Lg"},
}

// FattyAcids returns a copy of the reference table in chain-length order.
func FattyAcids() []FattyAcid {
	out := make([]FattyAcid, len(reference))
	copy(out, reference[:])
	return out
}

// Lookup finds a fatty acid by its shorthand key.
func Lookup(key string) (FattyAcid, bool) {
	if r := Rank(key); r >= 0 {
		return reference[r], true
	}
	return FattyAcid{}, false
}

// LookupCode finds a fatty acid by its trade letter code.
func LookupCode(code string) (FattyAcid, bool) {
	for _, f := range reference {
		if f.Code == code {
			return f, true
		}
	}
	return FattyAcid{}, false
}

// Keys lists every known shorthand key in table order.
func Keys() []string {
	out := make([]string, len(reference))
	for i, f := range reference {
		out[i] = f.Key
	}
	return out
}

// Rank returns the table position of key, or -1; used to sort profiles.
func Rank(key string) int {
	if r, ok := rankOf()[key]; ok {
		return r
	}
	return -1
}

// rankOf is the reference table's position of each key, built once on first
// use and only read after that: the loader looks up every key of every
// profile, 25 000 look-ups in a 300-stock catalogue, where a walk along the
// table compared up to 21 strings each.
var rankOf = sync.OnceValue(func() map[string]int {
	m := make(map[string]int, len(reference))
	for i, f := range reference {
		m[f.Key] = i
	}
	return m
})

// SortedKeys returns the keys of a profile in reference-table order; keys
// outside the table come first, in byte order, so that the order never
// depends on Go's random map iteration.
func SortedKeys(m map[string]float64) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool {
		ri, rj := Rank(keys[i]), Rank(keys[j])
		if ri != rj {
			return ri < rj
		}
		return keys[i] < keys[j]
	})
	return keys
}

// SumValues adds the values of m in ascending order of value. Go ranges
// over a map in a random order and floating-point addition is not
// associative, so a plain range would give totals that differ in the last
// bits from run to run; sorting the values first makes the total depend
// on the values alone, whatever their keys. For values of one sign,
// increasing order also has the smaller error bound (Higham, Accuracy and
// Stability of Numerical Algorithms, 2nd ed., ch. 4; from memory).
func SumValues(m map[string]float64) float64 {
	var buf [32]float64 // a profile's entries fit without an allocation
	vals := buf[:0]
	for _, v := range m {
		vals = append(vals, v)
	}
	slices.Sort(vals)
	var sum float64
	for _, v := range vals {
		sum += v
	}
	return sum
}

// ParseTAGCode splits a letter-code TAG name such as "POP" or "LaLaM" into its
// three acids in sn-1, sn-2, sn-3 order. Codes are matched longest first.
func ParseTAGCode(name string) ([3]FattyAcid, error) {
	var out [3]FattyAcid
	rest := name
	for i := 0; i < 3; i++ {
		found := false
		for _, n := range []int{2, 1} {
			if len(rest) < n {
				continue
			}
			if f, ok := LookupCode(rest[:n]); ok {
				// prefer the two-letter code only when the remainder still parses
				if n == 2 && !parsesAs(rest[n:], 2-i) {
					continue
				}
				out[i] = f
				rest = rest[n:]
				found = true
				break
			}
		}
		if !found {
			return out, fmt.Errorf("TAG %q: no fatty acid letter code at %q (known codes: %s)", name, rest, strings.Join(codes(), " "))
		}
	}
	if rest != "" {
		return out, fmt.Errorf("TAG %q: more than three acids (left over %q)", name, rest)
	}
	return out, nil
}

func parsesAs(s string, n int) bool {
	if n == 0 {
		return s == ""
	}
	for _, k := range []int{2, 1} {
		if len(s) >= k {
			if _, ok := LookupCode(s[:k]); ok && parsesAs(s[k:], n-1) {
				return true
			}
		}
	}
	return false
}

func codes() []string {
	out := make([]string, len(reference))
	for i, f := range reference {
		out[i] = f.Code
	}
	return out
}

// ParseTemp reads an SFC temperature key such as "20" or "37.5".
func ParseTemp(s string) (float64, error) {
	s = strings.TrimSpace(s)
	if t, ok := exactDecimal(s); ok { // the usual "20", "37.5": the same value, the short way
		return t, nil
	}
	t, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, fmt.Errorf("temperature %q is not a number of degrees C", s)
	}
	return t, nil
}

// TempKey writes a temperature as a JSON/TOML key: whole degrees as "20",
// fractional as "37.5".
func TempKey(t float64) string {
	return strconv.FormatFloat(t, 'f', -1, 64)
}

// MolFractions converts a fatty-acid profile in wt% as FAME to mole
// fractions through the methyl esters' molar masses: n_i = w_i / M(FAME_i),
// x_i = n_i / sum n. GC of the methyl esters (ISO 12966-4:2015, capillary
// GC) reports peak areas, which are taken as wt% FAME (common practice with
// a flame-ionisation detector). Acids with a zero share are left out; the
// acids come back in reference-table order, without maps or sorting. A key
// outside the table or an amount that is not a finite number >= 0 is bad
// input in the loader's words (Stock.CheckProfiles), and so is a profile
// with nothing in it.
func MolFractions(fa map[string]float64) (acids []FattyAcid, x []float64, err error) {
	var ranked [len(reference)]float64
	if err := molByRank(fa, &ranked); err != nil {
		return nil, nil, err
	}
	acids, x = make([]FattyAcid, 0, len(fa)), make([]float64, 0, len(fa))
	for r, f := range reference {
		if ranked[r] > 0 {
			acids = append(acids, f)
			x = append(x, ranked[r])
		}
	}
	return acids, x, nil
}

// molByRank is MolFractions into a table by reference-table position (zero
// for an acid the profile lacks), without allocating: one rank look-up per
// key, then one walk in table order.
func molByRank(fa map[string]float64, ranked *[len(reference)]float64) error {
	for k, w := range fa {
		r := Rank(k)
		if r < 0 || !(w >= 0) || math.IsInf(w, 1) {
			return checked("", func(c *collector) { c.profileEntries("", "fatty_acids", fa) })
		}
		ranked[r] += w
	}
	var total float64
	for r, f := range reference {
		if ranked[r] > 0 {
			ranked[r] /= f.EsterMolarMass()
			total += ranked[r]
		}
	}
	if total <= 0 {
		return Badf("the fatty-acid profile is empty; give wt%% FAME for at least one acid")
	}
	for r := range ranked {
		ranked[r] /= total
	}
	return nil
}

// MolPercent is MolFractions by key, in mol%; nil for a profile that
// MolFractions refuses.
func MolPercent(fa map[string]float64) map[string]float64 {
	acids, x, err := MolFractions(fa)
	if err != nil {
		return nil
	}
	out := make(map[string]float64, len(acids))
	for i, f := range acids {
		out[f.Key] = 100 * x[i]
	}
	return out
}
