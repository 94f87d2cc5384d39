package tui

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"
)

// Files is where a workspace may read and write. A local workspace may use any
// path the user types; a served one is confined to Dir, takes plain file
// names only, and writes nothing unless the server was started writable.
type Files struct {
	// Dir confines scenario names to this directory when Confined is set;
	// otherwise relative paths are taken from the process's working directory.
	Dir      string
	Confined bool
	// ReadOnly refuses every write: saving scenarios and writing back.
	ReadOnly bool
	// StocksPath and SpecPath are the files the scenario came from; empty for
	// the embedded demo data. Writing back replaces them.
	StocksPath string
	SpecPath   string
}

// ErrReadOnly is returned for a write on a read-only workspace.
var ErrReadOnly = errors.New("read-only server: nothing can be saved (it was started without --writable)")

// ScenarioPath resolves what the user typed into the file to read or write.
// A confined workspace accepts plain names only ("laminating-2", with or
// without ".toml") and never leaves Dir.
func (f Files) ScenarioPath(name string) (string, error) {
	name = strings.TrimSpace(name)
	switch name {
	case "":
		return "", fmt.Errorf("type a file name for the scenario")
	case "-":
		return "", fmt.Errorf("- (standard output) cannot be used in the workspace; type a file name")
	}
	if !f.Confined {
		if f.Dir != "" && !filepath.IsAbs(name) {
			name = filepath.Join(f.Dir, name)
		}
		return name, nil
	}
	if !plainScenarioName(name) {
		return "", fmt.Errorf("scenario name %q: letters, digits, . - _ only (no folders)", name)
	}
	if !strings.HasSuffix(name, ".toml") {
		name += ".toml"
	}
	return filepath.Join(f.Dir, name), nil
}

// CanWriteBack reports whether the stocks and spec can be written to the
// files they came from.
func (f Files) CanWriteBack() error {
	switch {
	case f.ReadOnly:
		return ErrReadOnly
	case f.StocksPath == "" && f.SpecPath == "":
		return fmt.Errorf("nothing to write back: no --stocks/--spec files were given (save with s)")
	}
	return nil
}

// plainScenarioName reports a name of 1 to 64 letters, digits, '.', '-' and
// '_', starting with a letter or digit, and without "..".
func plainScenarioName(name string) bool {
	if name == "" || len(name) > 64 || strings.Contains(name, "..") {
		return false
	}
	for i := 0; i < len(name); i++ {
		b := name[i]
		alnum := b >= 'A' && b <= 'Z' || b >= 'a' && b <= 'z' || b >= '0' && b <= '9'
		if !alnum && (i == 0 || (b != '.' && b != '_' && b != '-')) {
			return false
		}
	}
	return true
}
