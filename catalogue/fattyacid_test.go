package catalogue

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func acid(t *testing.T, key string) FattyAcid {
	t.Helper()
	f, ok := Lookup(key)
	require.True(t, ok, key)
	return f
}

// Molar masses of free fatty acids from their formulae with IUPAC standard
// atomic weights, against PubChem / CRC Handbook values (recalled from
// memory, to 0.01 g/mol; our weights may differ in the last digit, hence 0.02).
func TestFattyAcidMolarMasses(t *testing.T) {
	cases := []struct {
		key     string
		formula string
		mass    float64
	}{
		{"C10:0", "C10H20O2", 172.26}, // capric acid, PubChem (from memory)
		{"C12:0", "C12H24O2", 200.32}, // lauric acid, PubChem (from memory)
		{"C14:0", "C14H28O2", 228.37}, // myristic acid, PubChem (from memory)
		{"C16:0", "C16H32O2", 256.42}, // palmitic acid, PubChem / CRC (from memory)
		{"C18:0", "C18H36O2", 284.48}, // stearic acid, PubChem / CRC (from memory)
		{"C18:1", "C18H34O2", 282.46}, // oleic acid, PubChem / CRC (from memory)
		{"C18:2", "C18H32O2", 280.45}, // linoleic acid, PubChem (from memory)
		{"C18:3", "C18H30O2", 278.43}, // alpha-linolenic acid, PubChem (from memory)
		{"C22:1", "C22H42O2", 338.57}, // erucic acid, PubChem (from memory)
	}
	for _, c := range cases {
		f := acid(t, c.key)
		assert.Equal(t, c.formula, f.Formula().String(), c.key)
		assert.InDelta(t, c.mass, f.MolarMass(), 0.02, c.key)
	}
}

// Trans isomers have the same formula as the cis acid: elaidic acid is
// C18H34O2 like oleic acid (PubChem, from memory).
func TestTransSameFormula(t *testing.T) {
	assert.Equal(t, acid(t, "C18:1").Formula(), acid(t, "C18:1t").Formula())
	assert.True(t, acid(t, "C18:1t").Trans)
}

// Methyl esters (FAME) are acid + methanol - water: methyl palmitate
// C17H34O2 270.45 g/mol, methyl oleate C19H36O2 296.49 g/mol, methyl
// stearate C19H38O2 298.50 g/mol (PubChem, from memory).
func TestMethylEsterMolarMasses(t *testing.T) {
	cases := []struct {
		key     string
		formula string
		mass    float64
	}{
		{"C16:0", "C17H34O2", 270.45},
		{"C18:1", "C19H36O2", 296.49},
		{"C18:0", "C19H38O2", 298.50},
	}
	for _, c := range cases {
		f := acid(t, c.key)
		assert.Equal(t, c.formula, f.EsterFormula().String(), c.key)
		assert.InDelta(t, c.mass, f.EsterMolarMass(), 0.02, c.key)
	}
}

// A TAG is glycerol + 3 acids - 3 water (condensation). Check values:
// tripalmitin 807.3, triolein 885.4, tristearin 891.5 g/mol; formulae
// C51H98O6, C57H104O6, C57H110O6 (PubChem, from memory).
func TestTAGMolarMasses(t *testing.T) {
	cases := []struct {
		key     string
		formula string
		mass    float64
	}{
		{"C16:0", "C51H98O6", 807.3},
		{"C18:1", "C57H104O6", 885.4},
		{"C18:0", "C57H110O6", 891.5},
	}
	for _, c := range cases {
		f := acid(t, c.key)
		assert.Equal(t, c.formula, TAGFormula(f, f, f).String(), c.key)
		assert.InDelta(t, c.mass, TAGMolarMass(f, f, f), 0.06, c.key)
	}
	// POP (1,3-dipalmitoyl-2-oleoyl-glycerol) C53H100O6, 833.4 g/mol
	// (PubChem, from memory): a mixed TAG adds the acids the same way.
	p, o := acid(t, "C16:0"), acid(t, "C18:1")
	assert.Equal(t, "C53H100O6", TAGFormula(p, o, p).String())
	assert.InDelta(t, 833.4, TAGMolarMass(p, o, p), 0.1)
}

// The structural rule behind the table: a saturated acyl chain is CnH2n+1
// (so the acid CnH2nO2) and each C=C removes two hydrogens (common practice).
func TestFormulaRule(t *testing.T) {
	for _, f := range FattyAcids() {
		fm := f.Formula()
		assert.Equal(t, f.Carbons, fm.C, f.Key)
		assert.Equal(t, 2*f.Carbons-2*f.DoubleBonds, fm.H, f.Key)
		assert.Equal(t, 2, fm.O, f.Key)
		// the acyl chain R of R-COOH
		chainH := fm.H - 1
		assert.Equal(t, 2*(f.Carbons-1)+1-2*f.DoubleBonds, chainH, f.Key)
	}
}

// ParseTAGCode splits trade letter codes into sn-1, sn-2, sn-3 acids.
func TestParseTAGCode(t *testing.T) {
	ok := map[string][3]string{
		"POP":    {"C16:0", "C18:1", "C16:0"},
		"SOS":    {"C18:0", "C18:1", "C18:0"},
		"OOO":    {"C18:1", "C18:1", "C18:1"},
		"PPO":    {"C16:0", "C16:0", "C18:1"},
		"LaLaM":  {"C12:0", "C12:0", "C14:0"},
		"LnLnLn": {"C18:3", "C18:3", "C18:3"},
		"PLnL":   {"C16:0", "C18:3", "C18:2"},
		"CoCyC":  {"C6:0", "C8:0", "C10:0"},
		"PPoP":   {"C16:0", "C16:1", "C16:0"},
		"EEE":    {"C18:1t", "C18:1t", "C18:1t"},
		"LLL":    {"C18:2", "C18:2", "C18:2"},
	}
	for code, want := range ok {
		got, err := ParseTAGCode(code)
		require.NoError(t, err, code)
		for i := range want {
			assert.Equal(t, want[i], got[i].Key, "%s position %d", code, i+1)
		}
	}
	for _, bad := range []string{"", "PO", "POPO", "PXP", "pop", "LaLaLaLa", "P O P"} {
		_, err := ParseTAGCode(bad)
		assert.Error(t, err, bad)
	}
}

// Mol% from wt% FAME: an equal-mass mixture of methyl palmitate and methyl
// oleate holds more moles of the lighter ester, in the ratio of the molar
// masses 296.49 / 270.45 (from the ester masses above).
func TestMolPercent(t *testing.T) {
	m := MolPercent(map[string]float64{"C16:0": 50, "C18:1": 50})
	assert.InDelta(t, 100, m["C16:0"]+m["C18:1"], 1e-9)
	assert.InDelta(t, 296.49/270.45, m["C16:0"]/m["C18:1"], 1e-3)
}

func TestMolFractionsThroughMethylEsterMasses(t *testing.T) {
	// Methyl palmitate C17H34O2 270.45 g/mol and methyl oleate C19H36O2
	// 296.49 g/mol (PubChem molecular weights, from memory).
	acids, x, err := MolFractions(map[string]float64{"C18:1": 50, "C16:0": 50})
	require.NoError(t, err)
	require.Len(t, acids, 2)
	assert.Equal(t, "C16:0", acids[0].Key, "acids in reference-table order")
	assert.InDelta(t, 270.45, acids[0].EsterMolarMass(), 0.01)
	assert.InDelta(t, 296.49, acids[1].EsterMolarMass(), 0.01)
	nP, nO := 50/270.45, 50/296.49
	assert.InDelta(t, nP/(nP+nO), x[0], 1e-4)
	assert.InDelta(t, nO/(nP+nO), x[1], 1e-4)
	assert.InDelta(t, 1, x[0]+x[1], 1e-15)

	_, _, err = MolFractions(map[string]float64{"C18:9": 10})
	assert.True(t, IsBadInput(err))
	assert.ErrorContains(t, err, `fatty_acids: unknown fatty-acid key "C18:9"`, "the loader's words")
	_, _, err = MolFractions(map[string]float64{"C16:0": 0})
	assert.True(t, IsBadInput(err))
	_, _, err = MolFractions(map[string]float64{"C16:0": -3})
	assert.True(t, IsBadInput(err))
}
