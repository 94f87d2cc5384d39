package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"log"
	"os"
	"path/filepath"
	"testing"

	tea "charm.land/bubbletea/v2"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"lipoplan/tui"
)

func TestServeBadInput(t *testing.T) {
	dir := t.TempDir()
	code, _, errs := run(t, "serve", "--host-key", filepath.Join(dir, "hk"))
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--authorized-keys is required")

	bad := filepath.Join(dir, "authorized_keys")
	require.NoError(t, os.WriteFile(bad, []byte("# team\nnot a key at all\n"), 0o600))
	code, _, errs = run(t, "serve", "--authorized-keys", bad, "--host-key", filepath.Join(dir, "hk"))
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, bad+" line 2")

	code, _, errs = run(t, "serve", "--authorized-keys", bad, "--host-key", filepath.Join(dir, "hk"), "--max-sessions", "0")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "--max-sessions")
	_, err := os.Stat(filepath.Join(dir, "hk"))
	assert.True(t, os.IsNotExist(err), "nothing is created when the command line is refused")
}

func TestExploreBadInput(t *testing.T) {
	code, _, errs := run(t, "explore", "--scenario", "a.toml", "--stocks", "b.toml")
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "either --scenario or --stocks/--spec")
	code, _, errs = run(t, "explore", "--scenario", filepath.Join(t.TempDir(), "missing.toml"))
	assert.Equal(t, 2, code)
	assert.Contains(t, errs, "cannot read scenario")
}

// panicky is a workspace that faults on any key, as a programming error in
// a library it calls would: the fault is raised by the standard library's
// log.Panic (into a discarded log), so that the guard's recovery is what is
// tested, and no code of lipoplan's own raises a panic.
type panicky struct{}

func (panicky) Init() tea.Cmd { return nil }
func (panicky) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	if _, ok := msg.(tea.KeyPressMsg); ok {
		log.New(io.Discard, "", 0).Panic("stub fault")
	}
	return panicky{}, nil
}
func (panicky) View() tea.View { return tea.NewView("") }

// A fault inside the workspace is an internal fault (exit 1), never bad
// input (2) and never success; a closed terminal is bad input.
func TestExploreEndExitCodes(t *testing.T) {
	var errb bytes.Buffer
	a := &app{stdout: io.Discard, stderr: &errb}
	g := tui.NewGuard(panicky{})
	g.Update(tea.KeyPressMsg{Code: 'x', Text: "x"})
	assert.Equal(t, 1, a.exit(exploreEnd(g, nil)))
	assert.Contains(t, errb.String(), "lipoplan: internal fault: in the workspace: stub fault")
	clean := tui.NewGuard(panicky{})
	assert.Equal(t, 1, a.exit(exploreEnd(clean, fmt.Errorf("%w: %w", tea.ErrProgramKilled, tea.ErrProgramPanic))), "a panic bubbletea caught")
	assert.Equal(t, 0, a.exit(exploreEnd(clean, nil)))
	assert.Equal(t, 0, a.exit(exploreEnd(clean, tea.ErrInterrupted)))
	assert.Equal(t, 2, a.exit(exploreEnd(clean, errors.New("open /dev/tty: no such device"))))
}
