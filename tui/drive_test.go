package tui

import (
	"strings"
	"testing"

	tea "charm.land/bubbletea/v2"
	"github.com/charmbracelet/x/ansi"
	"github.com/stretchr/testify/require"

	"lipoplan/catalogue"
)

// driver runs the model the way bubbletea does, but synchronously: every
// command a message returns is run at once and its message fed back in.
type driver struct {
	t    testing.TB
	m    *Model
	quit bool
}

func newDriver(t testing.TB, m *Model, w, h int) *driver {
	d := &driver{t: t, m: m}
	d.run(m.Init())
	d.send(tea.WindowSizeMsg{Width: w, Height: h})
	return d
}

func demoModel(t testing.TB, specID string, files Files) *Model {
	t.Helper()
	spec, ok := catalogue.DemoSpec(specID)
	require.True(t, ok, "demo spec %s", specID)
	return New(catalogue.DemoStocks(), spec, "demo", files)
}

func (d *driver) send(msg tea.Msg) {
	_, cmd := d.m.Update(msg)
	d.run(cmd)
}

func (d *driver) run(cmd tea.Cmd) {
	if cmd == nil {
		return
	}
	switch msg := cmd().(type) {
	case nil:
	case tea.QuitMsg:
		d.quit = true
	case tea.BatchMsg:
		for _, c := range msg {
			d.run(c)
		}
	default:
		d.send(msg)
	}
}

// keys types a key script: "<enter>", "<tab>", "<s-tab>", "<esc>", "<up>",
// "<down>", "<left>", "<right>", "<space>", "<bs>", "<ctrl+c>" name special
// keys; every other rune is typed as itself.
func (d *driver) keys(script string) *driver {
	for script != "" {
		if strings.HasPrefix(script, "<") {
			if i := strings.Index(script, ">"); i > 0 {
				d.send(special(d.t, script[1:i]))
				script = script[i+1:]
				continue
			}
		}
		r := []rune(script)[0]
		d.send(tea.KeyPressMsg{Code: r, Text: string(r)})
		script = script[len(string(r)):]
	}
	return d
}

func special(t testing.TB, name string) tea.KeyPressMsg {
	switch name {
	case "enter":
		return tea.KeyPressMsg{Code: tea.KeyEnter}
	case "tab":
		return tea.KeyPressMsg{Code: tea.KeyTab}
	case "s-tab":
		return tea.KeyPressMsg{Code: tea.KeyTab, Mod: tea.ModShift}
	case "esc":
		return tea.KeyPressMsg{Code: tea.KeyEscape}
	case "up":
		return tea.KeyPressMsg{Code: tea.KeyUp}
	case "down":
		return tea.KeyPressMsg{Code: tea.KeyDown}
	case "left":
		return tea.KeyPressMsg{Code: tea.KeyLeft}
	case "right":
		return tea.KeyPressMsg{Code: tea.KeyRight}
	case "space":
		return tea.KeyPressMsg{Code: tea.KeySpace, Text: " "}
	case "bs":
		return tea.KeyPressMsg{Code: tea.KeyBackspace}
	case "ctrl+c":
		return tea.KeyPressMsg{Code: 'c', Mod: tea.ModCtrl}
	case "ctrl+u":
		return tea.KeyPressMsg{Code: 'u', Mod: tea.ModCtrl}
	}
	t.Fatalf("unknown key <%s>", name)
	return tea.KeyPressMsg{}
}

// screen is the view as plain text.
func (d *driver) screen() string { return ansi.Strip(d.m.View().Content) }

// requireFrame checks the view is exactly h lines of at most w cells.
func (d *driver) requireFrame(w, h int) {
	d.t.Helper()
	content := d.m.View().Content
	lines := strings.Split(content, "\n")
	require.Len(d.t, lines, h, "screen height")
	for i, l := range lines {
		require.LessOrEqual(d.t, ansi.StringWidth(l), w, "line %d is wider than %d: %q", i, w, ansi.Strip(l))
	}
}
