package lp_test

import (
	"bufio"
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/optimise/lp"
	"lipoplan/optimise/lp/lptest"
)

// fixedMapping reads the comment records at the top of a fixed MPS file
// ("* column C1       <name>", "* row    R1       <name>", the name from
// the 19th character, a long one continued from there on the next
// records) into the names they stand for, by kind and new name.
func fixedMapping(t *testing.T, b []byte) map[string]map[string]string {
	t.Helper()
	out := map[string]map[string]string{"column": {}, "row": {}}
	var kind, short string
	sc := bufio.NewScanner(bytes.NewReader(b))
	for sc.Scan() {
		l := sc.Text()
		if !strings.HasPrefix(l, "*") {
			break
		}
		if f := strings.Fields(l); len(f) >= 3 && (f[1] == "column" || f[1] == "row") {
			kind, short = f[1], f[2]
			out[kind][short] = l[18:]
			continue
		}
		if kind != "" && strings.HasPrefix(l, "*"+strings.Repeat(" ", 17)) {
			out[kind][short] += l[18:]
		}
	}
	return out
}

// TestFixedMPSAgainstGLPK writes 66 seeded random problems of every kind,
// and 14 with integer columns, in fixed MPS with names too long for it
// ("column-number-<j>", "row-number-<i>", and repeats) and requires: every
// record within 80 characters; GLPK's glpsol, reading the file as fixed
// MPS (--mps, which checks every field's columns), reaches the status and
// objective it reaches on the free MPS file of the same problem (1e-7
// relative: numbers in fixed MPS keep at most 12 characters); and the
// comment records map every name of the file back to lipoplan's, one to
// one. The random problems' inequality bounds are first loosened by 1e-6
// (loosened): the generator puts many exactly through its hidden feasible
// blend, and on such a knife edge the rounding to 12 characters can tip
// the verdict (GLPK's exact simplex finds some of them infeasible even as
// written in free MPS).
func TestFixedMPSAgainstGLPK(t *testing.T) {
	lptest.NeedGlpsol(t)
	dir := t.TempDir()
	for c := 0; c < 80; c++ {
		r := rand.New(rand.NewPCG(1962, uint64(c)))
		var p *lp.Problem
		var ints []int
		if c < 66 {
			p = loosened(lptest.Random(r, lptest.Kinds[c%len(lptest.Kinds)]))
		} else {
			base := lptest.Random(r, lptest.Blend)
			for base.Cols > 8 {
				base = lptest.Random(r, lptest.Blend)
			}
			p, ints = cardinality(base, 1+r.IntN(3), 5)
		}
		cols := make([]string, p.Cols)
		for j := range cols {
			cols[j] = fmt.Sprintf("column-number-%d", j)
			if j%3 == 0 {
				cols[j] = fmt.Sprintf("c%d", j) // fits and stays
			}
		}
		rows := make([]string, p.Rows)
		for i := range rows {
			rows[i] = fmt.Sprintf("row-number-%d", i%5) // repeats
		}
		name := fmt.Sprintf("case %d", c)
		free := filepath.Join(dir, fmt.Sprintf("case%03d.free.mps", c))
		fixed := filepath.Join(dir, fmt.Sprintf("case%03d.fixed.mps", c))
		b := lp.WriteMPS(p, "random-case", cols, rows, ints, lp.FixedMPS)
		require.NoError(t, os.WriteFile(free, lp.WriteMPS(p, "random-case", cols, rows, ints, lp.FreeMPS), 0o644))
		require.NoError(t, os.WriteFile(fixed, b, 0o644))
		for k, l := range strings.Split(string(b), "\n") {
			require.LessOrEqual(t, len(l), 80, "%s line %d: %q", name, k+1, l)
		}
		m := fixedMapping(t, b)
		back := map[string]bool{}
		for short, long := range m["column"] {
			assert.LessOrEqual(t, len(short), 8, name)
			assert.False(t, back[long], "%s: %s mapped twice", name, long)
			back[long] = true
		}
		for j, c := range cols {
			if j%3 == 0 {
				assert.False(t, back[c], "%s: %s fits and needs no mapping", name, c)
			} else {
				assert.True(t, back[c], "%s: %s has no mapping", name, c)
			}
		}
		assert.Len(t, m["row"], p.Rows, "%s: every row renamed (too long)", name)
		gf := lptest.Glpsol(t, free, false)
		gx := lptest.GlpsolWith(t, fixed, lptest.GlpsolOptions{Fixed: true})
		require.Equal(t, gf.Status, gx.Status, name)
		if gf.Status == "optimal" {
			assert.True(t, lptest.RelClose(gf.Obj, gx.Obj, 1e-7), "%s: fixed %v, free %v", name, gx.Obj, gf.Obj)
		}
	}
}

// loosened is p with every finite bound of a column or row that is not
// fixed moved outwards by 1e-6·(1 + |bound|).
func loosened(p *lp.Problem) *lp.Problem {
	q := p.Clone()
	out := func(lo, up []float64) {
		for i := range lo {
			if lo[i] == up[i] {
				continue
			}
			lo[i] -= 1e-6 * (1 + math.Abs(lo[i]))
			up[i] += 1e-6 * (1 + math.Abs(up[i]))
		}
	}
	out(q.ColLo, q.ColUp)
	out(q.RowLo, q.RowUp)
	return q
}

// TestFixedMPSNumbers: numbers in fixed MPS take at most 12 characters;
// those whose shortest exact form fits are exact, the others keep at least
// 7 significant digits (worked by hand: the worst case is a negative
// number with a two-digit exponent, "-1234567e-18"), and values from 1e-3
// to 1e6, those of most coefficients, at least 9 ("-0.333333333").
func TestFixedMPSNumbers(t *testing.T) {
	for _, v := range []float64{0, 1, -1, 100, 0.001, 1e9, 1e-9, 1e13, 1.0 / 3, -2.0 / 3, 123456.789012345, -1.2345678901234e-12, 6.02214076e23, 0.086000000000000021, -1e300 / 3, 5e-99 / 3} {
		p := &lp.Problem{Rows: 1, Cols: 1, Start: []int{0, 1}, Index: []int{0}, Value: []float64{v},
			Obj: []float64{1}, ColLo: []float64{0}, ColUp: []float64{1}, RowLo: []float64{math.Inf(-1)}, RowUp: []float64{1}}
		b := lp.WriteMPS(p, "n", []string{"x"}, []string{"r"}, nil, lp.FixedMPS)
		var field string
		for _, l := range strings.Split(string(b), "\n") {
			if strings.HasPrefix(l, "    x         r") {
				field = strings.TrimSpace(l[24:])
			}
		}
		require.NotEmpty(t, field, "%v: no coefficient record in\n%s", v, b)
		assert.LessOrEqual(t, len(field), 12, "%v: %q", v, field)
		got, err := strconv.ParseFloat(field, 64)
		require.NoError(t, err, field)
		switch a := math.Abs(v); {
		case len(strconv.FormatFloat(v, 'g', -1, 64)) <= 12:
			assert.Equal(t, v, got, "%q", field)
		case a >= 1e-3 && a < 1e6:
			assert.InEpsilon(t, v, got, 5e-9, "%v written %q", v, field)
		default:
			assert.InEpsilon(t, v, got, 5e-7, "%v written %q", v, field)
		}
	}
}

// TestFixedMPSNames: names fixed MPS cannot hold as they are — a blank
// inside, "$" first (a comment in fields 3 and 5), letters beyond ASCII,
// a row named like the objective row, a name given twice, one of the
// replacement names itself — are replaced and mapped, and glpsol --mps
// reads the file to the optimum of the free file.
func TestFixedMPSNames(t *testing.T) {
	lptest.NeedGlpsol(t)
	// min x + 2y + 3z  s.t.  x + y + z = 10 (two rows alike), y >= 2, z >= 1
	p := &lp.Problem{Rows: 4, Cols: 3, Start: []int{0, 2, 5, 8}, Index: []int{0, 1, 0, 1, 2, 0, 1, 3}, Value: []float64{1, 1, 1, 1, 1, 1, 1, 1},
		Obj: []float64{1, 2, 3}, ColLo: []float64{0, 0, 0}, ColUp: []float64{math.Inf(1), math.Inf(1), math.Inf(1)},
		RowLo: []float64{10, 10, 2, 1}, RowUp: []float64{10, 10, math.Inf(1), math.Inf(1)}}
	cols := []string{"a b", "$x", "C1"}
	rows := []string{"cost", "sum", "säure", "sum"}
	dir := t.TempDir()
	b := lp.WriteMPS(p, "names", cols, rows, nil, lp.FixedMPS)
	path := filepath.Join(dir, "names.mps")
	require.NoError(t, os.WriteFile(path, b, 0o644))
	g := lptest.GlpsolWith(t, path, lptest.GlpsolOptions{Fixed: true})
	require.Equal(t, "optimal", g.Status, string(b))
	assert.InDelta(t, 2*2+1*3+7*1, g.Obj, 1e-9) // worked by hand: y = 2, z = 1, x = 7
	m := fixedMapping(t, b)
	assert.ElementsMatch(t, []string{"a b", "$x"}, valuesOf(m["column"]))
	// A row named "cost" or a name given twice is first made unique as in
	// free MPS ("cost#2", "sum#2"), which fits.
	assert.ElementsMatch(t, []string{"säure"}, valuesOf(m["row"]))
	assert.Contains(t, string(b), " E  cost#2\n")
	assert.Contains(t, string(b), " G  sum#2\n")
	assert.NotContains(t, m["column"], "C1", "a kept name is not handed out again")
}

func valuesOf(m map[string]string) []string {
	var out []string
	for _, v := range m {
		out = append(out, v)
	}
	return out
}
