package lp

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
)

// MPS renders p in free MPS format (the column-oriented MPS layout of
// IBM's MPSX with names separated by blanks, as read by GLPK's glpsol
// --freemps and by COIN-OR), objective row "cost". Columns and rows are
// named by colNames and rowNames (nil: "c1", "c2" ... and "r1", "r2" ...);
// a repeated row name gets a "#2", "#3" suffix, as names must be unique.
// A row bounded on both sides is a G row with a RANGES entry, a row with
// no bound an N row; the columns listed in integer are written between
// MARKER lines. Numbers are written to 17 significant digits, so the file
// holds exactly the problem.
func MPS(p *Problem, name string, colNames, rowNames []string, integer []int) []byte {
	col := func(j int) string {
		if colNames != nil {
			return colNames[j]
		}
		return "c" + strconv.Itoa(j+1)
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
	num := func(v float64) string { return strconv.FormatFloat(v, 'g', 17, 64) }
	var b bytes.Buffer
	fmt.Fprintf(&b, "NAME %s\nROWS\n N cost\n", name)
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
		fmt.Fprintf(&b, " %s %s\n", t, rows[i])
	}
	b.WriteString("COLUMNS\n")
	isInt := make([]bool, p.Cols)
	for _, j := range integer {
		isInt[j] = true
	}
	inInt := false
	for j := 0; j < p.Cols; j++ {
		if isInt[j] != inInt {
			marker := "INTORG"
			if inInt {
				marker = "INTEND"
			}
			fmt.Fprintf(&b, " MARKER 'MARKER' '%s'\n", marker)
			inInt = isInt[j]
		}
		fmt.Fprintf(&b, " %s cost %s\n", col(j), num(p.Obj[j]))
		for k := p.Start[j]; k < p.Start[j+1]; k++ {
			fmt.Fprintf(&b, " %s %s %s\n", col(j), rows[p.Index[k]], num(p.Value[k]))
		}
	}
	if inInt {
		b.WriteString(" MARKER 'MARKER' 'INTEND'\n")
	}
	b.WriteString("RHS\n")
	for i := 0; i < p.Rows; i++ {
		lo, up := p.RowLo[i], p.RowUp[i]
		rhs := lo
		if math.IsInf(lo, -1) {
			rhs = up
		}
		if !math.IsInf(rhs, 0) && rhs != 0 {
			fmt.Fprintf(&b, " RHS %s %s\n", rows[i], num(rhs))
		}
	}
	b.WriteString("RANGES\n")
	for i := 0; i < p.Rows; i++ {
		lo, up := p.RowLo[i], p.RowUp[i]
		if lo != up && !math.IsInf(lo, -1) && !math.IsInf(up, 1) {
			fmt.Fprintf(&b, " RNG %s %s\n", rows[i], num(up-lo))
		}
	}
	b.WriteString("BOUNDS\n")
	for j := 0; j < p.Cols; j++ {
		lo, up := p.ColLo[j], p.ColUp[j]
		c := col(j)
		switch {
		case lo == up:
			fmt.Fprintf(&b, " FX BND %s %s\n", c, num(lo))
		case math.IsInf(lo, -1) && math.IsInf(up, 1):
			fmt.Fprintf(&b, " FR BND %s\n", c)
		default:
			if math.IsInf(lo, -1) {
				fmt.Fprintf(&b, " MI BND %s\n", c)
			} else if lo != 0 {
				fmt.Fprintf(&b, " LO BND %s %s\n", c, num(lo))
			}
			if !math.IsInf(up, 1) {
				fmt.Fprintf(&b, " UP BND %s %s\n", c, num(up))
			}
		}
	}
	b.WriteString("ENDATA\n")
	return b.Bytes()
}
