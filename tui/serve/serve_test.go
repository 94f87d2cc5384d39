package serve

import (
	"bytes"
	"crypto/ed25519"
	"crypto/rand"
	"fmt"
	"io"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	tea "charm.land/bubbletea/v2"
	"github.com/charmbracelet/x/ansi"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	gossh "golang.org/x/crypto/ssh"

	"lipoplan/catalogue"
	"lipoplan/tui"
)

// lockedBuffer collects output written from several goroutines.
type lockedBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

// waitFor polls the plain text of buf until it contains want.
func waitFor(t *testing.T, buf *lockedBuffer, want string, within time.Duration) {
	t.Helper()
	deadline := time.Now().Add(within)
	for time.Now().Before(deadline) {
		if strings.Contains(ansi.Strip(buf.String()), want) {
			return
		}
		time.Sleep(20 * time.Millisecond)
	}
	t.Fatalf("no %q within %v; got:\n%s", want, within, ansi.Strip(buf.String()))
}

type testServer struct {
	srv     *Server
	addr    string
	dir     string
	log     *lockedBuffer
	hostKey string
}

// start runs a server on a free loopback port with the given authorized key
// lines; edit changes the config before it starts.
func start(t *testing.T, authorized []string, edit func(*Config)) *testServer {
	t.Helper()
	dir := t.TempDir()
	auth := filepath.Join(dir, "authorized_keys")
	require.NoError(t, os.WriteFile(auth, []byte("# team keys\n"+strings.Join(authorized, "\n")+"\n"), 0o600))
	spec, ok := catalogue.DemoSpec("laminating")
	require.True(t, ok)
	logs := &lockedBuffer{}
	scen := filepath.Join(dir, "scenarios")
	require.NoError(t, os.Mkdir(scen, 0o755))
	cfg := Config{
		Listen:         "127.0.0.1:0",
		AuthorizedKeys: auth,
		HostKey:        filepath.Join(dir, "host_ed25519"),
		Scenario:       tui.NewScenario(catalogue.DemoStocks(), spec),
		Source:         "demo data",
		Files:          tui.Files{Dir: scen},
		MaxSessions:    4,
		Log:            logs,
	}
	if edit != nil {
		edit(&cfg)
	}
	srv, err := New(cfg)
	require.NoError(t, err)
	l, err := net.Listen("tcp", "127.0.0.1:0")
	require.NoError(t, err)
	go func() { _ = srv.Serve(l) }()
	t.Cleanup(func() { _ = srv.Close() })
	return &testServer{srv: srv, addr: l.Addr().String(), dir: scen, log: logs, hostKey: cfg.HostKey}
}

func newKey(t *testing.T) (gossh.Signer, string) {
	t.Helper()
	_, priv, err := ed25519.GenerateKey(rand.Reader)
	require.NoError(t, err)
	s, err := gossh.NewSignerFromKey(priv)
	require.NoError(t, err)
	return s, strings.TrimSpace(string(gossh.MarshalAuthorizedKey(s.PublicKey())))
}

// session is one in-process SSH client session with a terminal.
type session struct {
	client *gossh.Client
	sess   *gossh.Session
	in     io.WriteCloser
	out    *lockedBuffer
}

func dial(t *testing.T, addr string, key gossh.Signer) (*session, error) {
	cfg := &gossh.ClientConfig{
		User:            "formulator",
		Auth:            []gossh.AuthMethod{gossh.PublicKeys(key)},
		HostKeyCallback: gossh.InsecureIgnoreHostKey(), // a test server with a fresh host key
		Timeout:         10 * time.Second,
	}
	c, err := gossh.Dial("tcp", addr, cfg)
	if err != nil {
		return nil, err
	}
	s, err := c.NewSession()
	if err != nil {
		c.Close()
		return nil, err
	}
	out := &lockedBuffer{}
	s.Stdout, s.Stderr = out, out
	in, err := s.StdinPipe()
	if err != nil {
		c.Close()
		return nil, err
	}
	if err := s.RequestPty("xterm-256color", 24, 80, gossh.TerminalModes{}); err != nil {
		c.Close()
		return nil, err
	}
	if err := s.Shell(); err != nil {
		c.Close()
		return nil, err
	}
	return &session{client: c, sess: s, in: in, out: out}, nil
}

func (s *session) close() { _ = s.client.Close() }

// waitEnd waits for the remote end to close the session.
func (s *session) waitEnd(t *testing.T, within time.Duration) {
	t.Helper()
	done := make(chan struct{})
	go func() { _ = s.sess.Wait(); close(done) }()
	select {
	case <-done:
	case <-time.After(within):
		t.Fatalf("session still open after %v", within)
	}
}

func TestHostKeyCreatedOnceAndReused(t *testing.T) {
	path := filepath.Join(t.TempDir(), "host")
	first, err := HostKey(path)
	require.NoError(t, err)
	st, err := os.Stat(path)
	require.NoError(t, err)
	assert.Equal(t, os.FileMode(0o600), st.Mode().Perm(), "a new host key is private to its owner")
	again, err := HostKey(path)
	require.NoError(t, err)
	assert.Equal(t, first, again, "an existing host key is reused, not replaced")
	_, err = gossh.ParsePrivateKey(first)
	require.NoError(t, err)
	require.NoError(t, os.Chmod(path, 0o644))
	_, err = HostKey(path)
	require.Error(t, err)
	assert.True(t, catalogue.IsBadInput(err))
	assert.Contains(t, err.Error(), "chmod 600")
}

func TestAuthorizedKeysFile(t *testing.T) {
	dir := t.TempDir()
	_, line := newKey(t)
	good := filepath.Join(dir, "good")
	require.NoError(t, os.WriteFile(good, []byte("# comment\n\n"+line+" someone@example\n"), 0o600))
	keys, err := LoadAuthorizedKeys(good)
	require.NoError(t, err)
	assert.Len(t, keys, 1)
	bad := filepath.Join(dir, "bad")
	require.NoError(t, os.WriteFile(bad, []byte(line+"\nssh-ed25519 not-base64!\n"), 0o600))
	_, err = LoadAuthorizedKeys(bad)
	require.Error(t, err)
	assert.True(t, catalogue.IsBadInput(err))
	assert.Contains(t, err.Error(), "line 2")
	empty := filepath.Join(dir, "empty")
	require.NoError(t, os.WriteFile(empty, []byte("# nobody yet\n"), 0o600))
	_, err = LoadAuthorizedKeys(empty)
	assert.ErrorContains(t, err, "no public key")
	_, err = LoadAuthorizedKeys(filepath.Join(dir, "missing"))
	assert.ErrorContains(t, err, "cannot read")
}

// sshKeygen makes an ed25519 key pair with OpenSSH's ssh-keygen.
func sshKeygen(t *testing.T, dir, name string) (keyPath, pubLine string) {
	t.Helper()
	keyPath = filepath.Join(dir, name)
	out, err := exec.Command("ssh-keygen", "-q", "-t", "ed25519", "-N", "", "-C", name, "-f", keyPath).CombinedOutput()
	require.NoError(t, err, "ssh-keygen: %s", out)
	pub, err := os.ReadFile(keyPath + ".pub")
	require.NoError(t, err)
	return keyPath, strings.TrimSpace(string(pub))
}

// openSSH runs the real OpenSSH client with its own empty config and
// known_hosts beside the key: never /dev/null, which ssh may replace by
// renaming a rewritten known_hosts over it when run as root.
// Extra options (e.g. "-o", "KexAlgorithms=...") come first, so they win
// over these (ssh takes the first value of each option).
func openSSH(key, addr string, extra ...string) *exec.Cmd {
	host, port, _ := net.SplitHostPort(addr)
	dir := filepath.Dir(key)
	config := filepath.Join(dir, "ssh_config")
	if _, err := os.Stat(config); err != nil {
		_ = os.WriteFile(config, nil, 0o600)
	}
	args := append([]string{"-F", config, "-tt"}, extra...)
	args = append(args,
		"-o", "StrictHostKeyChecking=no", "-o", "UserKnownHostsFile="+filepath.Join(dir, "known_hosts"),
		"-o", "GlobalKnownHostsFile="+filepath.Join(dir, "global_known_hosts"), "-o", "UpdateHostKeys=no",
		"-o", "BatchMode=yes", "-o", "IdentitiesOnly=yes", "-o", "IdentityAgent=none",
		"-o", "PasswordAuthentication=no", "-o", "LogLevel=ERROR",
		"-i", key, "-p", port, "formulator@"+host)
	cmd := exec.Command("/usr/bin/ssh", args...)
	cmd.Env = append(os.Environ(), "TERM=xterm-256color")
	return cmd
}

func requireOpenSSH(t *testing.T) {
	t.Helper()
	if _, err := os.Stat("/usr/bin/ssh"); err != nil {
		t.Skip("skipped: /usr/bin/ssh (the OpenSSH client) is not installed on this machine")
	}
	if _, err := exec.LookPath("ssh-keygen"); err != nil {
		t.Skip("skipped: ssh-keygen (OpenSSH) is not installed on this machine")
	}
}

func TestOpenSSHClientGetsTheWorkspace(t *testing.T) {
	requireOpenSSH(t)
	keyDir := t.TempDir()
	key, pub := sshKeygen(t, keyDir, "team")
	ts := start(t, []string{pub}, nil)

	cmd := openSSH(key, ts.addr)
	stdin, err := cmd.StdinPipe()
	require.NoError(t, err)
	out := &lockedBuffer{}
	cmd.Stdout, cmd.Stderr = out, out
	require.NoError(t, cmd.Start())
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	t.Cleanup(func() { _ = cmd.Process.Kill() })

	waitFor(t, out, "Cheapest blend", 20*time.Second)
	waitFor(t, out, "EUR/t", 5*time.Second)
	_, err = io.WriteString(stdin, "2")
	require.NoError(t, err)
	waitFor(t, out, "on hand", 5*time.Second)
	_, err = io.WriteString(stdin, "s")
	require.NoError(t, err)
	waitFor(t, out, "read-only", 5*time.Second)
	_, err = io.WriteString(stdin, "q")
	require.NoError(t, err)
	select {
	case err := <-done:
		require.NoError(t, err, "ssh ends cleanly after q: %s", ansi.Strip(out.String()))
	case <-time.After(10 * time.Second):
		t.Fatal("ssh did not end after q")
	}

	pk, _, _, _, err := gossh.ParseAuthorizedKey([]byte(pub))
	require.NoError(t, err)
	logs := ts.log.String()
	assert.Contains(t, logs, "session start key="+gossh.FingerprintSHA256(pk))
	assert.Contains(t, logs, "session end key="+gossh.FingerprintSHA256(pk))
	entries, err := os.ReadDir(ts.dir)
	require.NoError(t, err)
	assert.Empty(t, entries, "a read-only server writes nothing")
}

func TestOpenSSHUnknownKeyRefused(t *testing.T) {
	requireOpenSSH(t)
	keyDir := t.TempDir()
	_, pub := sshKeygen(t, keyDir, "team")
	stranger, strangerPub := sshKeygen(t, keyDir, "stranger")
	ts := start(t, []string{pub}, nil)

	cmd := openSSH(stranger, ts.addr)
	cmd.Stdin = strings.NewReader("q")
	out, err := cmd.CombinedOutput()
	require.Error(t, err, "an unknown key must not get in: %s", out)
	var ee *exec.ExitError
	require.ErrorAs(t, err, &ee)
	assert.Equal(t, 255, ee.ExitCode(), "OpenSSH reports an authentication failure as 255")
	assert.Contains(t, string(out), "Permission denied")
	assert.NotContains(t, ansi.Strip(string(out)), "Cheapest blend")
	pk, _, _, _, err := gossh.ParseAuthorizedKey([]byte(strangerPub))
	require.NoError(t, err)
	assert.Contains(t, ts.log.String(), "refused key "+gossh.FingerprintSHA256(pk))
	assert.NotContains(t, ts.log.String(), "session start")
}

func TestHostKeyStableAcrossRestarts(t *testing.T) {
	key, line := newKey(t)
	var seen []string
	hostKey := filepath.Join(t.TempDir(), "host")
	for i := 0; i < 2; i++ {
		ts := start(t, []string{line}, func(c *Config) { c.HostKey = hostKey })
		var got gossh.PublicKey
		c, err := gossh.Dial("tcp", ts.addr, &gossh.ClientConfig{
			User: "formulator", Auth: []gossh.AuthMethod{gossh.PublicKeys(key)},
			HostKeyCallback: func(_ string, _ net.Addr, k gossh.PublicKey) error { got = k; return nil },
		})
		require.NoError(t, err)
		c.Close()
		seen = append(seen, gossh.FingerprintSHA256(got))
		_ = ts.srv.Close()
	}
	assert.Equal(t, seen[0], seen[1], "the server keeps its host key across restarts")
}

func TestTwentyConcurrentSessions(t *testing.T) {
	const n = 20
	key, line := newKey(t)
	ts := start(t, []string{line}, func(c *Config) { c.MaxSessions = n })
	sessions := make([]*session, n)
	var wg sync.WaitGroup
	errs := make(chan error, n)
	for i := 0; i < n; i++ {
		wg.Add(1)
		go func(i int) {
			defer wg.Done()
			s, err := dial(t, ts.addr, key)
			if err != nil {
				errs <- fmt.Errorf("session %d: %w", i, err)
				return
			}
			sessions[i] = s
		}(i)
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		require.NoError(t, err)
	}
	for _, s := range sessions {
		defer s.close()
		waitFor(t, s.out, "Cheapest blend", 60*time.Second)
	}
	assert.Equal(t, n, ts.srv.Active())

	// each session has its own workspace: an edit in one is not seen in another
	_, err := io.WriteString(sessions[0].in, "2]")
	require.NoError(t, err)
	waitFor(t, sessions[0].out, "price of rapeseed 1160", 10*time.Second)
	_, err = io.WriteString(sessions[1].in, "2")
	require.NoError(t, err)
	waitFor(t, sessions[1].out, "on hand", 10*time.Second)
	assert.NotContains(t, ansi.Strip(sessions[1].out.String()), "price of rapeseed")

	// one more is refused while all twenty are open
	extra, err := dial(t, ts.addr, key)
	require.NoError(t, err)
	defer extra.close()
	waitFor(t, extra.out, "server is full", 10*time.Second)
	extra.waitEnd(t, 10*time.Second)

	for i, s := range sessions {
		keys := "q"
		if i == 0 {
			keys = "qq" // the edited session asks once before quitting
		}
		_, err := io.WriteString(s.in, keys)
		require.NoError(t, err)
	}
	for _, s := range sessions {
		s.waitEnd(t, 20*time.Second)
	}
	assert.Eventually(t, func() bool { return ts.srv.Active() == 0 }, 10*time.Second, 20*time.Millisecond)
	// the refused extra session is logged with its start and end too
	assert.Equal(t, n+1, strings.Count(ts.log.String(), "session end"), "each session's end is logged")
}

func TestIdleSessionDropped(t *testing.T) {
	key, line := newKey(t)
	ts := start(t, []string{line}, func(c *Config) { c.IdleTimeout = 700 * time.Millisecond })
	s, err := dial(t, ts.addr, key)
	require.NoError(t, err)
	defer s.close()
	waitFor(t, s.out, "Cheapest blend", 20*time.Second)
	s.waitEnd(t, 15*time.Second)
	assert.Eventually(t, func() bool { return strings.Contains(ts.log.String(), "session end") }, 10*time.Second, 20*time.Millisecond)
}

func TestWritableServerSavesByName(t *testing.T) {
	key, line := newKey(t)
	ts := start(t, []string{line}, func(c *Config) { c.Writable = true })
	s, err := dial(t, ts.addr, key)
	require.NoError(t, err)
	defer s.close()
	waitFor(t, s.out, "Cheapest blend", 20*time.Second)
	_, err = io.WriteString(s.in, "s\x15../escape\r")
	require.NoError(t, err)
	waitFor(t, s.out, "no folders", 10*time.Second)
	_, err = io.WriteString(s.in, "s\x15team-plan\r")
	require.NoError(t, err)
	waitFor(t, s.out, "Saved the scenario and its result to team-plan.toml", 10*time.Second)
	sc, err := tui.LoadScenario(filepath.Join(ts.dir, "team-plan.toml"))
	require.NoError(t, err)
	assert.Equal(t, "Laminating fat for puff pastry, trans-free", sc.Spec.Name)
	require.NotNil(t, sc.Saved, "the session's result is saved with the scenario")
	assert.True(t, sc.Saved.HasBlend())
	_, err = os.Stat(filepath.Join(filepath.Dir(ts.dir), "escape.toml"))
	assert.True(t, os.IsNotExist(err), "nothing is written outside the scenario folder")
	_, err = io.WriteString(s.in, "W")
	require.NoError(t, err)
	waitFor(t, s.out, "nothing to write back", 10*time.Second)
}

// A writable server's session writes the stocks back after asking, and
// names the files and the backup inside the served folder only.
func TestWritableServerWritesBack(t *testing.T) {
	key, line := newKey(t)
	demo := catalogue.DemoFiles()
	var stocks string
	ts := start(t, []string{line}, func(c *Config) {
		c.Writable = true
		stocks = filepath.Join(c.Files.Dir, "stocks.toml")
		spec := filepath.Join(c.Files.Dir, "spec.toml")
		require.NoError(t, os.WriteFile(stocks, demo["stocks.toml"], 0o644))
		require.NoError(t, os.WriteFile(spec, demo["laminating.toml"], 0o644))
		c.Files.StocksPath, c.Files.SpecPath = stocks, spec
	})
	s, err := dial(t, ts.addr, key)
	require.NoError(t, err)
	defer s.close()
	waitFor(t, s.out, "Cheapest blend", 20*time.Second)
	_, err = io.WriteString(s.in, "2]W")
	require.NoError(t, err)
	waitFor(t, s.out, "Write back to the files the session started from?", 10*time.Second)
	waitFor(t, s.out, "Write stocks.toml: 1 price?", 10*time.Second)
	assert.Equal(t, demo["stocks.toml"], mustRead(t, stocks), "nothing is written before y")
	_, err = io.WriteString(s.in, "y")
	require.NoError(t, err)
	waitFor(t, s.out, "Old files kept as stocks.toml.", 10*time.Second)
	baks, err := filepath.Glob(stocks + ".*.bak")
	require.NoError(t, err)
	require.Len(t, baks, 1)
	waitFor(t, s.out, filepath.Base(baks[0]), 10*time.Second)
	assert.Equal(t, demo["stocks.toml"], mustRead(t, baks[0]))
	assert.NotContains(t, ansi.Strip(s.out.String()), ts.dir, "the server's folder is never shown")
	cat, ps := catalogue.LoadStocks(stocks)
	require.Empty(t, ps.Errors())
	assert.Equal(t, 1160.0, cat.Stocks[0].Price, "the first stock's price, raised by 10")
}

func mustRead(t *testing.T, path string) []byte {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	return b
}

// TestUnknownWindowSizeKeepsTheScreen: a client without a local terminal
// (OpenSSH -tt with stdin a pipe) reports a 0x0 window in its pty-req and in
// any window-change. The wish middleware forwards that size to the program
// from its own goroutine; bubbletea's renderer, resized to 0x0, clears the
// screen and draws nothing from then on. Here the 0x0 comes after the first
// screen, so the order is fixed: a key pressed afterwards must still draw.
func TestUnknownWindowSizeKeepsTheScreen(t *testing.T) {
	key, line := newKey(t)
	ts := start(t, []string{line}, nil)
	s, err := dial(t, ts.addr, key)
	require.NoError(t, err)
	defer s.close()
	waitFor(t, s.out, "Cheapest blend", 20*time.Second)
	require.NoError(t, s.sess.WindowChange(0, 0))
	// Give the server time to pass the size on; a server that keeps its size
	// passes however long this is, one that shrinks to 0x0 fails once it has.
	time.Sleep(300 * time.Millisecond)
	mark := len(s.out.String())
	_, err = io.WriteString(s.in, "2")
	require.NoError(t, err)
	deadline := time.Now().Add(10 * time.Second)
	for !strings.Contains(ansi.Strip(s.out.String()[mark:]), "range / comes in") {
		if time.Now().After(deadline) {
			t.Fatalf("after a 0x0 window-change the Stocks panel was not drawn; got since:\n%q", s.out.String()[mark:])
		}
		time.Sleep(20 * time.Millisecond)
	}
}

func TestKeepKnownSizeFilter(t *testing.T) {
	assert.Nil(t, keepKnownSize(nil, tea.WindowSizeMsg{Width: 0, Height: 0}), "0x0 means the client has no terminal: keep the size")
	assert.Nil(t, keepKnownSize(nil, tea.WindowSizeMsg{Width: 80, Height: 0}))
	assert.Nil(t, keepKnownSize(nil, tea.WindowSizeMsg{Width: 0, Height: 24}))
	assert.Equal(t, tea.WindowSizeMsg{Width: 100, Height: 30}, keepKnownSize(nil, tea.WindowSizeMsg{Width: 100, Height: 30}))
	assert.Equal(t, tea.ResumeMsg{}, keepKnownSize(nil, tea.SuspendMsg{}), "a remote session is never suspended (as wish's own filter)")
	assert.Equal(t, tea.QuitMsg{}, keepKnownSize(nil, tea.QuitMsg{}))
}

// TestOpenSSHClientRepeatedly opens twenty sessions one after another with the
// real OpenSSH client, stdin a pipe: every one must show the workspace. Each
// normally takes a fraction of a second; the whole loop is bounded.
func TestOpenSSHClientRepeatedly(t *testing.T) {
	requireOpenSSH(t)
	keyDir := t.TempDir()
	key, pub := sshKeygen(t, keyDir, "team")
	ts := start(t, []string{pub}, nil)
	deadline := time.Now().Add(60 * time.Second)
	for i := 0; i < 20; i++ {
		require.True(t, time.Now().Before(deadline), "twenty sessions took over 60s; %d done", i)
		cmd := openSSH(key, ts.addr)
		stdin, err := cmd.StdinPipe()
		require.NoError(t, err)
		out := &lockedBuffer{}
		cmd.Stdout, cmd.Stderr = out, out
		require.NoError(t, cmd.Start())
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		ok := assert.Eventually(t, func() bool {
			return strings.Contains(ansi.Strip(out.String()), "Cheapest blend")
		}, 10*time.Second, 10*time.Millisecond, "session %d shows no workspace; got:\n%s", i, ansi.Strip(out.String()))
		if !ok {
			_ = cmd.Process.Kill()
			<-done
			t.FailNow()
		}
		_, err = io.WriteString(stdin, "q")
		require.NoError(t, err)
		select {
		case err := <-done:
			require.NoError(t, err, "session %d: ssh ends cleanly after q", i)
		case <-time.After(10 * time.Second):
			_ = cmd.Process.Kill()
			t.Fatalf("session %d: ssh did not end after q", i)
		}
	}
}
