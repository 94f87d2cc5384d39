package optimise

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestRelaxationRandom makes 60 seeded random specs impossible by pushing
// one or two limits beyond what any stock reaches, then checks the elastic
// diagnosis two ways: the relaxation applied makes the spec feasible, and
// the relaxation shrunk by 1 % (every amount x 0.99) is still infeasible, as
// it must be if no smaller weighted relaxation exists (the elastic optimum
// minimises Σ deficit/scale, and shrinking lowers that sum).
func TestRelaxationRandom(t *testing.T) {
	r := rand.New(rand.NewPCG(99, 1))
	done := 0
	for k := 0; k < 60; k++ {
		cat := genStocks(r, 3+r.IntN(15))
		spec := genSpec(r, cat, 4+r.IntN(10))
		if len(spec.Limits) == 0 {
			continue
		}
		for _, i := range r.Perm(len(spec.Limits))[:min(2, len(spec.Limits))] {
			l := &spec.Limits[i]
			hi := math.Inf(-1)
			for j := range cat.Stocks {
				v, _ := propertyOf(&cat.Stocks[j], l.Name)
				hi = math.Max(hi, v)
			}
			l.Min, l.Max = hi+1+5*r.Float64(), math.Inf(1)
		}
		for _, eng := range engines() {
			res, err := solveWith(eng, cat, spec, Options{})
			require.NoError(t, err, "case %d", k)
			require.Equal(t, Infeasible, res.Status, "case %d", k)
			require.NotEmpty(t, res.Relaxation)
			c2, s2, err := Relaxed(cat, spec, res.Relaxation)
			require.NoError(t, err)
			r2, err := solveWith(eng, c2, s2, Options{})
			require.NoError(t, err)
			assert.Equal(t, Optimal, r2.Status, "case %d %s: relaxation %v applied", k, eng.name(), res.Relaxation)
			shrunk := append([]Relax(nil), res.Relaxation...)
			for i := range shrunk {
				shrunk[i].By *= 0.99
			}
			c3, s3, err := Relaxed(cat, spec, shrunk)
			require.NoError(t, err)
			r3, err := solveWith(eng, c3, s3, Options{})
			require.NoError(t, err)
			assert.Equal(t, Infeasible, r3.Status, "case %d %s: 99 %% of the relaxation %v still works", k, eng.name(), res.Relaxation)
		}
		done++
	}
	assert.Greater(t, done, 40)
}
