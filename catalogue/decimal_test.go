package catalogue

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestExactDecimal holds the short conversion of the direct reader to
// strconv.ParseFloat, bit for bit: the forms of the catalogues, the edges
// of the fast path (15 digits, 10^±22, a zero of either sign) and 20,000
// seeded random decimals; what it declines is declined, never wrong.
func TestExactDecimal(t *testing.T) {
	cases := []string{"44.0", "0.25", "-0.0", "+0.0", "0.0", "62.0", "100.0", "1e1", "1E-3", "2.5e+2", "-7.125",
		"0.000001", "123456789012345.0", "1234567890123456.0", "0.1234567890123456", "1e22", "1e23", "1e-22",
		"1e-23", "9007199254740993.0", "0.00000000000000000000001", "100000000000000000000000.0", "5e-324", "1.7976931348623157e308"}
	r := rand.New(rand.NewPCG(1990, 1))
	for range 20000 {
		digits := fmt.Sprint(r.Uint64N(1 << r.UintN(54)))
		cut := r.IntN(len(digits) + 1)
		s := digits[:cut] + "." + digits[cut:]
		if cut == 0 || cut == len(digits) {
			s = digits + ".0"
		}
		if r.IntN(3) == 0 {
			s += fmt.Sprintf("e%d", r.IntN(60)-30)
		}
		if r.IntN(2) == 0 {
			s = "-" + s
		}
		cases = append(cases, s)
	}
	fast := 0
	for _, s := range cases {
		want, err := strconv.ParseFloat(s, 64)
		require.NoError(t, err, s)
		got, ok := exactDecimal([]byte(s))
		if !ok {
			continue
		}
		fast++
		require.Equal(t, math.Float64bits(want), math.Float64bits(got), "%s: %v, want %v", s, got, want)
	}
	require.Greater(t, fast, len(cases)/2, "most decimals take the short way")
	// texts that are not decimals at all: declined, or read as strconv reads them
	for _, s := range []string{"", "-", "+", ".", "-.", "e5", ".e1", "1e", "1e+", "1.2.3", "0x10", "1_0", "inf", "NaN", " 1", "1 ", "--1", "1e1e1", "20", "37.5", "5.", ".5"} {
		got, ok := exactDecimal(s)
		want, err := strconv.ParseFloat(s, 64)
		if ok {
			require.NoError(t, err, "%q is read the short way but strconv refuses it", s)
			require.Equal(t, math.Float64bits(want), math.Float64bits(got), "%q", s)
		}
	}
	for _, s := range []string{"62.0", "-0.0", "0.25", "1e1"} {
		_, ok := exactDecimal([]byte(s))
		require.True(t, ok, s)
	}
}
