package optimise

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// TestSolverMatchesFreshSolves: a Solver keeps an LP engine per model
// structure and warm-starts every re-solve from the last basis of that
// structure, yet its answers must be those of a fresh engine (cold starts,
// new models for every LP): the whole Result of every spec, every string
// and flag equal, every number to 1e-9 relative, whatever the Solver
// solved before (the random specs' prices make every optimum unique, so a
// warm start cannot settle on another tie; two fresh solves differ in the
// last bits already, as blend.Profile sums a map in Go's random order). The
// specs are 80 of the seeded random suite (checked against GLPK in
// reference_test.go), made impossible in every fifth case (the elastic
// programme then runs warm too), the demo specs, and a spec with integer
// rules (MILP, then the LP with the choices fixed); they are solved in two
// different orders, and every Result is checked again after all the later
// solves.
func TestSolverMatchesFreshSolves(t *testing.T) {
	type job struct {
		cat  *catalogue.Catalogue
		spec *catalogue.Spec
	}
	var jobs []job
	for k, c := range randomSuite(t, 80, "") {
		if k%5 == 4 && len(c.spec.Limits) > 0 {
			c.spec.Limits[0].Bound = bound(1e4, inf()) // no stock reaches it
		}
		jobs = append(jobs, job{c.cat, c.spec})
	}
	demo := catalogue.DemoStocks()
	for _, s := range catalogue.DemoSpecs() {
		jobs = append(jobs, job{demo, s})
	}
	lam, ok := catalogue.DemoSpec("laminating")
	require.True(t, ok)
	lam = lam.Clone()
	lam.Rules = catalogue.Rules{MaxStocks: 3, SmallestShare: 8}
	jobs = append(jobs, job{demo, lam})
	want := make([]*Result, len(jobs))
	infeasible := 0
	for i, j := range jobs {
		r, err := solveWith(defaultEngine(), j.cat, j.spec, Options{})
		require.NoError(t, err, "job %d", i)
		want[i] = r
		if r.Status == Infeasible {
			infeasible++
		}
	}
	require.Greater(t, infeasible, 5, "the impossible cases must reach the elastic programme")

	s := NewSolver()
	defer s.Close()
	order := append(rand.New(rand.NewPCG(1, 2)).Perm(len(jobs)), rand.New(rand.NewPCG(3, 4)).Perm(len(jobs))...)
	kept := make([]*Result, len(jobs))
	for _, i := range order {
		got, err := s.Solve(jobs[i].cat, jobs[i].spec, Options{})
		require.NoError(t, err, "job %d", i)
		assertClose(t, want[i], got, 1e-9, fmt.Sprintf("job %d", i))
		kept[i] = got
	}
	// The Solver reuses its working buffers; no Result may point into them.
	for i, got := range kept {
		assertClose(t, want[i], got, 1e-9, fmt.Sprintf("job %d, after later solves", i))
	}
}

// TestSolverProcessSpec: a spec with a [process] step goes through the
// process model from a Solver too (the hand-solved LP of
// TestProcessMeasuredIsOneLP: hard = 20/0.96 % of the batch, 1183.33 EUR/t).
func TestSolverProcessSpec(t *testing.T) {
	s := NewSolver()
	defer s.Close()
	want, err := Solve(paperStocks(), paperSpec(10), Options{})
	require.NoError(t, err)
	got, err := s.Solve(paperStocks(), paperSpec(10), Options{})
	require.NoError(t, err)
	require.NotNil(t, got.Process)
	assert.InDelta(t, 1100+400*20/0.96/100, got.CostPerTonne, 1e-6)
	assertClose(t, want, got, 1e-9, "process spec")
}

func TestSolverAfterClose(t *testing.T) {
	s := NewSolver()
	r, err := s.Solve(twoStocks(), &catalogue.Spec{Batch: 1, Limits: []catalogue.Limit{{Name: "C18:1", Bound: bound(30, inf())}}}, Options{})
	require.NoError(t, err)
	assert.InDelta(t, 1150, r.CostPerTonne, 1e-9) // as TestTwoStocksOnPaper, worked by hand
	s.Close()
	s.Close() // idempotent
	_, err = s.Solve(twoStocks(), &catalogue.Spec{Batch: 1}, Options{})
	assert.ErrorIs(t, err, errSolverClosed)
	_, err = s.Plan(twoStocks(), &catalogue.Orders{})
	assert.ErrorIs(t, err, errSolverClosed)
}

// assertClose compares two values field by field: floats to rel relative
// (equal infinities, NaN with NaN), everything else exactly.
func assertClose(t *testing.T, want, got any, rel float64, where string) {
	t.Helper()
	var walk func(path string, a, b reflect.Value)
	walk = func(path string, a, b reflect.Value) {
		switch a.Kind() {
		case reflect.Float64:
			x, y := a.Float(), b.Float()
			if !(x == y || relClose(x, y, rel) || math.IsNaN(x) && math.IsNaN(y)) {
				t.Errorf("%s%s: %v, want %v", where, path, y, x)
			}
		case reflect.Pointer, reflect.Interface:
			if a.IsNil() || b.IsNil() {
				assert.Equal(t, a.IsNil(), b.IsNil(), where+path)
				return
			}
			walk(path, a.Elem(), b.Elem())
		case reflect.Struct:
			for i := 0; i < a.NumField(); i++ {
				walk(path+"."+a.Type().Field(i).Name, a.Field(i), b.Field(i))
			}
		case reflect.Slice:
			if !assert.Equal(t, a.Len(), b.Len(), where+path) {
				return
			}
			for i := 0; i < a.Len(); i++ {
				walk(fmt.Sprintf("%s[%d]", path, i), a.Index(i), b.Index(i))
			}
		case reflect.Map:
			if !assert.Equal(t, a.Len(), b.Len(), where+path) {
				return
			}
			for _, k := range a.MapKeys() {
				bv := b.MapIndex(k)
				if !bv.IsValid() {
					t.Errorf("%s%s: key %v missing", where, path, k)
					continue
				}
				walk(fmt.Sprintf("%s[%v]", path, k), a.MapIndex(k), bv)
			}
		default:
			assert.Equal(t, a.Interface(), b.Interface(), where+path)
		}
	}
	walk("", reflect.ValueOf(want), reflect.ValueOf(got))
}

// A Solver solves [process] specs on its own engine and profiles too, and
// its answers equal a fresh Solve's, solve after solve.
func TestSolverProcessSpecEqualsSolve(t *testing.T) {
	cat := catalogue.DemoStocks()
	spec := margarineSpec(t, cat)
	want, err := Solve(cat, spec, Options{})
	require.NoError(t, err)
	s := NewSolver()
	defer s.Close()
	for range 3 {
		got, err := s.Solve(cat, spec, Options{})
		require.NoError(t, err)
		require.Equal(t, want.Status, got.Status)
		assert.InDelta(t, want.CostPerTonne, got.CostPerTonne, 1e-6*want.CostPerTonne)
		require.Len(t, got.Blend, len(want.Blend))
	}
}
