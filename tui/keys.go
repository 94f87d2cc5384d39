package tui

import "charm.land/bubbles/v2/key"

// keyMap is the workspace's key bindings (our own choice of keys).
type keyMap struct {
	Next, Prev            key.Binding
	Panel                 [numPanels]key.Binding
	Up, Down, Left, Right key.Binding
	PageUp, PageDown      key.Binding
	Top, Bottom           key.Binding
	Edit, Raise, Lower    key.Binding
	Allow                 key.Binding
	NewLimit, DropLimit   key.Binding
	Relax                 key.Binding
	Predict               key.Binding
	Match                 key.Binding
	Undo, Redo            key.Binding
	Save, Open, WriteBack key.Binding
	Keep, Base, Note      key.Binding // variants to compare, the scenario's note
	Choose, Drop, Curves  key.Binding // 6 Compare: work on a column, drop it, figures|curves
	Quit, Keys            key.Binding
	Accept, Cancel        key.Binding
}

func newKeyMap() keyMap {
	k := keyMap{
		Next:      key.NewBinding(key.WithKeys("tab"), key.WithHelp("tab", "next panel")),
		Prev:      key.NewBinding(key.WithKeys("shift+tab")),
		Up:        key.NewBinding(key.WithKeys("up", "k"), key.WithHelp("↑↓", "move")),
		Down:      key.NewBinding(key.WithKeys("down", "j")),
		Left:      key.NewBinding(key.WithKeys("left", "h"), key.WithHelp("←→", "col")),
		Right:     key.NewBinding(key.WithKeys("right", "l")),
		PageUp:    key.NewBinding(key.WithKeys("pgup")),
		PageDown:  key.NewBinding(key.WithKeys("pgdown")),
		Top:       key.NewBinding(key.WithKeys("home", "g")),
		Bottom:    key.NewBinding(key.WithKeys("end", "G")),
		Edit:      key.NewBinding(key.WithKeys("enter", "e"), key.WithHelp("enter", "edit")),
		Raise:     key.NewBinding(key.WithKeys("]"), key.WithHelp("[ ]", "nudge")),
		Lower:     key.NewBinding(key.WithKeys("[")),
		Allow:     key.NewBinding(key.WithKeys("space", "x"), key.WithHelp("space", "in/out")),
		NewLimit:  key.NewBinding(key.WithKeys("n", "+"), key.WithHelp("n", "add")),
		DropLimit: key.NewBinding(key.WithKeys("d", "delete"), key.WithHelp("d", "drop")),
		Relax:     key.NewBinding(key.WithKeys("R"), key.WithHelp("R", "relax")),
		Predict:   key.NewBinding(key.WithKeys("p"), key.WithHelp("p", "predicted")),
		Match:     key.NewBinding(key.WithKeys("m"), key.WithHelp("m", "match a fat")),
		Undo:      key.NewBinding(key.WithKeys("u", "ctrl+z"), key.WithHelp("u", "undo")),
		Redo:      key.NewBinding(key.WithKeys("U", "ctrl+y"), key.WithHelp("U", "redo")),
		Save:      key.NewBinding(key.WithKeys("s", "ctrl+s"), key.WithHelp("s", "save")),
		Open:      key.NewBinding(key.WithKeys("o"), key.WithHelp("o", "open")),
		WriteBack: key.NewBinding(key.WithKeys("W"), key.WithHelp("W", "write")),
		Keep:      key.NewBinding(key.WithKeys("v"), key.WithHelp("v", "keep")),
		Base:      key.NewBinding(key.WithKeys("b"), key.WithHelp("b", "make base")),
		Note:      key.NewBinding(key.WithKeys("a"), key.WithHelp("a", "note")),
		Choose:    key.NewBinding(key.WithKeys("enter", "e"), key.WithHelp("enter", "work on")),
		Drop:      key.NewBinding(key.WithKeys("d", "delete"), key.WithHelp("d", "drop")),
		Curves:    key.NewBinding(key.WithKeys("c"), key.WithHelp("c", "curves")),
		Quit:      key.NewBinding(key.WithKeys("q", "ctrl+c"), key.WithHelp("q", "quit")),
		Keys:      key.NewBinding(key.WithKeys("?"), key.WithHelp("?", "keys")),
		Accept:    key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "apply")),
		Cancel:    key.NewBinding(key.WithKeys("esc", "ctrl+c"), key.WithHelp("esc", "cancel")),
	}
	for i := range k.Panel {
		d := string(rune('1' + i))
		k.Panel[i] = key.NewBinding(key.WithKeys(d), key.WithHelp("1-6", "panel"))
	}
	return k
}

// helpFor lists the bindings shown in the one-line help of a panel: what
// the panel offers first, then the few keys needed everywhere.
func (k keyMap) helpFor(p panel, infeasible bool) []key.Binding {
	var out []key.Binding
	if infeasible {
		out = append(out, k.Relax)
	}
	switch p {
	case panelStocks:
		out = append(out, k.Left, k.Edit, k.Raise, k.Allow)
	case panelLimits:
		out = append(out, k.Left, k.Edit, k.Raise, k.NewLimit, k.DropLimit)
	case panelSFC:
		out = append(out, k.Predict, k.Match, k.Panel[0])
	case panelCompare:
		return append(out, k.Left, k.Choose, k.Drop, k.Curves, k.Keep, k.Undo, k.Save, k.Quit, k.Keys)
	default:
		return append(out, k.Panel[0], k.Keep, k.Open, k.Undo, k.Redo, k.Save, k.Quit, k.Keys)
	}
	return append(out, k.Undo, k.Save, k.Quit, k.Keys)
}

// keyGroups is the full key list shown by ?.
func (k keyMap) keyGroups() [][2]string {
	return [][2]string{
		{"1…6  tab  shift+tab", "panels: Blend Stocks Limits SFC-curve TAG-classes Compare"},
		{"↑↓ k j pgup pgdn g G", "move the cursor"},
		{"← →  h l", "column: price|on hand (Stocks), min|max (Limits)"},
		{"enter  e", "edit the value (empty = no bound, or unlimited)"},
		{"[  ]", "nudge down/up: price 10, on hand 5 t, limit 0.5-1"},
		{"space  x", "allow a stock in the blend or leave it out"},
		{"n  +", "add a limit: iv, trans, C18:2, sfc 30, use <stock>"},
		{"d  delete", "drop the limit under the cursor"},
		{"R", "apply the relaxation suggested for an impossible spec"},
		{"p", "SFC curve: overlay the TAG model's prediction, as blended / chemical IE / enzymatic IE / off"},
		{"m", "match a fat: its measured curve ± a tolerance becomes the SFC bands, trans <= 1, the fat left out"},
		{"u ctrl+z / U ctrl+y", "undo / redo an edit"},
		{"v / b", "keep the scenario as a variant to compare (up to 3) / make it the base"},
		{"6: ← → enter d c", "Compare: pick a column, work on it, drop it, figures or SFC curves"},
		{"a", "write a note on the scenario (saved with it)"},
		{"s / o", "save the scenario and its result as one TOML file / open one"},
		{"W", "write stocks and spec back to their files, asking first"},
		{"q  ctrl+c", "quit (q asks again while edits are unsaved)"},
	}
}
