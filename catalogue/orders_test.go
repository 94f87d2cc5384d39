package catalogue

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestLoadOrders(t *testing.T) {
	dir := t.TempDir()
	require.NoError(t, os.MkdirAll(filepath.Join(dir, "specs"), 0o755))
	for _, id := range DemoSpecIDs() {
		require.NoError(t, os.WriteFile(filepath.Join(dir, "specs", id+".toml"), DemoFiles()[id+".toml"], 0o644))
	}
	orders := `
[[order]]
spec = "specs/laminating.toml"
tonnes = 120

[[order]]
spec = "specs/shortening.toml"
tonnes = 300.5

[purchase]
"shea-st" = 3100.0
pko = 1450
`
	p := filepath.Join(dir, "orders.toml")
	require.NoError(t, os.WriteFile(p, []byte(orders), 0o644))
	o, ps := LoadOrders(p, DemoStocks())
	require.Empty(t, ps, "%v", ps)
	require.Len(t, o.Orders, 2)
	assert.Equal(t, p, o.File)
	assert.Equal(t, "laminating", o.Orders[0].Spec.ID)
	assert.Equal(t, filepath.Join(dir, "specs", "laminating.toml"), o.Orders[0].Path, "resolved against the orders file")
	assert.Equal(t, 120.0, o.Orders[0].Tonnes)
	assert.Equal(t, 300.5, o.Orders[1].Tonnes)
	assert.Equal(t, map[string]float64{"shea-st": 3100, "pko": 1450}, o.Purchase)
}

// A spec file named by many orders is read once and its problems are
// reported once, under the first order that names it.
func TestOrdersReadEachSpecOnce(t *testing.T) {
	dir := t.TempDir()
	require.NoError(t, os.WriteFile(filepath.Join(dir, "bad.toml"), []byte("name = \"x\"\nbatch = 0.0\n"), 0o600))
	require.NoError(t, os.WriteFile(filepath.Join(dir, "good.toml"), DemoFiles()["laminating.toml"], 0o600))
	var b strings.Builder
	for i := 0; i < 300; i++ {
		fmt.Fprintf(&b, "[[order]]\nspec = \"good.toml\"\ntonnes = 10\n[[order]]\nspec = \"bad.toml\"\ntonnes = 10\n")
	}
	orders := filepath.Join(dir, "orders.toml")
	require.NoError(t, os.WriteFile(orders, []byte(b.String()), 0o600))
	o, ps := LoadOrders(orders, DemoStocks())
	assert.Nil(t, o)
	require.Len(t, ps.Errors(), 1, "%v", ps)
	assert.Contains(t, ps[0].String(), "spec of order #2 in "+orders)
	require.NoError(t, os.WriteFile(orders, []byte(strings.Repeat("[[order]]\nspec = \"good.toml\"\ntonnes = 10\n", 3)), 0o600))
	o, ps = LoadOrders(orders, DemoStocks())
	require.Empty(t, ps.Errors())
	require.Len(t, o.Orders, 3)
	assert.Equal(t, o.Orders[0].Spec, o.Orders[2].Spec)
	assert.NotSame(t, o.Orders[0].Spec, o.Orders[2].Spec, "each order has its own copy")
}
