package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// writeOrders puts the demo stocks and specs and an orders file into a
// temporary folder and returns the paths of the stocks and orders files.
func writeOrders(t *testing.T, orders string, extra map[string]string) (string, string) {
	dir := t.TempDir()
	for name, data := range catalogue.DemoFiles() {
		require.NoError(t, os.WriteFile(filepath.Join(dir, name), data, 0o644))
	}
	for name, data := range extra {
		require.NoError(t, os.WriteFile(filepath.Join(dir, name), []byte(data), 0o644))
	}
	path := filepath.Join(dir, "orders.toml")
	require.NoError(t, os.WriteFile(path, []byte(orders), 0o644))
	return filepath.Join(dir, "stocks.toml"), path
}

func TestPlanDemoJSON(t *testing.T) {
	code, out, errs := run(t, "plan", "--format", "json")
	require.Equal(t, 0, code, errs)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	// The keys of the JSON contract (README, JSON output), exactly.
	assert.Equal(t, []string{"caution", "engine", "products", "status", "stocks", "total_cost"}, keysOf(got))
	assertEngineNamed(t, got["engine"])
	assert.Equal(t, "optimal", got["status"])
	var total float64
	for _, p := range got["products"].([]any) {
		pm := p.(map[string]any)
		assert.Equal(t, []string{"blend", "cost_per_tonne", "spec", "tonnes"}, keysOf(pm))
		total += pm["cost_per_tonne"].(float64) * pm["tonnes"].(float64)
	}
	assert.InDelta(t, got["total_cost"].(float64), total, 0.1)
	for _, s := range got["stocks"].([]any) {
		assert.Equal(t, []string{"available", "buy", "shadow_price", "stock", "used"}, keysOf(s.(map[string]any)))
	}
}

func TestPlanOrdersFileAgainstGLPK(t *testing.T) {
	stocks, orders := writeOrders(t, `[[order]]
spec = "laminating.toml"
tonnes = 120.0
[[order]]
spec = "shortening.toml"
tonnes = 80.0
[purchase]
"palm-st-soft" = 1100.0
`, nil)
	mps := filepath.Join(filepath.Dir(orders), "plan.mps")
	code, out, errs := run(t, "plan", "--stocks", stocks, "--orders", orders, "--format", "json", "--mps", mps)
	require.Equal(t, 0, code, errs)
	var got struct {
		Total float64 `json:"total_cost"`
	}
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	if _, err := exec.LookPath("glpsol"); err != nil {
		t.Skip("glpsol (Debian package glpk-utils) is not on PATH; .ci/run installs it")
	}
	obj := glpsolObjective(t, mps)
	assert.InDelta(t, obj, got.Total, 1e-6*obj+0.01) // JSON rounds to cents
}

func TestPlanInfeasible(t *testing.T) {
	stocks, orders := writeOrders(t, `[[order]]
spec = "laminating.toml"
tonnes = 50.0
[[order]]
spec = "impossible.toml"
tonnes = 10.0
`, map[string]string{"impossible.toml": impossibleSpec})
	code, out, _ := run(t, "plan", "--stocks", stocks, "--orders", orders)
	assert.Equal(t, 3, code)
	assert.Contains(t, out, "cannot all be met")
	assert.Contains(t, out, "impossible:safa.max")

	code, out, _ = run(t, "plan", "--stocks", stocks, "--orders", orders, "--format", "json")
	assert.Equal(t, 3, code)
	var got map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	assert.Equal(t, "infeasible", got["status"])
	assert.NotEmpty(t, got["relaxation"])
}

func TestPlanBadOrders(t *testing.T) {
	code, _, errs := run(t, "plan", "--orders", filepath.Join(t.TempDir(), "none.toml"))
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "none.toml")
}

// plan does not model a reactor step; it says so instead of keeping quiet.
func TestPlanNotesAnUnmodelledProcess(t *testing.T) {
	spec, err := filepath.Abs("../../testdata/process-margarine.toml")
	require.NoError(t, err)
	orders := filepath.Join(t.TempDir(), "orders.toml")
	require.NoError(t, os.WriteFile(orders, []byte("[[order]]\nspec = \""+spec+"\"\ntonnes = 50\n"), 0o644))
	code, out, errs := run(t, "plan", "--orders", orders, "--format", "json")
	require.Equal(t, 0, code, errs)
	var got struct{ Notes []string }
	require.NoError(t, json.Unmarshal([]byte(out), &got))
	require.Len(t, got.Notes, 1)
	assert.Contains(t, got.Notes[0], "[process] step")
}
