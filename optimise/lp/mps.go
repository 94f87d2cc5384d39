package lp

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// MPSFormat is a layout of the MPS file.
type MPSFormat int

// The MPS layouts lipoplan writes.
const (
	// FreeMPS separates fields by blanks, any name length, numbers to 17
	// significant digits: the file holds exactly the problem (read by
	// glpsol --freemps and COIN-OR).
	FreeMPS MPSFormat = iota
	// FixedMPS is the original fixed-column layout of IBM's MPSX: fields in
	// columns 2-3, 5-12, 15-22, 25-36, 40-47 and 50-61, names of at most 8
	// characters, numbers of at most 12 (read by glpsol --mps and by any
	// strict reader). Names that do not fit are replaced and the mapping
	// written as comment records ("*" in column 1) at the top of the file;
	// a number that needs more than 12 characters is rounded to the most
	// significant digits that fit (10 or 11 for most values).
	FixedMPS
)

func (f MPSFormat) String() string {
	if f == FixedMPS {
		return "fixed"
	}
	return "free"
}

// MPS renders p in free MPS format (WriteMPS with FreeMPS).
func MPS(p *Problem, name string, colNames, rowNames []string, integer []int) []byte {
	return WriteMPS(p, name, colNames, rowNames, integer, FreeMPS)
}

// WriteMPS renders p in the MPS layout f (the column-oriented MPS layout
// of IBM's MPSX; FreeMPS with names separated by blanks, FixedMPS in fixed
// columns), objective row "cost". Columns and rows are named by colNames
// and rowNames (nil: "c1", "c2" ... and "r1", "r2" ...); in free MPS a
// repeated row name gets a "#2", "#3" suffix, as names must be unique; in
// fixed MPS every name that is too long, holds a blank, starts with "$"
// (a comment there) or repeats another is replaced (fixedNames). A row
// bounded on both sides is a G row with a RANGES entry, a row with no
// bound an N row; the columns listed in integer are written between
// MARKER lines.
func WriteMPS(p *Problem, name string, colNames, rowNames []string, integer []int, f MPSFormat) []byte {
	cols := make([]string, p.Cols)
	for j := range cols {
		cols[j] = "c" + strconv.Itoa(j+1)
		if colNames != nil {
			cols[j] = colNames[j]
		}
	}
	rows := make([]string, p.Rows)
	seen := map[string]int{"cost": 1}
	for i := range rows {
		r := "r" + strconv.Itoa(i+1)
		if rowNames != nil {
			r = rowNames[i]
		}
		seen[r]++
		if k := seen[r]; k > 1 {
			r = fmt.Sprintf("%s#%d", r, k)
		}
		rows[i] = r
	}
	w := &mpsWriter{f: f}
	if f == FixedMPS {
		w.mapping(name, cols, rows)
	}
	w.write(p, name, cols, rows, integer)
	return w.b.Bytes()
}

// mpsWriter writes the records of one MPS file.
type mpsWriter struct {
	f MPSFormat
	b bytes.Buffer
}

// record writes a data record of fields 1 to 6 ("" where blank): blank
// separated in free MPS, in their columns in fixed MPS.
func (w *mpsWriter) record(fields ...string) {
	if w.f == FreeMPS {
		w.b.WriteByte(' ')
		first := true
		for _, s := range fields {
			if s == "" {
				continue
			}
			if !first {
				w.b.WriteByte(' ')
			}
			w.b.WriteString(s)
			first = false
		}
		w.b.WriteByte('\n')
		return
	}
	start := [...]int{2, 5, 15, 25, 40, 50} // 1-based columns of fields 1..6
	line := make([]byte, 0, 61)
	for k, s := range fields {
		if s == "" {
			continue
		}
		for len(line) < start[k]-1 {
			line = append(line, ' ')
		}
		line = append(line, s...)
	}
	w.b.Write(line)
	w.b.WriteByte('\n')
}

// num writes a number: to 17 significant digits in free MPS (exact), in
// at most 12 characters in fixed MPS.
func (w *mpsWriter) num(v float64) string {
	if w.f == FreeMPS {
		return strconv.FormatFloat(v, 'g', 17, 64)
	}
	return fixedNum(v)
}

// fixedNum is v in at most 12 characters: its shortest exact form when that
// fits, else the most significant digits that do, as a decimal, with a
// short exponent ("1.5e-7") or with a whole mantissa ("-1234567e-18",
// which saves the point): 7 digits at the least for |exponents| below 100,
// 9 to 11 for the values of lipoplan's models.
func fixedNum(v float64) string {
	if s := shortExp(strconv.FormatFloat(v, 'g', -1, 64)); len(s) <= 12 {
		return s
	}
	for prec := 16; prec > 1; prec-- {
		if s := shortExp(strconv.FormatFloat(v, 'g', prec, 64)); len(s) <= 12 {
			return s
		}
		if s := wholeMantissa(strconv.FormatFloat(v, 'e', prec-1, 64)); len(s) <= 12 {
			return s
		}
	}
	return shortExp(strconv.FormatFloat(v, 'e', 0, 64))
}

// wholeMantissa writes "d.ddde±x" as "dddde<x-3>": the same number
// without the point.
func wholeMantissa(s string) string {
	i := strings.IndexByte(s, 'e')
	dot := strings.IndexByte(s, '.')
	if i < 0 || dot < 0 || dot > i {
		return s
	}
	e, err := strconv.Atoi(s[i+1:])
	if err != nil {
		return s
	}
	frac := s[dot+1 : i]
	return s[:dot] + frac + "e" + strconv.Itoa(e-len(frac))
}

// shortExp drops an exponent's "+" and leading zeros: "1e+06" -> "1e6",
// "1.5e-07" -> "1.5e-7".
func shortExp(s string) string {
	i := strings.IndexByte(s, 'e')
	if i < 0 {
		return s
	}
	e, err := strconv.Atoi(s[i+1:])
	if err != nil {
		return s
	}
	return s[:i+1] + strconv.Itoa(e)
}

func (w *mpsWriter) write(p *Problem, name string, cols, rows []string, integer []int) {
	if w.f == FreeMPS {
		fmt.Fprintf(&w.b, "NAME %s\n", name)
	} else {
		fmt.Fprintf(&w.b, "NAME          %s\n", fitName(name))
	}
	w.b.WriteString("ROWS\n")
	w.record("N", "cost")
	for i := 0; i < p.Rows; i++ {
		lo, up := p.RowLo[i], p.RowUp[i]
		t := "G"
		switch {
		case lo == up:
			t = "E"
		case math.IsInf(lo, -1) && math.IsInf(up, 1):
			t = "N"
		case math.IsInf(lo, -1):
			t = "L"
		}
		w.record(t, rows[i])
	}
	w.b.WriteString("COLUMNS\n")
	isInt := make([]bool, p.Cols)
	for _, j := range integer {
		isInt[j] = true
	}
	inInt := false
	marker := func(kind string) { w.record("", "MARKER", "'MARKER'", "", "'"+kind+"'") }
	for j := 0; j < p.Cols; j++ {
		if isInt[j] != inInt {
			if inInt {
				marker("INTEND")
			} else {
				marker("INTORG")
			}
			inInt = isInt[j]
		}
		w.record("", cols[j], "cost", w.num(p.Obj[j]))
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			w.record("", cols[j], rows[p.Index[k]], w.num(p.Value[k]))
		}
	}
	if inInt {
		marker("INTEND")
	}
	w.b.WriteString("RHS\n")
	for i := 0; i < p.Rows; i++ {
		lo, up := p.RowLo[i], p.RowUp[i]
		rhs := lo
		if math.IsInf(lo, -1) {
			rhs = up
		}
		if !math.IsInf(rhs, 0) && rhs != 0 {
			w.record("", "RHS", rows[i], w.num(rhs))
		}
	}
	w.b.WriteString("RANGES\n")
	for i := 0; i < p.Rows; i++ {
		lo, up := p.RowLo[i], p.RowUp[i]
		if lo != up && !math.IsInf(lo, -1) && !math.IsInf(up, 1) {
			w.record("", "RNG", rows[i], w.num(up-lo))
		}
	}
	w.b.WriteString("BOUNDS\n")
	for j := 0; j < p.Cols; j++ {
		lo, up := p.ColLo[j], p.ColUp[j]
		c := cols[j]
		switch {
		case lo == up:
			w.record("FX", "BND", c, w.num(lo))
		case math.IsInf(lo, -1) && math.IsInf(up, 1):
			w.record("FR", "BND", c)
		default:
			if math.IsInf(lo, -1) {
				w.record("MI", "BND", c)
			} else if lo != 0 {
				w.record("LO", "BND", c, w.num(lo))
			}
			if !math.IsInf(up, 1) {
				w.record("UP", "BND", c, w.num(up))
			}
		}
	}
	w.b.WriteString("ENDATA\n")
}

// fixedWidth is the longest name of fixed MPS.
const fixedWidth = 8

// fits reports whether s can stand as a name in fixed MPS as it is: at
// most 8 characters, printable, no blank (readers drop blanks inside
// names), not starting with "$" (a comment in fields 3 and 5).
func fits(s string) bool {
	if s == "" || len(s) > fixedWidth || s[0] == '$' {
		return false
	}
	for i := 0; i < len(s); i++ {
		if s[i] <= ' ' || s[i] > '~' {
			return false
		}
	}
	return true
}

// fitName is a model name for fixed MPS: its first 8 characters, blanks
// and "$" replaced.
func fitName(s string) string {
	b := []byte(s)
	if len(b) > fixedWidth {
		b = b[:fixedWidth]
	}
	for i, c := range b {
		if c <= ' ' || c > '~' || c == '$' {
			b[i] = '_'
		}
	}
	if len(b) == 0 {
		return "lipoplan"
	}
	return string(b)
}

// fixedNames replaces, in place, every name of names that does not fit
// fixed MPS, or repeats one kept before it (or one of taken), by prefix
// and a number ("C17", "R5"), and returns the replacements as pairs of
// new and old name.
func fixedNames(names []string, prefix string, taken map[string]bool) [][2]string {
	used := map[string]bool{}
	for k := range taken {
		used[k] = true
	}
	keep := make([]bool, len(names))
	for i, s := range names {
		if fits(s) && !used[s] {
			keep[i], used[s] = true, true
		}
	}
	var out [][2]string
	n := 0
	for i, s := range names {
		if keep[i] {
			continue
		}
		var t string
		for {
			n++
			if t = prefix + strconv.Itoa(n); !used[t] {
				break
			}
		}
		used[t] = true
		names[i] = t
		out = append(out, [2]string{t, s})
	}
	return out
}

// mapping fits the names of a fixed MPS file (fixedNames; the objective
// row keeps "cost") and writes the replacements as comment records at the
// top of the file, each at most 80 characters (a long name continues on
// the next record).
func (w *mpsWriter) mapping(model string, cols, rows []string) {
	colMap := fixedNames(cols, "C", nil)
	rowMap := fixedNames(rows, "R", map[string]bool{"cost": true})
	fmt.Fprintf(&w.b, "* lipoplan model %s in fixed MPS: names fit to %d characters.\n", model, fixedWidth)
	if len(colMap)+len(rowMap) == 0 {
		w.b.WriteString("* Every name is as in lipoplan.\n")
		return
	}
	w.b.WriteString("* Names not listed are as in lipoplan; these stand for names it cannot hold:\n")
	const width = 80
	line := func(kind string, m [][2]string) {
		for _, p := range m {
			head := fmt.Sprintf("* %-6s %-8s ", kind, p[0])
			rest := p[1]
			for {
				k := min(len(rest), width-len(head))
				for k < len(rest) && k > 1 && !utf8.RuneStart(rest[k]) {
					k--
				}
				w.b.WriteString(head + rest[:k] + "\n")
				rest = rest[k:]
				if rest == "" {
					break
				}
				head = "*" + strings.Repeat(" ", len(head)-1)
			}
		}
	}
	line("column", colMap)
	line("row", rowMap)
}
