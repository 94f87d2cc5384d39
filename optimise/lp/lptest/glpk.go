// Package lptest holds what the tests of lipoplan's engine layer share:
// GLPK's glpsol as an outside reference through MPS files, seeded random
// problems of the shapes lipoplan solves, and checks of optimality
// conditions and certificates. It is imported by tests only.
package lptest

import (
	"bufio"
	"math"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"testing"

	"lipoplan/optimise/lp"
)

// GLPK is glpsol's answer to one MPS file, read from its plain-text
// solution (-w) and, when asked, its sensitivity report (--ranges).
type GLPK struct {
	// Status: "optimal", "infeasible", "unbounded" or glpsol's raw
	// primal/dual status letters when it is none of these.
	Status   string
	Obj      float64
	RowStat  []string // "b" basic, "l"/"u" at lower/upper bound, "f" free, "s" fixed
	RowDual  []float64
	ColStat  []string
	ColDual  []float64
	ColValue []float64
	// From --ranges: the objective coefficient range of each column, and
	// the activity range of each row that is not basic, by name.
	CostLo, CostHi     map[string]float64
	RowRngLo, RowRngHi map[string]float64
}

// HaveGlpsol reports whether glpsol is on PATH.
func HaveGlpsol() bool {
	_, err := exec.LookPath("glpsol")
	return err == nil
}

// NeedGlpsol skips the test when glpsol is missing.
func NeedGlpsol(t testing.TB) {
	t.Helper()
	if !HaveGlpsol() {
		t.Skip("glpsol (Debian package glpk-utils) is not on PATH; .ci/run installs it")
	}
}

// Glpsol solves an MPS file with GLPK (glpsol --freemps --nopresol: its
// simplex on the problem as written, so that an infeasible or unbounded
// problem is reported as such; its branch and bound when the file has
// integer columns) and reads its
// plain-text solution: "s bas rows cols pst dst obj" (LP) or "s mip rows
// cols sst obj", then "i row st prim dual" and "j col st prim dual" lines
// (GLPK's plain-text solution format, as glpsol 5.0 writes it). With
// ranges it also parses the sensitivity report. glpsol drops free rows (N
// rows after the objective) as it reads the file: the row arrays hold the
// other rows in order (KeptRows).
func Glpsol(t testing.TB, mps string, ranges bool) GLPK {
	t.Helper()
	return GlpsolWith(t, mps, GlpsolOptions{Ranges: ranges})
}

// GlpsolOptions choose how glpsol reads and solves a file.
type GlpsolOptions struct {
	// Fixed reads the file as fixed MPS (glpsol --mps), not free MPS.
	Fixed bool
	// Exact solves an LP with GLPK's simplex in exact rational arithmetic
	// (glpsol --exact): no tolerance, the reference where coefficients
	// span many orders of magnitude and a floating-point simplex,
	// GLPK's own included, may stop short of the optimum.
	Exact bool
	// Ranges also reads the sensitivity report (--ranges).
	Ranges bool
}

// GlpsolWith is Glpsol with the options o.
func GlpsolWith(t testing.TB, mps string, o GlpsolOptions) GLPK {
	t.Helper()
	sol := mps + ".sol"
	format := "--freemps"
	if o.Fixed {
		format = "--mps"
	}
	args := []string{format, "--nopresol", mps, "-w", sol}
	if o.Exact {
		args = append(args, "--exact")
	}
	ranges := o.Ranges
	if ranges {
		args = append(args, "--ranges", mps+".rng")
	}
	out, err := exec.Command("glpsol", args...).CombinedOutput()
	if err != nil {
		t.Fatalf("glpsol %v: %v\n%s", args, err, out)
	}
	f, err := os.Open(sol)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var g GLPK
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fs := strings.Fields(sc.Text())
		if len(fs) == 0 {
			continue
		}
		num := func(s string) float64 {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatalf("glpsol solution %s: %q: %v", sol, sc.Text(), err)
			}
			return v
		}
		switch fs[0] {
		case "s":
			if fs[1] == "bas" {
				pst, dst := fs[4], fs[5]
				g.Obj = num(fs[6])
				switch {
				case pst == "f" && dst == "f":
					g.Status = "optimal"
				case pst == "n" || pst == "i" && dst == "f":
					g.Status = "infeasible"
				case pst == "f" && (dst == "n" || dst == "i"):
					g.Status = "unbounded"
				default:
					g.Status = pst + dst
				}
			} else { // "s mip rows cols sst obj"
				g.Obj = num(fs[5])
				switch fs[4] {
				case "o":
					g.Status = "optimal"
				case "n":
					g.Status = "infeasible"
				default:
					g.Status = fs[4]
				}
			}
		case "i":
			if len(fs) == 5 {
				g.RowStat = append(g.RowStat, fs[2])
				g.RowDual = append(g.RowDual, num(fs[4]))
			}
		case "j":
			if len(fs) == 5 {
				g.ColStat = append(g.ColStat, fs[2])
				g.ColValue = append(g.ColValue, num(fs[3]))
				g.ColDual = append(g.ColDual, num(fs[4]))
			} else {
				g.ColValue = append(g.ColValue, num(fs[2]))
			}
		}
	}
	if ranges && g.Status == "optimal" {
		g.parseRanges(t, mps+".rng")
	}
	return g
}

// parseRanges reads glpsol's sensitivity report: every row and column
// takes two lines. For a column, the 8th field of the first line is the low
// end of its objective coefficient range and the 4th field of the second
// line the high end; for a row that is not basic, the 7th field of the
// first line and the 3rd of the second are its activity range ("." is
// zero). glpsol prints these to 6 significant digits.
func (g *GLPK) parseRanges(t testing.TB, path string) {
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	g.CostLo, g.CostHi = map[string]float64{}, map[string]float64{}
	g.RowRngLo, g.RowRngHi = map[string]float64{}, map[string]float64{}
	lines := strings.Split(string(b), "\n")
	section := ""
	val := func(s string) float64 {
		switch s {
		case ".":
			return 0
		case "+Inf":
			return math.Inf(1)
		case "-Inf":
			return math.Inf(-1)
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatalf("glpsol ranges %s: %q: %v", path, s, err)
		}
		return v
	}
	for i := 0; i < len(lines); i++ {
		l := lines[i]
		switch {
		case strings.Contains(l, "Column name"):
			section = "col"
			continue
		case strings.Contains(l, "Row name"):
			section = "row"
			continue
		}
		fs := strings.Fields(l)
		if section == "" || len(fs) < 7 || i+1 >= len(lines) {
			continue
		}
		if _, err := strconv.Atoi(fs[0]); err != nil {
			continue
		}
		next := strings.Fields(lines[i+1])
		switch {
		case section == "col" && len(fs) >= 8 && len(next) >= 4:
			g.CostLo[fs[1]], g.CostHi[fs[1]] = val(fs[7]), val(next[3])
		case section == "row" && fs[2] != "BS" && len(next) >= 3:
			g.RowRngLo[fs[1]], g.RowRngHi[fs[1]] = val(fs[6]), val(next[2])
		}
		i++
	}
}

// KeptRows lists the rows of p that glpsol keeps (those with a bound), in
// order: GLPK's row i is p's row KeptRows(p)[i].
func KeptRows(p *lp.Problem) []int {
	var out []int
	for i := 0; i < p.Rows; i++ {
		if !math.IsInf(p.RowLo[i], -1) || !math.IsInf(p.RowUp[i], 1) {
			out = append(out, i)
		}
	}
	return out
}
