package catalogue

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"testing/iotest"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// refusedWithin runs load in the background and fails the test if it does not
// return: a loader that waits on a FIFO or reads a device forever would hang.
func refusedWithin(t *testing.T, load func() Problems) Problems {
	t.Helper()
	done := make(chan Problems, 1)
	go func() { done <- load() }()
	select {
	case ps := <-done:
		return ps
	case <-time.After(20 * time.Second):
		t.Fatal("the loader did not return: it is waiting on the file")
		return nil
	}
}

// Only regular files are read (README "Files lipoplan reads"): a FIFO with
// no writer, a folder and a device are refused at once, naming the file and
// what it is, for every kind of input file.
func TestLoadersReadRegularFilesOnly(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "spec.toml")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))
	folder := filepath.Join(dir, "stocks.toml")
	require.NoError(t, os.Mkdir(folder, 0o755))
	cases := map[string]string{fifo: "a named pipe (FIFO)", folder: "a folder"}
	if st, err := os.Stat("/dev/zero"); err == nil && st.Mode()&os.ModeDevice != 0 {
		cases["/dev/zero"] = "a device" // opened read-only and never read
	}
	cat := DemoStocks()
	for path, kind := range cases {
		for name, load := range map[string]func() Problems{
			"stocks": func() Problems { _, ps := LoadStocks(path); return ps },
			"spec":   func() Problems { _, ps := LoadSpec(path, cat); return ps },
			"orders": func() Problems { _, ps := LoadOrders(path, cat); return ps },
		} {
			ps := refusedWithin(t, load)
			require.Len(t, ps, 1, "%s %s", name, path)
			assert.Equal(t, path, ps[0].File)
			assert.Contains(t, ps[0].Msg, "it is "+kind+", not a regular file", name)
		}
	}
	// an orders file whose spec is the FIFO: the order names it
	orders := filepath.Join(dir, "orders.toml")
	require.NoError(t, os.WriteFile(orders, []byte("[[order]]\nspec = \"spec.toml\"\ntonnes = 10\n"), 0o600))
	ps := refusedWithin(t, func() Problems { _, ps := LoadOrders(orders, cat); return ps })
	require.NotEmpty(t, ps.Errors())
	assert.Contains(t, ps.Errors()[0].String(), "named pipe (FIFO)")
	assert.Contains(t, ps.Errors()[0].String(), "spec of order #1 in "+orders)
}

// Symlinks are followed: to a regular file it reads, to a FIFO it is refused.
func TestLoadersFollowSymlinks(t *testing.T) {
	dir := t.TempDir()
	real := filepath.Join(dir, "real.toml")
	require.NoError(t, os.WriteFile(real, DemoFiles()["stocks.toml"], 0o600))
	link := filepath.Join(dir, "link.toml")
	require.NoError(t, os.Symlink(real, link))
	cat, ps := LoadStocks(link)
	require.Empty(t, ps.Errors())
	assert.Len(t, cat.Stocks, len(DemoStocks().Stocks))
	fifo := filepath.Join(dir, "pipe")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))
	toFifo := filepath.Join(dir, "pipe.toml")
	require.NoError(t, os.Symlink(fifo, toFifo))
	ps = refusedWithin(t, func() Problems { _, ps := LoadStocks(toFifo); return ps })
	require.Len(t, ps, 1)
	assert.Contains(t, ps[0].Msg, "named pipe")
}

// A file over the size limit is refused from its size, before reading (a
// sparse file: nothing is written to disk).
func TestLoadersRefuseHugeFiles(t *testing.T) {
	path := filepath.Join(t.TempDir(), "stocks.toml")
	f, err := os.Create(path)
	require.NoError(t, err)
	require.NoError(t, f.Truncate(MaxInputBytes+1))
	require.NoError(t, f.Close())
	_, ps := LoadStocks(path)
	require.Len(t, ps, 1)
	assert.Contains(t, ps[0].Msg, "it holds 5 MB, more than the 4 MB lipoplan reads")
	assert.Equal(t, path, ps[0].File)
}

// nested builds a document that nests n levels deep in one of the ways TOML
// allows.
func nested(kind string, n int) string {
	switch kind {
	case "inline":
		return "name = " + strings.Repeat("{ a = ", n) + "1" + strings.Repeat(" }", n) + "\n"
	case "array":
		return "name = " + strings.Repeat("[", n) + strings.Repeat("]", n) + "\n"
	case "dotted":
		return strings.Repeat("a.", n) + "a = 1\n"
	case "header":
		return "[" + strings.Repeat("a.", n) + "a]\nx = 1\n"
	}
	panic(kind)
}

// Absurd nesting (24 kB of inline tables, dotted keys or headers, which the
// decoder handles in time and memory growing with the square of the depth) is
// refused before decoding with the line it starts on; the demo files and the
// deepest layout lipoplan writes pass.
func TestNestingLimit(t *testing.T) {
	for _, kind := range []string{"inline", "array", "dotted", "header"} {
		doc := "# a comment with [[[ and {{{ and a.b.c\n" + nested(kind, 4000)
		err := CheckTOMLDepth([]byte(doc))
		var de *DepthError
		require.ErrorAs(t, err, &de, kind)
		assert.Equal(t, 2, de.Line, kind)
		_, ps := ParseSpec("deep.toml", []byte(doc), nil)
		require.Len(t, ps, 1, kind)
		assert.Equal(t, "line 2", ps[0].Where)
		assert.Contains(t, ps[0].Msg, "nest more than 32 levels deep")
		assert.NoError(t, CheckTOMLDepth([]byte(nested(kind, MaxTOMLDepth-2))), "%s: %d levels are allowed", kind, MaxTOMLDepth-2)
	}
	for name, data := range DemoFiles() {
		d, _ := tomlDepth(data, 1000)
		assert.LessOrEqual(t, d, 3, name)
	}
	// a saved scenario nests the spec one level further down (tui/scenariofile.go)
	d, _ := tomlDepth([]byte("[spec.limits.sfc]\n\"20\" = { min = 38, max = 48 }\n[[stocks.stock]]\n[stocks.stock.fatty_acids]\n\"C16:0\" = 44.0\n"), 1000)
	assert.Equal(t, 4, d)
	// brackets, dots and quotes inside strings and comments do not nest
	for _, doc := range []string{
		`name = "[[[[{{{{a.b.c.d"` + "\n",
		`name = 'C:\x.y.z[[['` + "\n",
		"name = \"\"\"\n[[[[\n\"\" a.b.c {{{\n\"\"\"\nbatch = 1.5 # [[[[ a.b.c\n",
		"name = '''\n[[[[\n'' {{{\n'''\n",
		`"a.b.c.d.e" = 1` + "\n",
		"name = \"esc \\\" [[[[ \\\\\"\n",
	} {
		d, _ := tomlDepth([]byte(doc), 1000)
		assert.LessOrEqual(t, d, 1, "%q", doc)
	}
}

// readAll reads what io.ReadAll (the standard library, the reference) reads,
// whether the size hint is right, short or long, through readers that hand
// over one byte at a time or end with their last bytes, and it passes a
// read error on.
func TestReadAllAsStandardLibrary(t *testing.T) {
	for _, n := range []int{0, 1, 511, 512, 4096, 100_003} {
		src := make([]byte, n)
		for i := range src {
			src[i] = byte(i*7 + n)
		}
		for _, hint := range []int{0, 1, n / 2, n + 1, 2*n + 10} {
			for name, r := range map[string]func() io.Reader{
				"plain":    func() io.Reader { return bytes.NewReader(src) },
				"one byte": func() io.Reader { return iotest.OneByteReader(bytes.NewReader(src)) },
				"data EOF": func() io.Reader { return iotest.DataErrReader(bytes.NewReader(src)) },
			} {
				want, err := io.ReadAll(r())
				require.NoError(t, err)
				got, err := readAll(r(), hint)
				require.NoError(t, err, "%d bytes, hint %d, %s", n, hint, name)
				require.Equal(t, want, got, "%d bytes, hint %d, %s", n, hint, name)
			}
		}
	}
	_, err := readAll(iotest.TimeoutReader(bytes.NewReader(make([]byte, 100))), 10)
	require.ErrorIs(t, err, iotest.ErrTimeout, "the second read fails")
	_, err = readAll(iotest.ErrReader(iotest.ErrTimeout), 10)
	require.ErrorIs(t, err, iotest.ErrTimeout)
}
