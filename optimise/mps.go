package optimise

import (
	"fmt"
	"math"
	"os"
	"path/filepath"

	"lipoplan/catalogue"
	"lipoplan/optimise/lp"
)

// MPS writes the programme Solve would solve for cat and spec in free MPS
// format (the fixed-column MPS layout of IBM's MPSX, with names separated by
// blanks instead of fixed columns, as read by GLPK's glpsol --freemps and by
// COIN-OR). Rows are named as in LimitReport without the ".min"/".max" side
// ("sum", "iv", "C18:2", "sfc.20"), columns by stock id; a row bounded on
// both sides is a G row with a RANGES entry. Integer rules add binary columns
// "used.<id>" between MARKER lines and rows "link.<id>", "share.<id>",
// "count". [use] and availability are column bounds.
func MPS(cat *catalogue.Catalogue, spec *catalogue.Spec) ([]byte, error) {
	return MPSIn(FreeMPS, cat, spec)
}

// MPSFormat is the layout of an MPS file: FreeMPS (exact numbers, any
// name length) or FixedMPS (fixed columns, names fitted to 8 characters
// with the mapping as comments at the top, numbers in 12 characters); see
// lp.MPSFormat.
type MPSFormat = lp.MPSFormat

// The MPS layouts.
const (
	FreeMPS  = lp.FreeMPS
	FixedMPS = lp.FixedMPS
)

// MPSIn is MPS in layout f.
func MPSIn(f MPSFormat, cat *catalogue.Catalogue, spec *catalogue.Spec) ([]byte, error) {
	m, lay, err := build(cat, spec)
	if err != nil {
		return nil, err
	}
	if lay.rules.Active() {
		m = lay.withRules(m, func(j int) float64 { return math.Min(m.colUp[j], 100) })
	}
	return m.mps("lipoplan", f), nil
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

// mps renders the model in MPS layout f (lp.WriteMPS): rows and columns
// by name, a repeated row name (a spec listing the same limit twice) with
// a "#2", "#3" suffix; in fixed MPS, names longer than 8 characters
// replaced and the mapping written as comments at the top.
func (m *model) mps(name string, f MPSFormat) []byte {
	p := &lp.Problem{Obj: m.obj, ColLo: m.colLo, ColUp: m.colUp, RowLo: m.rowLo, RowUp: m.rowUp}
	p.Dense(m.nRows, m.nCols, m.a)
	return lp.WriteMPS(p, name, m.colName, m.rowName, m.integer, f)
}
