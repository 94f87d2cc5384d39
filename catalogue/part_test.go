package catalogue

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A recipe's shares are parts by mass that need not add up to 100 (common
// practice; a mix is normalised); an empty recipe, a share that is negative
// or not a number, and shares adding up to nothing are bad input naming the
// stock.
func TestCheckParts(t *testing.T) {
	a, b := &Stock{ID: "a"}, &Stock{ID: "b"}
	total, err := CheckParts([]Part{{Stock: a, Pct: 30}, {Stock: b, Pct: 20}})
	require.NoError(t, err)
	assert.Equal(t, 50.0, total)
	for name, parts := range map[string][]Part{
		"none":     nil,
		"negative": {{Stock: a, Pct: 10}, {Stock: b, Pct: -1}},
		"nan":      {{Stock: b, Pct: math.NaN()}},
		"inf":      {{Stock: b, Pct: math.Inf(1)}},
		"zero":     {{Stock: a}, {Stock: b}},
	} {
		_, err := CheckParts(parts)
		assert.True(t, IsBadInput(err), "%s: %v", name, err)
		if name != "none" && name != "zero" {
			assert.ErrorContains(t, err, `stock "b"`, name)
		}
	}
	_, err = CheckParts([]Part{{Pct: 1}})
	assert.Error(t, err)
	assert.False(t, IsBadInput(err), "a line without a stock is the caller's fault")
}
