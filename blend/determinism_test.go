package blend

import (
	"testing"

	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// The same profile gives bit-identical properties on every call: a report
// must not change in its last digits between runs on the same files
// (reproducible reports, common practice). Go ranges over a map in a new
// random order each time, so 50 calls in one process see many orders; a
// sum taken in map order differed in the last bits between them.
func TestProfileSameBitsEveryCall(t *testing.T) {
	for _, s := range catalogue.DemoStocks().Stocks {
		first := Profile(s.FattyAcids)
		for i := 0; i < 50; i++ {
			require.Equal(t, first, Profile(s.FattyAcids), "stock %q, call %d", s.ID, i)
		}
	}
}
