package catalogue

import (
	"math/big"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A profile that sums to 100.30 on paper sits on the edge of the warning
// band (checkSum: more than 0.3 from 100 warns). Added up in Go's random
// map order these eight values give 100.29999999999998 ... 100.30000000000003,
// so the warning came and went between runs of the same file. The same file
// must get the same verdict every time (reproducible reports, common
// practice); 50 loads in one process see many map orders.
func TestCheckSumSameVerdictEveryLoad(t *testing.T) {
	data := `
[[stock]]
id = "edge"
price = 1000.0
[stock.fatty_acids]
"C12:0" = 2.59
"C14:0" = 4.83
"C16:0" = 5.51
"C16:1" = 10.45
"C18:0" = 14.88
"C18:1" = 18.42
"C18:2" = 20.30
"C18:3" = 23.32
`
	_, first := ParseStocks("edge.toml", []byte(data))
	for i := 0; i < 50; i++ {
		_, ps := ParseStocks("edge.toml", []byte(data))
		require.Equal(t, first.Error(), ps.Error(), "load %d", i)
	}
}

// SumValues depends on the values only: maps filled in different orders
// give bit-identical totals, within a few units in the last place of the
// exact sum of the binary values (math/big at 256 bits as the reference).
func TestSumValuesOrderFree(t *testing.T) {
	keys := []string{"C12:0", "C14:0", "C16:0", "C16:1", "C18:0", "C18:1", "C18:2", "C18:3"}
	vals := []float64{2.59, 4.83, 5.51, 10.45, 14.88, 18.42, 20.30, 23.32}
	exact := new(big.Float).SetPrec(256)
	for _, v := range vals {
		exact.Add(exact, new(big.Float).SetPrec(256).SetFloat64(v))
	}
	want, _ := exact.Float64()
	var got []float64
	for shift := range keys {
		m := map[string]float64{}
		for i := range keys {
			j := (i + shift) % len(keys)
			m[keys[j]] = vals[j]
		}
		for r := 0; r < 10; r++ {
			got = append(got, SumValues(m))
		}
	}
	for _, g := range got {
		require.Equal(t, got[0], g)
	}
	assert.InDelta(t, want, got[0], 4*2.2e-16*100)
	assert.Equal(t, 0.0, SumValues(nil))
}

// SortedKeys puts keys outside the reference table first, in byte order,
// and the rest in table order, whatever the map's iteration order.
func TestSortedKeysTies(t *testing.T) {
	m := map[string]float64{"zz": 1, "C18:1": 1, "aa": 1, "C16:0": 1, "mm": 1}
	for i := 0; i < 50; i++ {
		require.Equal(t, []string{"aa", "mm", "zz", "C16:0", "C18:1"}, SortedKeys(m))
	}
}
