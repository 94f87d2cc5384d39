//go:build coin && linux

package coin

import (
	"io"
	"os"
	"syscall"
	"testing"

	"github.com/stretchr/testify/require"
)

// captureFD1 runs f with file descriptor 1 pointed at a pipe and returns
// everything written to it, including what C code printed through stdio.
func captureFD1(t *testing.T, f func()) string {
	t.Helper()
	r, w, err := os.Pipe()
	require.NoError(t, err)
	saved, err := syscall.Dup(1)
	require.NoError(t, err)
	require.NoError(t, syscall.Dup3(int(w.Fd()), 1, 0))
	done := make(chan string)
	go func() {
		b, _ := io.ReadAll(r)
		done <- string(b)
	}()
	f()
	FlushStdout()
	require.NoError(t, syscall.Dup3(saved, 1, 0))
	syscall.Close(saved)
	w.Close()
	out := <-done
	r.Close()
	return out
}

// The solvers are created with log level 0: neither CLP nor CBC may write to
// stdout, which carries the report and JSON.
func TestSolversPrintNothing(t *testing.T) {
	out := captureFD1(t, func() {
		lp := NewLP()
		_ = lp.Load(paperLP())
		lp.Solve()
		lp.Close()
		mp := NewMIP()
		p := paperLP()
		p.Integer = []int{0, 1}
		_ = mp.Load(p)
		mp.Solve()
		mp.Close()
	})
	require.Empty(t, out)
}
