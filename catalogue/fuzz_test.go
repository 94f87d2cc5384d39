package catalogue

import (
	"bytes"
	"testing"

	"github.com/stretchr/testify/require"
)

// FuzzParse feeds arbitrary bytes to ParseStocks and ParseSpec (with and
// without a catalogue). They must never panic and must return either a value
// or at least one error, never both and never neither; whatever parses must
// survive a write and a re-parse unchanged. Seeds: the demo files and the
// bad-input corpus. Run: go test ./catalogue -fuzz FuzzParse -fuzztime 20s
func FuzzParse(f *testing.F) {
	for _, data := range DemoFiles() {
		f.Add(data)
	}
	for _, b := range readBadCorpus(f) {
		f.Add(b.data)
	}
	demo := DemoStocks()
	f.Fuzz(func(t *testing.T, data []byte) {
		cat, ps := ParseStocks("f.toml", data)
		if cat == nil {
			require.NotEmpty(t, ps.Errors(), "no catalogue and no error")
		} else {
			require.Empty(t, ps.Errors(), "a catalogue together with errors")
			var buf bytes.Buffer
			require.NoError(t, WriteStocks(&buf, cat))
			back, ps2 := ParseStocks("f.toml", buf.Bytes())
			require.Empty(t, ps2.Errors(), "written catalogue does not parse:\n%s\n%v", buf.String(), ps2)
			require.Equal(t, cat, back)
		}
		for _, c := range []*Catalogue{nil, demo} {
			s, ps := ParseSpec("f.toml", data, c)
			if s == nil {
				require.NotEmpty(t, ps.Errors(), "no spec and no error")
				continue
			}
			require.Empty(t, ps.Errors(), "a spec together with errors")
			var buf bytes.Buffer
			require.NoError(t, WriteSpec(&buf, s))
			back, ps2 := ParseSpec("f.toml", buf.Bytes(), c)
			require.Empty(t, ps2.Errors(), "written spec does not parse:\n%s\n%v", buf.String(), ps2)
			require.Equal(t, s, back)
		}
	})
}
