package serve

import (
	"bufio"
	"io"
	"net"
	"os/exec"
	"strings"
	"testing"
	"time"

	tea "charm.land/bubbletea/v2"
	"github.com/charmbracelet/x/ansi"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// sshProc is the real OpenSSH client running one session.
type sshProc struct {
	cmd   *exec.Cmd
	stdin io.WriteCloser
	out   *lockedBuffer
	done  chan error
}

// startOpenSSH starts a session with the OpenSSH client and waits for the
// workspace to show.
func startOpenSSH(t *testing.T, key, addr string) *sshProc {
	t.Helper()
	cmd := openSSH(key, addr)
	stdin, err := cmd.StdinPipe()
	require.NoError(t, err)
	p := &sshProc{cmd: cmd, stdin: stdin, out: &lockedBuffer{}, done: make(chan error, 1)}
	cmd.Stdout, cmd.Stderr = p.out, p.out
	require.NoError(t, cmd.Start())
	go func() { p.done <- cmd.Wait() }()
	t.Cleanup(func() { _ = cmd.Process.Kill() })
	waitFor(t, p.out, "Cheapest blend", 20*time.Second)
	return p
}

func (p *sshProc) typeKeys(t *testing.T, keys string) {
	t.Helper()
	_, err := io.WriteString(p.stdin, keys)
	require.NoError(t, err)
}

// wait returns the client's exit code once the session has ended.
func (p *sshProc) wait(t *testing.T, within time.Duration) int {
	t.Helper()
	select {
	case err := <-p.done:
		if ee, ok := err.(*exec.ExitError); ok {
			return ee.ExitCode()
		}
		require.NoError(t, err)
		return 0
	case <-time.After(within):
		t.Fatalf("ssh still running after %v; got:\n%s", within, ansi.Strip(p.out.String()))
		return -1
	}
}

// The server announces itself once: "SSH-2.0-lipoplan", not
// "SSH-2.0-SSH-2.0-lipoplan" (RFC 4253 section 4.2), as read off the wire and
// as the OpenSSH client reports it.
func TestVersionStringSingle(t *testing.T) {
	_, line := newKey(t)
	ts := start(t, []string{line}, nil)
	c, err := net.Dial("tcp", ts.addr)
	require.NoError(t, err)
	defer c.Close()
	require.NoError(t, c.SetReadDeadline(time.Now().Add(10*time.Second)))
	banner, err := bufio.NewReader(c).ReadString('\n')
	require.NoError(t, err)
	assert.Equal(t, "SSH-2.0-lipoplan\r\n", banner)

	requireOpenSSH(t)
	key, pub := sshKeygen(t, t.TempDir(), "team")
	ts = start(t, []string{pub}, nil)
	cmd := openSSH(key, ts.addr, "-o", "LogLevel=DEBUG1")
	cmd.Stdin = strings.NewReader("q")
	out, _ := cmd.CombinedOutput()
	assert.Regexp(t, `remote software version lipoplan\r?\n`, string(out))
	assert.NotContains(t, string(out), "SSH-2.0-SSH-2.0")
}

// No SHA-1: a client offering only diffie-hellman-group14-sha1 (or only
// hmac-sha1 with a non-AEAD cipher) is refused before it can log in.
func TestSHA1Refused(t *testing.T) {
	requireOpenSSH(t)
	key, pub := sshKeygen(t, t.TempDir(), "team")
	ts := start(t, []string{pub}, nil)
	for _, tc := range []struct {
		opts []string
		want string
	}{
		{[]string{"-o", "KexAlgorithms=diffie-hellman-group14-sha1"}, "no matching key exchange method found"},
		{[]string{"-o", "KexAlgorithms=diffie-hellman-group-exchange-sha1"}, "no matching key exchange method found"},
		{[]string{"-o", "Ciphers=aes128-ctr", "-o", "MACs=hmac-sha1"}, "no matching MAC found"},
	} {
		cmd := openSSH(key, ts.addr, append([]string{"-o", "LogLevel=INFO"}, tc.opts...)...)
		cmd.Stdin = strings.NewReader("q")
		out, err := cmd.CombinedOutput()
		require.Error(t, err, "%v must be refused: %s", tc.opts, out)
		assert.Contains(t, string(out), tc.want, tc.opts)
		assert.NotContains(t, ansi.Strip(string(out)), "Cheapest blend")
	}
	assert.NotContains(t, ts.log.String(), "session start")
	// the same client with its defaults gets in
	p := startOpenSSH(t, key, ts.addr)
	p.typeKeys(t, "q")
	assert.Equal(t, 0, p.wait(t, 10*time.Second))
}

// An idle TCP connection that never logs in is closed after the
// pre-authentication timeout, and it stops counting as pending.
func TestUnauthenticatedConnectionTimesOut(t *testing.T) {
	_, line := newKey(t)
	ts := start(t, []string{line}, func(c *Config) { c.AuthTimeout = 700 * time.Millisecond })
	c, err := net.Dial("tcp", ts.addr)
	require.NoError(t, err)
	defer c.Close()
	r := bufio.NewReader(c)
	require.NoError(t, c.SetReadDeadline(time.Now().Add(15*time.Second)))
	_, err = r.ReadString('\n') // the server's version line
	require.NoError(t, err)
	assert.Eventually(t, func() bool { return ts.srv.Pending() == 1 }, 5*time.Second, 10*time.Millisecond)
	_, err = io.Copy(io.Discard, r) // until the server closes
	var ne net.Error
	if err != nil && assert.ErrorAs(t, err, &ne) {
		assert.False(t, ne.Timeout(), "the server closed the connection, not our 15 s deadline")
	}
	assert.Eventually(t, func() bool { return ts.srv.Pending() == 0 }, 5*time.Second, 10*time.Millisecond)
}

// At most MaxPending connections may be logging in at once; more are closed
// at once; a logged-in session no longer counts, and once a pending
// connection goes a real client gets in.
func TestPendingConnectionsCapped(t *testing.T) {
	requireOpenSSH(t)
	key, pub := sshKeygen(t, t.TempDir(), "team")
	ts := start(t, []string{pub}, func(c *Config) { c.MaxPending = 2; c.AuthTimeout = time.Minute })
	var idle []net.Conn
	for i := 0; i < 2; i++ {
		c, err := net.Dial("tcp", ts.addr)
		require.NoError(t, err)
		defer c.Close()
		idle = append(idle, c)
	}
	assert.Eventually(t, func() bool { return ts.srv.Pending() == 2 }, 5*time.Second, 10*time.Millisecond)
	third, err := net.Dial("tcp", ts.addr)
	require.NoError(t, err)
	defer third.Close()
	require.NoError(t, third.SetReadDeadline(time.Now().Add(10*time.Second)))
	n, err := third.Read(make([]byte, 64))
	assert.Equal(t, 0, n, "no version line for a connection over the cap")
	assert.ErrorIs(t, err, io.EOF)
	assert.Contains(t, ts.log.String(), "connections are already logging in (--max-pending)")

	require.NoError(t, idle[0].Close())
	assert.Eventually(t, func() bool { return ts.srv.Pending() == 1 }, 5*time.Second, 10*time.Millisecond)
	p := startOpenSSH(t, key, ts.addr)
	assert.Equal(t, 1, ts.srv.Pending(), "the logged-in session is not pending")
	p.typeKeys(t, "q")
	assert.Equal(t, 0, p.wait(t, 10*time.Second))
}

// A user typing a huge price is refused by the workspace (the loaders'
// magnitude check); the session goes on, a second session is untouched and
// the server still takes new ones.
func TestHugePriceLeavesOtherSessionsAlive(t *testing.T) {
	requireOpenSSH(t)
	key, pub := sshKeygen(t, t.TempDir(), "team")
	ts := start(t, []string{pub}, nil)
	a := startOpenSSH(t, key, ts.addr)
	b := startOpenSSH(t, key, ts.addr)
	a.typeKeys(t, "2\r\x151e25\r")
	waitFor(t, a.out, "outside the accepted range", 10*time.Second)
	a.typeKeys(t, "3")
	waitFor(t, a.out, "binds", 10*time.Second)
	b.typeKeys(t, "2")
	waitFor(t, b.out, "on hand", 10*time.Second)
	assert.Equal(t, 2, ts.srv.Active())
	c := startOpenSSH(t, key, ts.addr)
	for _, p := range []*sshProc{a, b, c} {
		p.typeKeys(t, "q")
		assert.Equal(t, 0, p.wait(t, 10*time.Second))
	}
	assert.NotContains(t, ts.log.String(), "session fault")
}

// faultOnBang wraps a workspace and panics when "!" is typed: a stand-in for
// an internal fault in one session.
type faultOnBang struct{ tea.Model }

func (f faultOnBang) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	if k, ok := msg.(tea.KeyPressMsg); ok && k.Text == "!" {
		panic("injected fault")
	}
	next, cmd := f.Model.Update(msg)
	return faultOnBang{next}, cmd
}

// A fault inside one session ends that session with a message and exit
// status 1; the other session and the server go on.
func TestFaultEndsOnlyItsSession(t *testing.T) {
	requireOpenSSH(t)
	key, pub := sshKeygen(t, t.TempDir(), "team")
	ts := start(t, []string{pub}, func(c *Config) {
		c.wrap = func(m tea.Model) tea.Model { return faultOnBang{m} }
	})
	a := startOpenSSH(t, key, ts.addr)
	b := startOpenSSH(t, key, ts.addr)
	a.typeKeys(t, "!")
	assert.Equal(t, 1, a.wait(t, 15*time.Second), "the faulty session ends with exit status 1")
	assert.Contains(t, ansi.Strip(a.out.String()), "lipoplan: internal fault: injected fault")
	assert.Contains(t, ts.log.String(), "session fault")
	b.typeKeys(t, "2")
	waitFor(t, b.out, "on hand", 10*time.Second)
	assert.Eventually(t, func() bool { return ts.srv.Active() == 1 }, 10*time.Second, 20*time.Millisecond)
	c := startOpenSSH(t, key, ts.addr)
	for _, p := range []*sshProc{b, c} {
		p.typeKeys(t, "q")
		assert.Equal(t, 0, p.wait(t, 10*time.Second))
	}
}
