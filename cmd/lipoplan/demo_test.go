package main

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The demo prints the demo stocks' property table first unless asked not
// to: --no-stocks-table and --stocks-table=false leave it out and change
// nothing else of the report; asking for both ways is bad input.
func TestDemoStocksTable(t *testing.T) {
	const heading = "Demo stocks (invented plant"
	code, full, errs := run(t, "demo")
	require.Equal(t, 0, code, errs)
	require.Contains(t, full, heading)
	_, rest, ok := strings.Cut(full, "=== Demo spec 1")
	require.True(t, ok)
	for _, args := range [][]string{{"demo", "--no-stocks-table"}, {"demo", "--stocks-table=false"}} {
		code, out, errs := run(t, args...)
		require.Equal(t, 0, code, errs)
		assert.NotContains(t, out, heading, args)
		assert.True(t, strings.HasPrefix(out, "=== Demo spec 1"), "%v: the report starts with the first spec", args)
		assert.Equal(t, rest, strings.TrimPrefix(out, "=== Demo spec 1"), "%v: the rest of the report is unchanged", args)
	}
	code, out, _ := run(t, "demo", "--stocks-table")
	assert.Equal(t, 0, code)
	assert.Contains(t, out, heading)
	code, _, errs = run(t, "demo", "--stocks-table", "--no-stocks-table")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--no-stocks-table")
}
