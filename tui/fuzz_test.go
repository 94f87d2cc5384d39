package tui

import (
	"math"
	"strings"
	"testing"

	tea "charm.land/bubbletea/v2"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// fuzzKeys are the keys a fuzz step may press: panels, moves, every edit key
// (enter, [ ], space, n, d, R, p, u, U, s, o, W, ?), prompt editing and
// accept/cancel. Typed values come from the fuzzer's second input.
func fuzzKeys() []string {
	return []string{
		"1", "2", "3", "4", "5", "<tab>", "<s-tab>", "<up>", "<down>", "<left>", "<right>", "g", "G",
		"<enter>", "]", "[", "<space>", "n", "d", "R", "u", "U", "s", "o", "W", "?",
		"<ctrl+u>", "<bs>", "<esc>",
	}
}

// FuzzWorkspaceEdits drives the workspace model with random key sequences
// that open edits and type random values (huge, tiny, NaN, negative, words),
// then confirm them. Whatever is typed, the model must not panic, the view
// must stay an exact frame of the window, and no value outside the accepted
// magnitudes (catalogue.Quantity, README "Accepted magnitudes") may reach the
// scenario. The workspace is confined and read-only, so nothing is written.
// Run: go test ./tui -run '^$' -fuzz FuzzWorkspaceEdits -fuzztime 15s
func FuzzWorkspaceEdits(f *testing.F) {
	// seeds: price, amount on hand, batch, a limit and a new limit, each set
	// to awkward values and confirmed; then undo, redo and relaxation
	f.Add(fuzzOps("2", "<enter>", "=", "<enter>", "<right>", "<enter>", "=", "<enter>", "]", "["), "1e25|1e308|NaN|-5")
	f.Add(fuzzOps("3", "g", "<enter>", "=", "<enter>", "<down>", "<enter>", "=", "<enter>", "u", "U"), "1e-320|0.0005|1e6|12,5")
	f.Add(fuzzOps("n", "=", "<enter>", "<enter>", "=", "<enter>", "<left>", "<enter>", "=", "<enter>", "d", "R"), "sfc 30|1e300|-1e-9|inf")
	f.Add(fuzzOps("3", "G", "<enter>", "=", "<enter>", "<up>", "<enter>", "=", "<enter>", "s", "o", "=", "<enter>", "W", "?"), "1e300|1e25|../../etc/passwd|x")
	dir := f.TempDir()
	keys := fuzzKeys()
	f.Fuzz(func(t *testing.T, ops []byte, values string) {
		vals := strings.Split(values, "|")
		d := newDriver(t, demoModel(t, "laminating", Files{Dir: dir, Confined: true, ReadOnly: true}), 80, 24)
		w, h := 80, 24
		for i, op := range ops {
			if i >= 32 || d.quit {
				break
			}
			switch {
			case op == 255: // type the next value
				d.keys("<ctrl+u>")
				v := vals[i%len(vals)]
				if len(v) > 300 {
					v = v[:300]
				}
				d.send(tea.PasteMsg{Content: v})
			case op >= 240: // a new window size
				w, h = 20+int(op)*7%180, 6+int(op)*3%50
				d.send(tea.WindowSizeMsg{Width: w, Height: h})
			default:
				d.keys(keys[int(op)%len(keys)])
			}
			d.requireFrame(w, h)
			requireAccepted(t, d.m.Scenario())
		}
	})
}

// fuzzOps writes a seed from key names; "=" types the next value.
func fuzzOps(keys ...string) []byte {
	var ops []byte
	for _, k := range keys {
		if k == "=" {
			ops = append(ops, 255)
			continue
		}
		for i, fk := range fuzzKeys() {
			if fk == k {
				ops = append(ops, byte(i))
			}
		}
	}
	return ops
}

// requireAccepted checks every value of the scenario against its quantity's
// accepted range.
func requireAccepted(t *testing.T, sc *Scenario) {
	t.Helper()
	check := func(q catalogue.Quantity, label string, v float64) {
		require.NoError(t, q.Check(label, v))
	}
	for _, s := range sc.Catalogue.Stocks {
		check(catalogue.QtyPrice, s.ID+" price", s.Price)
		if !math.IsInf(s.Available, 1) {
			check(catalogue.QtyOnHand, s.ID+" on hand", s.Available)
		}
	}
	check(catalogue.QtyTonnes, "batch", sc.Spec.Batch)
	for _, r := range sc.Rows() {
		if r.Single() {
			continue
		}
		for _, v := range []float64{r.Bound.Min, r.Bound.Max} {
			if !math.IsInf(v, 0) {
				check(r.quantity(), r.Label, v)
			}
		}
	}
	check(catalogue.QtyPercent, "smallest share if used", sc.Spec.Rules.SmallestShare)
	require.GreaterOrEqual(t, sc.Spec.Rules.MaxStocks, 0)
}

// quantity is the kind of value a min/max row holds.
func (r Row) quantity() catalogue.Quantity {
	if r.Kind == RowLimit {
		return catalogue.LimitQuantity(r.Key)
	}
	return catalogue.QtyPercent
}
