package catalogue

import (
	"fmt"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// One file reports at most maxProblems problems one by one and counts the
// rest, so a file of many thousands of bad keys costs no more than a few.
func TestProblemsAreCapped(t *testing.T) {
	var b strings.Builder
	b.WriteString("name = \"x\"\nbatch = 1.0\n")
	for i := 0; i < 5000; i++ {
		fmt.Fprintf(&b, "colour%d = 1\n", i)
	}
	s, ps := ParseSpec("many.toml", []byte(b.String()), nil)
	assert.Nil(t, s)
	require.Len(t, ps, maxProblems+1)
	last := ps[len(ps)-1]
	assert.False(t, last.Warning)
	assert.Equal(t, "many.toml", last.File)
	assert.Equal(t, fmt.Sprintf("and %d more problems not listed; fix those above and run check again", 5000-maxProblems), last.Msg)
}

// A TOML syntax error names the line to fix, counted from the error's byte
// offset (the decoder counts a line once it has read its newline, so a
// table name left open was reported on the line after), and the line
// before when a bracket was left open there; the hint is about that error
// only (the quoting advice comes only for a bare fatty-acid key). The
// expected lines are counted by hand in each document.
func TestSyntaxErrorLineAndHint(t *testing.T) {
	for _, tc := range []struct {
		name, doc, where, hint string
	}{
		{"table name left open, blank line and comment after", "name = \"x\"\n\n# the limits\n[limits\n\niv = { min = 3 }\n", "line 4", "close the table name with ]"},
		{"array left open", "name = \"x\"\nbatch = [20.0\n\n# next\nx = 1\n", "line 2", "close the array with ]"},
		{"inline table left open", "name = \"x\"\n[limits]\niv = { min = 3\nsafa = { max = 50 }\n", "line 3", "closed with } on the same line"},
		{"value missing", "name = \"x\"\nbatch =\n", "line 2", "the value after = is missing"},
		{"bare text", "name = Test fat\n", "line 1", "text needs double quotes"},
		{"text left open", "name = \"Test fat\nbatch = 1.0\n", "line 1", `close the text with " on the same line`},
		{"bare fatty-acid key", "name = \"x\"\n[limits]\nC18:2 = { min = 1 }\n", "line 3", `"C18:1" = 20.0`},
		{"key given twice", "name = \"x\"\nbatch = 1.0\nbatch = 2.0\n", "line 3", "each key and table may be given once"},
		{"two values on a line", "name = \"x\"\nbatch = 1.0 2.0\n", "line 2", "one key = value per line"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, ps := ParseSpec("s.toml", []byte(tc.doc), nil)
			require.Len(t, ps, 1, "%v", ps)
			assert.Equal(t, tc.where, ps[0].Where, ps[0].Msg)
			assert.Contains(t, ps[0].Msg, "TOML syntax error")
			assert.Contains(t, ps[0].Msg, tc.hint)
			if !strings.Contains(tc.doc, "C18:2 =") {
				assert.NotContains(t, ps[0].Msg, "C18:1", "quoting advice only for a bare fatty-acid key")
			}
		})
	}
}
