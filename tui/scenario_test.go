package tui

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
	"lipoplan/optimise"
)

func demoScenario(t *testing.T, id string) *Scenario {
	t.Helper()
	spec, ok := catalogue.DemoSpec(id)
	require.True(t, ok)
	return NewScenario(catalogue.DemoStocks(), spec)
}

func rowByKey(t *testing.T, sc *Scenario, key string) Row {
	t.Helper()
	for _, r := range sc.Rows() {
		if r.Key == key {
			return r
		}
	}
	t.Fatalf("no row %s", key)
	return Row{}
}

func TestEditsCopyOnWrite(t *testing.T) {
	sc := demoScenario(t, "laminating")
	before, err := EncodeScenario(sc)
	require.NoError(t, err)

	next, err := sc.WithStock("palm", FieldPrice, 1234)
	require.NoError(t, err)
	next, err = next.WithAllowed("pko", false)
	require.NoError(t, err)
	next, err = next.WithBound(rowByKey(t, next, "sfc.20"), Max, 44)
	require.NoError(t, err)

	after, err := EncodeScenario(sc)
	require.NoError(t, err)
	assert.Equal(t, string(before), string(after), "an edit must never change the scenario it started from")
	p, _ := next.Catalogue.Find("palm")
	assert.Equal(t, 1234.0, p.Price)
	assert.True(t, next.Excluded["pko"])
	assert.Equal(t, 44.0, rowByKey(t, next, "sfc.20").Bound.Max)
}

func TestEffectiveExcludes(t *testing.T) {
	sc := demoScenario(t, "laminating")
	// pko has a use row (max 10) in the demo spec; rapeseed has none.
	sc, err := sc.WithAllowed("pko", false)
	require.NoError(t, err)
	sc, err = sc.WithAllowed("rapeseed", false)
	require.NoError(t, err)
	_, spec := sc.Effective()
	got := map[string]catalogue.Bound{}
	for _, u := range spec.Use {
		got[u.Stock] = u.Bound
	}
	assert.Equal(t, 0.0, got["pko"].Max)
	assert.Equal(t, 0.0, got["rapeseed"].Max)
	assert.Equal(t, 15.0, got["shea-st"].Max, "other use rows are kept")
	// the user's own spec keeps the pko bound for when it is allowed again
	assert.Equal(t, 10.0, rowByKey(t, sc, "use.pko").Bound.Max)
	back, err := sc.WithAllowed("pko", true)
	require.NoError(t, err)
	_, spec = back.Effective()
	for _, u := range spec.Use {
		if u.Stock == "pko" {
			assert.Equal(t, 10.0, u.Max)
		}
	}
}

func TestBoundChecks(t *testing.T) {
	sc := demoScenario(t, "laminating")
	r := rowByKey(t, sc, "sfc.20") // 30..45
	_, err := sc.WithBound(r, Min, 50)
	assert.ErrorContains(t, err, `limit "sfc.20": min = 50 is above max = 45`)
	_, err = sc.WithBound(r, Max, 120)
	assert.ErrorContains(t, err, "outside the accepted range 0 to 100 %")
	_, err = sc.WithBound(rowByKey(t, sc, "batch"), Max, 0)
	assert.ErrorContains(t, err, "outside the accepted range 0.001 to 1e6 t")
	_, err = sc.WithBound(rowByKey(t, sc, "rules.max_stocks"), Max, 2.5)
	assert.ErrorContains(t, err, "whole number")
	cleared, err := sc.WithBound(r, Min, math.NaN())
	require.NoError(t, err)
	assert.False(t, rowByKey(t, cleared, "sfc.20").Bound.HasMin())
	_, err = sc.WithStock("palm", FieldPrice, -1)
	assert.Error(t, err)
	unl, err := sc.WithStock("hosun", FieldAvailable, math.NaN())
	require.NoError(t, err)
	h, _ := unl.Catalogue.Find("hosun")
	assert.False(t, h.Limited())
}

// Every workspace edit refuses a magnitude no plant has with the loader's own
// check and words (catalogue.Stock.Check and Spec.Check; README "Accepted magnitudes"),
// and leaves the scenario as it was.
func TestEditsRefuseMagnitudes(t *testing.T) {
	sc := demoScenario(t, "laminating")
	sc, _, err := sc.WithNewRow("iv")
	require.NoError(t, err)
	for _, tc := range []struct {
		name string
		edit func() (*Scenario, error)
		q    catalogue.Quantity
	}{
		{"price 1e25", func() (*Scenario, error) { return sc.WithStock("palm", FieldPrice, 1e25) }, catalogue.QtyPrice},
		{"price 1e-320", func() (*Scenario, error) { return sc.WithStock("palm", FieldPrice, 1e-320) }, catalogue.QtyPrice},
		{"on hand 1e308", func() (*Scenario, error) { return sc.WithStock("hosun", FieldAvailable, 1e308) }, catalogue.QtyOnHand},
		{"batch 1e-320", func() (*Scenario, error) { return sc.WithBound(rowByKey(t, sc, "batch"), Max, 1e-320) }, catalogue.QtyTonnes},
		{"batch 1e308", func() (*Scenario, error) { return sc.WithBound(rowByKey(t, sc, "batch"), Max, 1e308) }, catalogue.QtyTonnes},
		{"iv max 1e25", func() (*Scenario, error) { return sc.WithBound(rowByKey(t, sc, "iv"), Max, 1e25) }, catalogue.QtyIV},
		{"sfc min -1", func() (*Scenario, error) { return sc.WithBound(rowByKey(t, sc, "sfc.20"), Min, -1) }, catalogue.QtyPercent},
		{"smallest share 1e25", func() (*Scenario, error) {
			return sc.WithBound(rowByKey(t, sc, "rules.smallest_share"), Max, 1e25)
		}, catalogue.QtyPercent},
	} {
		next, err := tc.edit()
		require.Error(t, err, tc.name)
		assert.Nil(t, next, tc.name)
		assert.Contains(t, err.Error(), tc.q.Range().String(), "%s: the loader's range, in its words", tc.name)
	}
	_, err = sc.WithBound(rowByKey(t, sc, "rules.max_stocks"), Max, 1e300)
	assert.ErrorContains(t, err, "whole number from 0")
	// the same value is refused in the same words by the catalogue loader
	_, err = sc.WithStock("palm", FieldPrice, 1e25)
	var got catalogue.Problems
	require.ErrorAs(t, err, &got)
	edited := sc.Catalogue.Clone()
	p, _ := edited.Find("palm")
	p.Price = 1e25
	var file bytes.Buffer
	require.NoError(t, catalogue.WriteStocks(&file, edited))
	_, loaded := catalogue.ParseStocks("stocks.toml", file.Bytes())
	require.Len(t, got, 1)
	require.Len(t, loaded, 1)
	assert.Equal(t, loaded[0].Where+": "+loaded[0].Msg, got[0].Where+": "+got[0].Msg)
	p, _ = sc.Catalogue.Find("palm")
	assert.Less(t, p.Price, 1e9, "the scenario is unchanged")
}

func TestNewAndDropRows(t *testing.T) {
	sc := demoScenario(t, "laminating")
	for _, c := range []struct{ in, key string }{
		{"iv", "iv"}, {"C18:2", "C18:2"}, {"c18:3", "C18:3"}, {"sfc 25", "sfc.25"}, {"sfc.37.5", "sfc.37.5"}, {"use palm", "use.palm"},
	} {
		next, key, err := sc.WithNewRow(c.in)
		require.NoError(t, err, c.in)
		assert.Equal(t, c.key, key)
		r := rowByKey(t, next, key)
		assert.False(t, r.Bound.HasMin() || r.Bound.HasMax(), "a new row starts free")
		_, spec := next.Effective()
		assert.Equal(t, len(sc.Spec.Limits)+len(sc.Spec.SFC)+len(sc.Spec.Use),
			len(spec.Limits)+len(spec.SFC)+len(spec.Use), "free rows are not sent to the optimiser")
	}
	for _, bad := range []string{"", "sfc", "sfc 20", "use nosuch", "use pko", "trans", "C99:9", "colour"} {
		_, _, err := sc.WithNewRow(bad)
		assert.Error(t, err, bad)
	}
	dropped, err := sc.WithoutRow(rowByKey(t, sc, "safa"))
	require.NoError(t, err)
	for _, r := range dropped.Rows() {
		assert.NotEqual(t, "safa", r.Key)
	}
	_, err = sc.WithoutRow(rowByKey(t, sc, "batch"))
	assert.Error(t, err)
}

func TestWithRelaxation(t *testing.T) {
	sc := demoScenario(t, "laminating")
	out, skipped, err := sc.WithRelaxation([]optimise.Relax{
		{Name: "sfc.20.min", By: 2.5},
		{Name: "safa.max", By: 1},
		{Name: "avail.shea-st", By: 4},
		{Name: "rules.mystery", By: 1},
	})
	require.NoError(t, err)
	assert.Equal(t, []string{"rules.mystery"}, skipped)
	assert.Equal(t, 27.5, rowByKey(t, out, "sfc.20").Bound.Min)
	assert.Equal(t, 63.0, rowByKey(t, out, "safa").Bound.Max)
	st, _ := out.Catalogue.Find("shea-st")
	assert.Equal(t, 12.0, st.Available)
}

func TestScenarioFileRoundTrip(t *testing.T) {
	for _, id := range catalogue.DemoSpecIDs() {
		sc := demoScenario(t, id)
		sc, err := sc.WithAllowed("coconut", false)
		require.NoError(t, err)
		sc, err = sc.WithStock("palm", FieldPrice, 1012.5)
		require.NoError(t, err)
		path := filepath.Join(t.TempDir(), "s.toml")
		require.NoError(t, SaveScenario(path, sc))
		back, err := LoadScenario(path)
		require.NoError(t, err)
		a, _ := EncodeScenario(sc)
		b, _ := EncodeScenario(back)
		assert.Equal(t, string(a), string(b), "save then load gives the same scenario (%s)", id)
		assert.Equal(t, sc.Catalogue.Stocks, back.Catalogue.Stocks)
		assert.Equal(t, sc.Spec.Limits, back.Spec.Limits)
		assert.Equal(t, sc.Spec.SFC, back.Spec.SFC)
		assert.Equal(t, sc.Spec.Use, back.Spec.Use)
		assert.Equal(t, sc.Spec.Batch, back.Spec.Batch)
		assert.Equal(t, map[string]bool{"coconut": true}, back.Excluded)
		entries, err := os.ReadDir(filepath.Dir(path))
		require.NoError(t, err)
		assert.Len(t, entries, 1, "the atomic write leaves no temporary file behind")
	}
}

func TestScenarioFileBad(t *testing.T) {
	good, err := EncodeScenario(demoScenario(t, "laminating"))
	require.NoError(t, err)
	cases := map[string]string{
		"unknown top key":   string(good) + "\n[extra]\nx = 1\n",
		"unknown meta key":  "[scenario]\nformat = 1\ncolour = \"red\"\n",
		"wrong format":      "[scenario]\nformat = 7\n[stocks]\n[spec]\n",
		"no stocks":         "[scenario]\nformat = 1\n[spec]\nname = \"x\"\n",
		"not toml":          "this is = = not toml",
		"unknown stock key": replaceOnce(string(good), "[[stocks.stock]]\n", "[[stocks.stock]]\nflavour = \"nutty\"\n"),
		"excluded unknown":  replaceOnce(string(good), "excluded = []", `excluded = ["nosuch"]`),
		"nested too deep":   "[scenario]\nformat = 1\nx = " + strings.Repeat("{ a = ", 3000) + "1" + strings.Repeat(" }", 3000) + "\n",
		"huge price":        replaceOnce(string(good), "price = 1150.0", "price = 1e25"),
	}
	for name, body := range cases {
		_, err := DecodeScenario("bad.toml", []byte(body))
		require.Error(t, err, name)
		assert.True(t, catalogue.IsBadInput(err), "%s: %v", name, err)
		assert.Contains(t, err.Error(), "bad.toml", name)
	}
}

// A scenario name that is a FIFO or a folder is refused at once (the
// loaders' rule, catalogue.ReadInput), naming the file.
func TestScenarioFileNotRegular(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe.toml")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))
	done := make(chan error, 1)
	go func() { _, err := LoadScenario(fifo); done <- err }()
	select {
	case err := <-done:
		assert.True(t, catalogue.IsBadInput(err))
		assert.ErrorContains(t, err, fifo+": it is a named pipe (FIFO), not a regular file")
	case <-time.After(20 * time.Second):
		t.Fatal("LoadScenario waits on a FIFO")
	}
	_, err := LoadScenario(dir)
	assert.ErrorContains(t, err, "it is a folder")
}

func replaceOnce(s, old, new string) string {
	if !strings.Contains(s, old) {
		return s + "\n# marker missing: " + old
	}
	return strings.Replace(s, old, new, 1)
}

func TestFilesConfined(t *testing.T) {
	f := Files{Dir: "/srv/scen", Confined: true}
	p, err := f.ScenarioPath("laminating-2")
	require.NoError(t, err)
	assert.Equal(t, "/srv/scen/laminating-2.toml", p)
	for _, bad := range []string{"../etc/passwd", "/etc/passwd", "a/b", "..", ".hidden", ""} {
		_, err := f.ScenarioPath(bad)
		assert.Error(t, err, bad)
	}
	local := Files{}
	p, err = local.ScenarioPath("sub/x.toml")
	require.NoError(t, err)
	assert.Equal(t, "sub/x.toml", p)
	assert.ErrorIs(t, Files{ReadOnly: true, StocksPath: "s"}.CanWriteBack(), ErrReadOnly)
	assert.Error(t, Files{}.CanWriteBack())
}
