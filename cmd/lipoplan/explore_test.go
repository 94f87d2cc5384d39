package main

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
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
