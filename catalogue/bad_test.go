package catalogue

import (
	"bufio"
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"
)

// badFile is one file of the bad-input corpus in testdata/bad. Its first two
// lines say what it must produce:
//
//	# expect: <fragment of an error message>
//	# kind: stocks|spec|orders|calibration
type badFile struct {
	path, expect, kind string
	data               []byte
}

func readBadCorpus(t testing.TB) []badFile {
	paths, err := filepath.Glob(filepath.Join("..", "testdata", "bad", "*.toml"))
	require.NoError(t, err)
	var out []badFile
	for _, p := range paths {
		data, err := os.ReadFile(p)
		require.NoError(t, err)
		b := badFile{path: p, data: data}
		lines := bufio.NewScanner(bytes.NewReader(data))
		for i := 0; i < 2 && lines.Scan(); i++ {
			line := lines.Text()
			if v, ok := strings.CutPrefix(line, "# expect: "); ok {
				b.expect = v
			}
			if v, ok := strings.CutPrefix(line, "# kind: "); ok {
				b.kind = v
			}
		}
		require.NotEmpty(t, b.expect, "%s: first line must be # expect: <fragment>", p)
		require.Contains(t, []string{"stocks", "spec", "orders", "calibration"}, b.kind, "%s: second line must be # kind: stocks|spec|orders|calibration", p)
		out = append(out, b)
	}
	return out
}

// Every file of the bad corpus is refused (nil value, at least one error)
// without a panic, and one error message contains the expected fragment.
// Spec and orders files are checked against the demo catalogue.
func TestBadCorpus(t *testing.T) {
	files := readBadCorpus(t)
	require.GreaterOrEqual(t, len(files), 40)
	cat := DemoStocks()
	for _, b := range files {
		t.Run(filepath.Base(b.path), func(t *testing.T) {
			var ps Problems
			var isNil bool
			require.NotPanics(t, func() {
				switch b.kind {
				case "stocks":
					c, p := ParseStocks(filepath.Base(b.path), b.data)
					ps, isNil = p, c == nil
				case "spec":
					s, p := ParseSpec(filepath.Base(b.path), b.data, cat)
					ps, isNil = p, s == nil
				case "orders":
					o, p := LoadOrders(b.path, cat)
					ps, isNil = p, o == nil
				case "calibration":
					c, p := ParseCalibration(filepath.Base(b.path), b.data)
					ps, isNil = p, c == nil
				}
			})
			require.True(t, isNil, "a bad file must not give a value")
			require.NotEmpty(t, ps.Errors(), "a bad file must give an error")
			var texts []string
			for _, p := range ps.Errors() {
				texts = append(texts, p.String())
			}
			joined := strings.Join(texts, "\n")
			found := false
			for _, s := range texts {
				if strings.Contains(s, b.expect) {
					found = true
				}
			}
			require.True(t, found, "want an error containing %q, got:\n%s", b.expect, joined)
			for _, p := range ps {
				require.NotEmpty(t, p.File, "every problem names its file: %s", p)
			}
		})
	}
}
