package main

import (
	"encoding/json"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// replace's JSON carries the keys its reference names: status, cost per
// tonne, the incumbent, the saving, the blend, the curve side by side, the
// largest deviation, the tolerance and the properties.
func TestReplaceJSON(t *testing.T) {
	code, out, errs := run(t, "replace", "--incumbent", "ph-soy", "--format", "json")
	require.Equal(t, 0, code, errs)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	for _, k := range []string{"status", "cost_per_tonne", "incumbent", "saving_per_tonne", "blend", "curve", "max_deviation", "tolerance", "properties", "caution"} {
		assert.Contains(t, got, k)
	}
	assert.Equal(t, "optimal", got["status"])
	inc := got["incumbent"].(map[string]any)
	assert.Equal(t, "ph-soy", inc["id"])
	assert.InDelta(t, inc["price"].(float64)-got["cost_per_tonne"].(float64), got["saving_per_tonne"].(float64), 1e-3)
	curve := got["curve"].(map[string]any)
	pt := curve["35"].(map[string]any)
	for _, k := range []string{"incumbent", "blend", "predicted"} {
		assert.Contains(t, pt, k)
	}
	md := got["max_deviation"].(map[string]any)
	assert.LessOrEqual(t, md["by"].(float64), 3+1e-6)
}

// No blend within the tolerance: exit 3, and the report gives the smallest
// tolerance that can be met with the blend at it.
func TestReplaceNoMatchExit3(t *testing.T) {
	code, out, _ := run(t, "replace", "--incumbent", "ph-soy", "--tolerance", "0.2", "--format", "json")
	require.Equal(t, 3, code)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assert.Equal(t, "infeasible", got["status"])
	assert.Greater(t, got["tolerance"].(float64), got["requested_tolerance"].(float64))
	assert.NotEmpty(t, got["blend"])
	code, out, _ = run(t, "replace", "--incumbent", "ph-soy", "--tolerance", "0.2")
	require.Equal(t, 3, code)
	assert.Contains(t, out, "smallest tolerance that can be met")
}

func TestReplaceBadFlags(t *testing.T) {
	for _, args := range [][]string{
		{"replace"},
		{"replace", "--incumbent", "lard"},
		{"replace", "--incumbent", "ph-soy", "--process", "chemical"},
		{"replace", "--incumbent", "ph-soy", "--feed", "palm"},
		{"replace", "--incumbent", "ph-soy", "--tolerance", "warm"},
		{"replace", "--incumbent", "ph-soy", "--tolerance", "10=x"},
		{"replace", "--incumbent", "ph-soy", "--process", "glycerolysis", "--feed", "palm"},
	} {
		code, out, errs := run(t, args...)
		assert.Equal(t, 2, code, "%v: %s%s", args, out, errs)
		assert.NotContains(t, out+errs, "panic")
	}
}
