package optimise

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"

	"lipoplan/catalogue"
)

// MPS writes the programme Solve would solve for cat and spec in free MPS
// format (the fixed-column MPS layout of IBM's MPSX, with names separated by
// blanks instead of fixed columns, as read by GLPK's glpsol --freemps and by
// COIN-OR). Rows are named as in LimitReport without the ".min"/".max" side
// ("sum", "iv", "C18:2", "sfc.20"), columns by stock id; a row bounded on
// both sides is a G row with a RANGES entry. Integer rules add binary columns
// "used.<id>" between MARKER lines and rows "link.<id>", "minuse.<id>",
// "count". [use] and availability are column bounds.
func MPS(cat *catalogue.Catalogue, spec *catalogue.Spec) ([]byte, error) {
	m, lay, err := build(cat, spec)
	if err != nil {
		return nil, err
	}
	if lay.rules.Active() {
		m = lay.withRules(m, func(j int) float64 { return math.Min(m.colUp[j], 100) })
	}
	name := "lipoplan"
	return m.mps(name), nil
}

// WriteMPS writes MPS(cat, spec) to path atomically: a temporary file in the
// same directory, synced, then renamed over path.
func WriteMPS(path string, cat *catalogue.Catalogue, spec *catalogue.Spec) error {
	b, err := MPS(cat, spec)
	if err != nil {
		return err
	}
	return writeAtomic(path, b)
}

func writeAtomic(path string, b []byte) error {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return &catalogue.BadInput{Err: fmt.Errorf("write %s: %w", path, err)}
	}
	tmp := f.Name()
	_, err = f.Write(b)
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp, 0o644)
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return fmt.Errorf("write %s: %w", path, err)
	}
	return nil
}

func num(v float64) string { return strconv.FormatFloat(v, 'g', 17, 64) }

// mps renders the model in free MPS. Names must be unique there; a repeated
// row name (a spec listing the same limit twice) gets a "#2", "#3" suffix.
func (m *model) mps(name string) []byte {
	m = m.clone()
	seen := map[string]int{"cost": 1}
	for i, r := range m.rowName {
		seen[r]++
		if k := seen[r]; k > 1 {
			m.rowName[i] = fmt.Sprintf("%s#%d", r, k)
		}
	}
	var b bytes.Buffer
	fmt.Fprintf(&b, "NAME %s\nROWS\n N cost\n", name)
	for i := 0; i < m.nRows; i++ {
		lo, up := m.rowLo[i], m.rowUp[i]
		t := "G"
		switch {
		case lo == up:
			t = "E"
		case math.IsInf(lo, -1) && math.IsInf(up, 1):
			t = "N"
		case math.IsInf(lo, -1):
			t = "L"
		}
		fmt.Fprintf(&b, " %s %s\n", t, m.rowName[i])
	}
	b.WriteString("COLUMNS\n")
	isInt := make([]bool, m.nCols)
	for _, j := range m.integer {
		isInt[j] = true
	}
	inInt := false
	for j := 0; j < m.nCols; j++ {
		if isInt[j] != inInt {
			marker := "INTORG"
			if inInt {
				marker = "INTEND"
			}
			fmt.Fprintf(&b, " MARKER 'MARKER' '%s'\n", marker)
			inInt = isInt[j]
		}
		fmt.Fprintf(&b, " %s cost %s\n", m.colName[j], num(m.obj[j]))
		for i := 0; i < m.nRows; i++ {
			if v := m.at(i, j); v != 0 {
				fmt.Fprintf(&b, " %s %s %s\n", m.colName[j], m.rowName[i], num(v))
			}
		}
	}
	if inInt {
		b.WriteString(" MARKER 'MARKER' 'INTEND'\n")
	}
	b.WriteString("RHS\n")
	for i := 0; i < m.nRows; i++ {
		lo, up := m.rowLo[i], m.rowUp[i]
		rhs := lo
		if math.IsInf(lo, -1) {
			rhs = up
		}
		if !math.IsInf(rhs, 0) && rhs != 0 {
			fmt.Fprintf(&b, " RHS %s %s\n", m.rowName[i], num(rhs))
		}
	}
	b.WriteString("RANGES\n")
	for i := 0; i < m.nRows; i++ {
		lo, up := m.rowLo[i], m.rowUp[i]
		if lo != up && !math.IsInf(lo, -1) && !math.IsInf(up, 1) {
			fmt.Fprintf(&b, " RNG %s %s\n", m.rowName[i], num(up-lo))
		}
	}
	b.WriteString("BOUNDS\n")
	for j := 0; j < m.nCols; j++ {
		lo, up := m.colLo[j], m.colUp[j]
		switch {
		case lo == up:
			fmt.Fprintf(&b, " FX BND %s %s\n", m.colName[j], num(lo))
		default:
			if lo != 0 {
				fmt.Fprintf(&b, " LO BND %s %s\n", m.colName[j], num(lo))
			}
			if !math.IsInf(up, 1) {
				fmt.Fprintf(&b, " UP BND %s %s\n", m.colName[j], num(up))
			}
		}
	}
	b.WriteString("ENDATA\n")
	return b.Bytes()
}
