package tui

import (
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestPlainScenarioName checks the hand-written name check against the
// pattern it replaces, ^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$ without "..", on
// names at and around every rule.
func TestPlainScenarioName(t *testing.T) {
	pattern := regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$`)
	names := []string{"", "a", "Z9", "laminating-2", "x.toml", "_a", ".a", "-a", "a..b", "a b", "a/b", `a\b`,
		"é", "aé", strings.Repeat("a", 64), strings.Repeat("a", 65), "a_b.c-d", "a\n", "a\x00", ".."}
	for _, n := range names {
		want := pattern.MatchString(n) && !strings.Contains(n, "..")
		require.Equal(t, want, plainScenarioName(n), "%q", n)
	}
}
