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
