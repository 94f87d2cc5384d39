package tui

import (
	"fmt"
	"sync"

	tea "charm.land/bubbletea/v2"
)

// Guard wraps a workspace so that a fault (a Go panic) in its Init, Update or
// View, or in a command it started, stops that workspace with a message
// instead of the process: a served session ends alone and the server and
// every other session go on; a local workspace ends and the CLI exits 1.
// After the program has ended, Fault says what happened.
type Guard struct {
	inner tea.Model

	mu    sync.Mutex
	fault error
}

// faultMsg carries a panic recovered in a command back to Update.
type faultMsg struct{ err error }

// NewGuard wraps m.
func NewGuard(m tea.Model) *Guard { return &Guard{inner: m} }

// Close closes the wrapped workspace (Model.Close) at the end of its
// session, if it has one to close.
func (g *Guard) Close() {
	if c, ok := g.inner.(interface{ Close() }); ok {
		c.Close()
	}
}

// Fault returns the fault that stopped the workspace, or nil.
func (g *Guard) Fault() error {
	g.mu.Lock()
	defer g.mu.Unlock()
	return g.fault
}

// FaultMessage is what a user is told when the workspace stopped on a fault.
func FaultMessage(err error) string {
	return fmt.Sprintf("lipoplan: internal fault: %v. This workspace has stopped; nothing was saved. Please report it with what you did last.", err)
}

// record keeps the first fault.
func (g *Guard) record(r any) {
	g.mu.Lock()
	defer g.mu.Unlock()
	if g.fault == nil {
		g.fault = fmt.Errorf("%v", r)
	}
}

// Init implements tea.Model.
func (g *Guard) Init() (cmd tea.Cmd) {
	defer func() {
		if r := recover(); r != nil {
			g.record(r)
			cmd = tea.Quit
		}
	}()
	return guardCmd(g.inner.Init())
}

// Update implements tea.Model. Once a fault is recorded every message quits.
func (g *Guard) Update(msg tea.Msg) (model tea.Model, cmd tea.Cmd) {
	if f, ok := msg.(faultMsg); ok {
		g.record(f.err)
	}
	if g.Fault() != nil {
		return g, tea.Quit
	}
	defer func() {
		if r := recover(); r != nil {
			g.record(r)
			model, cmd = g, tea.Quit
		}
	}()
	next, c := g.inner.Update(msg)
	g.inner = next
	return g, guardCmd(c)
}

// View implements tea.Model; after a fault it shows the fault message.
func (g *Guard) View() (v tea.View) {
	defer func() {
		if r := recover(); r != nil {
			g.record(r)
			v = g.faultView()
		}
	}()
	if g.Fault() != nil {
		return g.faultView()
	}
	return g.inner.View()
}

func (g *Guard) faultView() tea.View {
	v := tea.NewView(FaultMessage(g.Fault()) + "\n\nPress any key to close.")
	v.AltScreen = true
	return v
}

// guardCmd runs cmd with a recover: its panic becomes a faultMsg. The
// commands of a batch it returns are guarded in turn.
func guardCmd(cmd tea.Cmd) tea.Cmd {
	if cmd == nil {
		return nil
	}
	return func() (msg tea.Msg) {
		defer func() {
			if r := recover(); r != nil {
				msg = faultMsg{fmt.Errorf("%v", r)}
			}
		}()
		msg = cmd()
		if b, ok := msg.(tea.BatchMsg); ok {
			out := make(tea.BatchMsg, len(b))
			for i, c := range b {
				out[i] = guardCmd(c)
			}
			return out
		}
		return msg
	}
}
