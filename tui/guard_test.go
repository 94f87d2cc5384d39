package tui

import (
	"strings"
	"testing"

	tea "charm.land/bubbletea/v2"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// faulty is a model that panics where it is told to: in Update on the key
// "!", in the command it returns for "c", or in View once armed by "v".
type faulty struct{ viewPanics bool }

func (f *faulty) Init() tea.Cmd { return nil }

func (f *faulty) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	if k, ok := msg.(tea.KeyPressMsg); ok {
		switch k.Text {
		case "!":
			var m map[string]int
			m["x"] = 1 // assignment to a nil map
		case "c":
			return f, func() tea.Msg { panic("fault in a command") }
		case "v":
			f.viewPanics = true
		}
	}
	return f, nil
}

func (f *faulty) View() tea.View {
	if f.viewPanics {
		panic("fault in View")
	}
	return tea.NewView("fine")
}

func press(s string) tea.KeyPressMsg { return tea.KeyPressMsg{Code: []rune(s)[0], Text: s} }

func isQuit(t *testing.T, cmd tea.Cmd) bool {
	t.Helper()
	if cmd == nil {
		return false
	}
	_, ok := cmd().(tea.QuitMsg)
	return ok
}

// A fault in Update, in a command or in View stops the workspace with the
// fault message, and every later message quits; the process goes on.
func TestGuardStopsOnFault(t *testing.T) {
	for _, script := range []string{"!", "c", "v"} {
		g := NewGuard(&faulty{})
		require.Nil(t, g.Init())
		assert.Equal(t, "fine", g.View().Content)
		next, cmd := g.Update(press(script))
		assert.Same(t, g, next, "the guard stays the model, even after a fault")
		switch script {
		case "!":
			assert.True(t, isQuit(t, cmd), "a fault in Update quits at once")
		case "c":
			require.NotNil(t, cmd)
			msg := cmd()
			require.IsType(t, faultMsg{}, msg)
			_, cmd = g.Update(msg)
			assert.True(t, isQuit(t, cmd))
		case "v":
			assert.Nil(t, g.Fault())
			view := g.View()
			assert.Contains(t, view.Content, "internal fault: fault in View")
		}
		require.Error(t, g.Fault(), script)
		assert.Contains(t, g.View().Content, "This workspace has stopped", script)
		_, cmd = g.Update(press("x"))
		assert.True(t, isQuit(t, cmd), "%s: after a fault every key closes", script)
	}
	g := NewGuard(&faulty{})
	g.Update(press("!"))
	assert.True(t, strings.HasPrefix(FaultMessage(g.Fault()), "lipoplan: internal fault: assignment to entry in nil map"))
}

// The workspace itself runs unchanged under the guard.
func TestGuardPassesTheWorkspaceThrough(t *testing.T) {
	m := demoModel(t, "laminating", Files{})
	g := NewGuard(m)
	cmd := g.Init()
	require.NotNil(t, cmd)
	_, cmd = g.Update(cmd())
	assert.Nil(t, cmd)
	require.NotNil(t, m.Snapshot())
	_, _ = g.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	assert.Contains(t, g.View().Content, "Cheapest blend")
	assert.NoError(t, g.Fault())
}
