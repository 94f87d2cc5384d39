package catalogue

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The rules of Output.Write (README "Files lipoplan writes"), one by one. No
// test here touches a real device: the non-regular target is a FIFO made in
// the test's own folder.

func readString(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return string(b)
}

func TestOutputNewAndReplacedFiles(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "model.mps")
	w, err := Output{Path: p, Perm: 0o640}.Write([]byte("one\n"))
	require.NoError(t, err)
	assert.Equal(t, Written{Path: p}, w)
	st, err := os.Stat(p)
	require.NoError(t, err)
	assert.Equal(t, os.FileMode(0o640), st.Mode().Perm())

	// an existing file is kept as a timestamped .bak beside it, and the
	// replacement keeps the file's mode
	require.NoError(t, os.Chmod(p, 0o600))
	now := time.Date(2026, 3, 4, 5, 6, 7, 8e6, time.UTC)
	w, err = Output{Path: p, Now: now}.Write([]byte("two\n"))
	require.NoError(t, err)
	assert.Equal(t, p+".20260304T050607.008Z.bak", w.Backup)
	assert.Equal(t, "one\n", readString(t, w.Backup))
	assert.Equal(t, "two\n", readString(t, p))
	st, _ = os.Stat(p)
	assert.Equal(t, os.FileMode(0o600), st.Mode().Perm())

	// the same content again: no backup
	w, err = Output{Path: p}.Write([]byte("two\n"))
	require.NoError(t, err)
	assert.Empty(t, w.Backup)
	entries, _ := os.ReadDir(dir)
	assert.Len(t, entries, 2, "the file and one backup, no temporary files")
}

func TestOutputRefusesItsInputs(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "stocks.toml")
	require.NoError(t, os.WriteFile(in, []byte("currency = \"EUR\"\n"), 0o644))
	link := filepath.Join(dir, "link.toml")
	require.NoError(t, os.Symlink(in, link))
	hard := filepath.Join(dir, "hard.toml")
	require.NoError(t, os.Link(in, hard))
	for _, out := range []string{in, link, hard, filepath.Join(dir, ".", "stocks.toml")} {
		for _, inputs := range [][]string{{in}, {"", link}} {
			_, err := Output{Path: out, Inputs: inputs}.Write([]byte("NAME x\n"))
			require.Error(t, err, out)
			assert.True(t, IsBadInput(err))
			assert.Contains(t, err.Error(), "an input of this run", out)
		}
	}
	assert.Equal(t, "currency = \"EUR\"\n", readString(t, in), "the input is untouched")
	entries, _ := os.ReadDir(dir)
	assert.Len(t, entries, 3, "no backup or temporary file either")
}

func TestOutputThroughSymlink(t *testing.T) {
	dir := t.TempDir()
	real := filepath.Join(dir, "sub", "real.svg")
	require.NoError(t, os.Mkdir(filepath.Dir(real), 0o755))
	require.NoError(t, os.WriteFile(real, []byte("old"), 0o644))
	link := filepath.Join(dir, "chart.svg")
	require.NoError(t, os.Symlink(filepath.Join("sub", "real.svg"), link))
	w, err := Output{Path: link}.Write([]byte("new"))
	require.NoError(t, err)
	assert.Equal(t, real, w.Path)
	assert.Equal(t, filepath.Dir(real), filepath.Dir(w.Backup), "the backup sits beside the real file")
	lst, err := os.Lstat(link)
	require.NoError(t, err)
	assert.NotZero(t, lst.Mode()&os.ModeSymlink, "the link is still a link")
	assert.Equal(t, "new", readString(t, real))
	assert.Equal(t, "old", readString(t, w.Backup))

	dangling := filepath.Join(dir, "gone.svg")
	require.NoError(t, os.Symlink(filepath.Join(dir, "nowhere", "x.svg"), dangling))
	_, err = Output{Path: dangling}.Write([]byte("x"))
	require.Error(t, err)
	assert.True(t, IsBadInput(err))
	assert.Contains(t, err.Error(), "is a symlink to")
	lst, err = os.Lstat(dangling)
	require.NoError(t, err)
	assert.NotZero(t, lst.Mode()&os.ModeSymlink, "a dangling link is left as it is")
}

func TestOutputRefusesFolders(t *testing.T) {
	dir := t.TempDir()
	_, err := Output{Path: dir}.Write([]byte("x"))
	require.Error(t, err)
	assert.True(t, IsBadInput(err))
	assert.Contains(t, err.Error(), dir+" is a folder")
	_, err = Output{Path: filepath.Join(dir, "no", "x.mps")}.Write([]byte("x"))
	require.Error(t, err)
	assert.True(t, IsBadInput(err))
	assert.Contains(t, err.Error(), "does not exist")
	entries, _ := os.ReadDir(dir)
	assert.Empty(t, entries)
}

func TestOutputStandardOutput(t *testing.T) {
	var buf bytes.Buffer
	w, err := Output{Path: "-", Stdout: &buf}.Write([]byte("NAME lipoplan\n"))
	require.NoError(t, err)
	assert.Equal(t, "-", w.Path)
	assert.Equal(t, "NAME lipoplan\n", buf.String())
	_, err = Output{Path: "-"}.Write([]byte("x"))
	require.Error(t, err)
	assert.True(t, IsBadInput(err), "where there is no standard output, - is refused")
}

// A named pipe is written into, never renamed over; one nobody reads is
// refused at once instead of blocking.
func TestOutputIntoFIFO(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "pipe")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))

	_, err := Output{Path: fifo}.Write([]byte("x"))
	require.Error(t, err)
	assert.True(t, IsBadInput(err))
	assert.Contains(t, err.Error(), "nobody is reading the named pipe")

	// a reader opened first (without blocking, so no writer is needed yet)
	r, err := os.OpenFile(fifo, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	require.NoError(t, err)
	defer r.Close()
	w, err := Output{Path: fifo}.Write([]byte("ROWS\n"))
	require.NoError(t, err)
	assert.Empty(t, w.Backup)
	got, err := io.ReadAll(r)
	require.NoError(t, err)
	assert.Equal(t, "ROWS\n", string(got))
	st, err := os.Lstat(fifo)
	require.NoError(t, err)
	assert.NotZero(t, st.Mode()&os.ModeNamedPipe, "still a FIFO")
}
