// Package serve offers the lipoplan workspace to a team over SSH (charm wish).
// Each SSH session gets its own workspace on a private copy of the scenario.
// Only public-key authentication against an authorized_keys file is accepted;
// the host key is created once (mode 0600) and reused; a connection must log
// in within a time limit and only so many may be logging in at once; sessions
// are bounded in number and dropped when idle; a fault in one session ends
// that session alone; nothing is written to disk unless the server was
// started writable. No SHA-1 key exchange, MAC or signature is offered. Every
// session's key fingerprint (SHA256) and times are logged.
package serve

import (
	"bufio"
	"bytes"
	"context"
	"crypto/ed25519"
	"crypto/rand"
	"crypto/subtle"
	"encoding/pem"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"log"
	"net"
	"os"
	"strings"
	"sync"
	"time"

	tea "charm.land/bubbletea/v2"
	"charm.land/ssh"
	"charm.land/wish/v2"
	"charm.land/wish/v2/activeterm"
	"charm.land/wish/v2/bubbletea"
	gossh "golang.org/x/crypto/ssh"

	"lipoplan/catalogue"
	"lipoplan/tui"
)

// Config describes one server.
type Config struct {
	Listen         string // address to listen on, e.g. "127.0.0.1:2222"
	AuthorizedKeys string // authorized_keys file: the only keys let in
	HostKey        string // private host key; created (ed25519, 0600) when absent

	Scenario *tui.Scenario // the shared starting point; each session works on a copy
	Source   string        // where the scenario came from, for the header

	// Files is the template of each session's file access. Serve forces it
	// confined to its Dir and read-only unless Writable.
	Files    tui.Files
	Writable bool

	MaxSessions int           // at most this many sessions at once (0 = 16)
	IdleTimeout time.Duration // drop a connection with no traffic this long (0 = never)

	// AuthTimeout closes a connection that has not logged in this long after
	// it opened (0 = DefaultAuthTimeout); MaxPending bounds the connections
	// not yet logged in, closing any beyond it at once (0 = DefaultMaxPending).
	AuthTimeout time.Duration
	MaxPending  int

	Log io.Writer // session log; os.Stderr when nil

	// wrap, when set (by tests), wraps each session's workspace model.
	wrap func(tea.Model) tea.Model
}

// Defaults of Config.
const (
	DefaultMaxSessions = 16
	DefaultAuthTimeout = 15 * time.Second
	DefaultMaxPending  = 20
)

// Server is a running or ready SSH workspace server.
type Server struct {
	cfg  Config
	keys []gossh.PublicKey
	srv  *ssh.Server
	log  *log.Logger

	mu      sync.Mutex
	active  int                        // sessions open
	pending int                        // connections not yet logged in
	guards  map[ssh.Session]*tui.Guard // each running session's workspace
}

// New checks the configuration, reads the authorized keys, creates or reads
// the host key and prepares the server. Problems with the files are
// catalogue.BadInput errors naming the file.
func New(cfg Config) (*Server, error) {
	if cfg.Scenario == nil {
		return nil, errors.New("serve: no scenario to serve")
	}
	if cfg.AuthorizedKeys == "" {
		return nil, catalogue.Badf("serve: --authorized-keys is required: the file of public keys allowed in (one per line, as in ~/.ssh/authorized_keys)")
	}
	if cfg.HostKey == "" {
		return nil, catalogue.Badf("serve: --host-key is required: the server's private key file (created when absent)")
	}
	if cfg.MaxSessions <= 0 {
		cfg.MaxSessions = DefaultMaxSessions
	}
	if cfg.IdleTimeout < 0 {
		return nil, catalogue.Badf("serve: --idle-timeout %v is negative; give a duration such as 15m, or 0 for none", cfg.IdleTimeout)
	}
	switch {
	case cfg.AuthTimeout < 0:
		return nil, catalogue.Badf("serve: --auth-timeout %v is negative; give a duration such as 15s", cfg.AuthTimeout)
	case cfg.AuthTimeout == 0:
		cfg.AuthTimeout = DefaultAuthTimeout
	}
	switch {
	case cfg.MaxPending < 0:
		return nil, catalogue.Badf("serve: --max-pending %d is negative; allow at least one connection to log in", cfg.MaxPending)
	case cfg.MaxPending == 0:
		cfg.MaxPending = DefaultMaxPending
	}
	if cfg.Log == nil {
		cfg.Log = os.Stderr
	}
	cfg.Files.Confined = true
	cfg.Files.ReadOnly = !cfg.Writable
	if !cfg.Writable {
		cfg.Files.StocksPath, cfg.Files.SpecPath = "", ""
	}
	keys, err := LoadAuthorizedKeys(cfg.AuthorizedKeys)
	if err != nil {
		return nil, err
	}
	hostPEM, err := HostKey(cfg.HostKey)
	if err != nil {
		return nil, err
	}
	s := &Server{cfg: cfg, keys: keys, log: log.New(cfg.Log, "lipoplan serve: ", log.LstdFlags), guards: map[ssh.Session]*tui.Guard{}}
	srv, err := wish.NewServer(
		wish.WithAddress(cfg.Listen),
		wish.WithHostKeyPEM(hostPEM),
		wish.WithPublicKeyAuth(s.allowed),
		wish.WithIdleTimeout(cfg.IdleTimeout),
		// the library writes "SSH-2.0-" before it (RFC 4253 section 4.2)
		wish.WithVersion("lipoplan"),
		s.preAuth,
		// run last to first: logged, recovered, bounded, activeterm, the
		// workspace program, then (once the program ends) faultReported
		wish.WithMiddleware(
			s.faultReported,
			bubbletea.MiddlewareWithProgramHandler(s.program),
			activeterm.Middleware(),
			s.bounded,
			s.recovered,
			s.logged,
		),
	)
	if err != nil {
		return nil, fmt.Errorf("serve: setting up the SSH server: %w", err)
	}
	s.srv = srv
	return s, nil
}

// LoadAuthorizedKeys reads an authorized_keys file (OpenSSH format, parsed
// with golang.org/x/crypto/ssh.ParseAuthorizedKey). Blank lines and # comments
// are skipped; any other line that is not a key is an error naming the line.
func LoadAuthorizedKeys(path string) ([]gossh.PublicKey, error) {
	data, err := catalogue.ReadInput(path)
	if err != nil {
		return nil, catalogue.Badf("serve: cannot read authorized keys %s: %v", path, catalogue.UnwrapPath(err))
	}
	var keys []gossh.PublicKey
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 64*1024), 1<<20)
	for n := 1; sc.Scan(); n++ {
		line := strings.TrimSpace(sc.Text())
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		k, _, _, _, err := gossh.ParseAuthorizedKey([]byte(line))
		if err != nil {
			return nil, catalogue.Badf("serve: %s line %d is not a public key (%v); write one key per line as ssh-keygen prints it", path, n, err)
		}
		keys = append(keys, k)
	}
	if err := sc.Err(); err != nil {
		return nil, catalogue.Badf("serve: reading %s: %v", path, err)
	}
	if len(keys) == 0 {
		return nil, catalogue.Badf("serve: %s holds no public key, so nobody could log in; add the team's keys (one per line)", path)
	}
	return keys, nil
}

// HostKey returns the PEM of the host key at path, creating an ed25519 key
// there with mode 0600 when the file does not exist. An existing key that
// others can read is refused, as OpenSSH refuses such keys.
func HostKey(path string) ([]byte, error) {
	st, err := os.Stat(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		_, priv, err := ed25519.GenerateKey(rand.Reader)
		if err != nil {
			return nil, fmt.Errorf("serve: generating a host key: %w", err)
		}
		block, err := gossh.MarshalPrivateKey(priv, "lipoplan host key")
		if err != nil {
			return nil, fmt.Errorf("serve: encoding the host key: %w", err)
		}
		data := pem.EncodeToMemory(block)
		if _, err := (catalogue.Output{Path: path, Perm: 0o600}).Write(data); err != nil {
			return nil, catalogue.Badf("serve: cannot create host key %s: %v", path, err)
		}
		return data, nil
	case err != nil:
		return nil, catalogue.Badf("serve: cannot read host key %s: %v", path, catalogue.UnwrapPath(err))
	case st.Mode().Perm()&0o077 != 0:
		return nil, catalogue.Badf("serve: host key %s can be read by others (mode %04o); run chmod 600 %s", path, st.Mode().Perm(), path)
	}
	data, err := catalogue.ReadInput(path)
	if err != nil {
		return nil, catalogue.Badf("serve: cannot read host key %s: %v", path, catalogue.UnwrapPath(err))
	}
	if _, err := gossh.ParsePrivateKey(data); err != nil {
		return nil, catalogue.Badf("serve: host key %s is not an unencrypted private key (%v); move it away to have a new one made", path, err)
	}
	return data, nil
}

// allowed is the public-key check: the offered key must equal one of the
// authorized keys (compared by wire encoding, in constant time).
func (s *Server) allowed(ctx ssh.Context, key ssh.PublicKey) bool {
	wire := key.Marshal()
	ok := false
	for _, k := range s.keys {
		if subtle.ConstantTimeCompare(k.Marshal(), wire) == 1 {
			ok = true
		}
	}
	if !ok {
		s.log.Printf("refused key %s for user %q from %s", gossh.FingerprintSHA256(key), ctx.User(), ctx.RemoteAddr())
	}
	return ok
}

// logged writes each session's key fingerprint, start, end and length.
func (s *Server) logged(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		start := time.Now()
		fp := "none"
		if k := sess.PublicKey(); k != nil {
			fp = gossh.FingerprintSHA256(k)
		}
		s.log.Printf("session start key=%s user=%q from=%s at=%s", fp, sess.User(), sess.RemoteAddr(), start.Format(time.RFC3339))
		defer func() {
			end := time.Now()
			s.log.Printf("session end key=%s user=%q from=%s at=%s after=%s", fp, sess.User(), sess.RemoteAddr(), end.Format(time.RFC3339), end.Sub(start).Round(time.Millisecond))
		}()
		next(sess)
	}
}

// bounded refuses a session beyond MaxSessions with a message.
func (s *Server) bounded(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		if !s.take(&s.active, s.cfg.MaxSessions) {
			s.log.Printf("refused session from %s: %d sessions already open (--max-sessions)", sess.RemoteAddr(), s.cfg.MaxSessions)
			wish.Println(sess, fmt.Sprintf("lipoplan: the workspace server is full (%d sessions); try again later.\r", s.cfg.MaxSessions))
			_ = sess.Exit(1)
			return
		}
		defer s.give(&s.active)
		next(sess)
	}
}

// take counts one more in *n (a field of s, under s.mu) unless it has
// reached limit; give counts one less.
func (s *Server) take(n *int, limit int) bool {
	s.mu.Lock()
	defer s.mu.Unlock()
	if *n >= limit {
		return false
	}
	*n++
	return true
}

func (s *Server) give(n *int) {
	s.mu.Lock()
	*n--
	s.mu.Unlock()
}

// Active returns the number of sessions open now.
func (s *Server) Active() int {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.active
}

// preAuth sets what holds before a connection has logged in: the algorithms
// (no SHA-1), the time allowed to log in (AuthTimeout) and the cap on
// connections still logging in (MaxPending).
func (s *Server) preAuth(srv *ssh.Server) error {
	srv.HandshakeTimeout = s.cfg.AuthTimeout
	srv.ConnCallback = s.admit
	srv.ServerConfigCallback = func(ctx ssh.Context) *gossh.ServerConfig {
		cfg := &gossh.ServerConfig{Config: gossh.Config{KeyExchanges: kexAlgorithms(), MACs: macAlgorithms()}}
		cfg.PublicKeyAuthAlgorithms = gossh.SupportedAlgorithms().PublicKeyAuths
		cfg.AuthLogCallback = func(_ gossh.ConnMetadata, _ string, err error) {
			if p, ok := ctx.Value(pendingKey{}).(*pendingConn); ok && err == nil {
				p.loggedIn()
			}
		}
		return cfg
	}
	return nil
}

// kexAlgorithms and macAlgorithms are golang.org/x/crypto/ssh's supported
// (not insecure) algorithms without any built on SHA-1.
func kexAlgorithms() []string { return withoutSHA1(gossh.SupportedAlgorithms().KeyExchanges) }
func macAlgorithms() []string { return withoutSHA1(gossh.SupportedAlgorithms().MACs) }

func withoutSHA1(algs []string) []string {
	var out []string
	for _, a := range algs {
		if !strings.Contains(a, "sha1") {
			out = append(out, a)
		}
	}
	return out
}

// pendingKey holds a connection's *pendingConn in its ssh.Context.
type pendingKey struct{}

// pendingConn is a connection counted as pending until it logs in or closes.
type pendingConn struct {
	net.Conn
	once sync.Once
	done func()
}

func (p *pendingConn) loggedIn() { p.once.Do(p.done) }

func (p *pendingConn) Close() error {
	p.loggedIn()
	return p.Conn.Close()
}

// admit counts a new connection as pending, or closes it at once when
// MaxPending connections are already logging in.
func (s *Server) admit(ctx ssh.Context, conn net.Conn) net.Conn {
	if !s.take(&s.pending, s.cfg.MaxPending) {
		s.log.Printf("refused connection from %s: %d connections are already logging in (--max-pending)", conn.RemoteAddr(), s.cfg.MaxPending)
		return nil
	}
	p := &pendingConn{Conn: conn, done: func() { s.give(&s.pending) }}
	ctx.SetValue(pendingKey{}, p)
	return p
}

// Pending returns the number of connections not yet logged in.
func (s *Server) Pending() int {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.pending
}

// recovered ends a session whose handler panics with a message to it and a
// log line; the server and the other sessions go on.
func (s *Server) recovered(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		defer func() {
			s.mu.Lock()
			g := s.guards[sess]
			delete(s.guards, sess)
			s.mu.Unlock()
			if g != nil {
				g.Close() // the session's solver, once its last solve is done
			}
			if r := recover(); r != nil {
				s.endOnFault(sess, fmt.Errorf("%v", r))
			}
		}()
		next(sess)
	}
}

// faultReported runs once a session's workspace has ended: a workspace that
// stopped on a fault (tui.Guard) ends its session the same way.
func (s *Server) faultReported(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		s.mu.Lock()
		g := s.guards[sess]
		s.mu.Unlock()
		if g != nil && g.Fault() != nil {
			s.endOnFault(sess, g.Fault())
			return
		}
		next(sess)
	}
}

func (s *Server) endOnFault(sess ssh.Session, err error) {
	s.log.Printf("session fault user=%q from=%s: %v (the session ends; the server goes on)", sess.User(), sess.RemoteAddr(), err)
	wish.Errorln(sess, tui.FaultMessage(err)+"\r")
	_ = sess.Exit(1)
}

// program makes each session its own workspace on a copy of the scenario.
// A client that reports no terminal size (OpenSSH with -tt and no local
// terminal sends 0x0 in its pty-req and window-changes) gets 80x24 rather
// than a blank screen: the program starts at 80x24 and keepKnownSize drops
// every later 0x0 size, which the wish middleware forwards from the session's
// window channel and which would otherwise shrink the renderer to nothing.
func (s *Server) program(sess ssh.Session) *tea.Program {
	var m tea.Model = tui.NewWithScenario(s.cfg.Scenario.Clone(), s.cfg.Source, s.cfg.Files)
	if s.cfg.wrap != nil {
		m = s.cfg.wrap(m)
	}
	g := tui.NewGuard(m)
	s.mu.Lock()
	s.guards[sess] = g
	s.mu.Unlock()
	opts := bubbletea.MakeOptions(sess)
	if pty, _, ok := sess.Pty(); ok && (pty.Window.Width <= 0 || pty.Window.Height <= 0) {
		opts = append(opts, tea.WithWindowSize(80, 24))
	}
	// tea.WithFilter replaces the filter MakeOptions set, so keepKnownSize
	// also does that filter's job (see its doc comment).
	opts = append(opts, tea.WithFilter(keepKnownSize))
	return tea.NewProgram(g, opts...)
}

// keepKnownSize is the program's message filter. It drops a WindowSizeMsg
// with no width or no height: bubbletea v2 resizes its renderer to any size
// it is sent, and at 0x0 it clears the screen and draws nothing, for good.
// The wish bubbletea middleware sends the pty-req's size (0x0 from a client
// without a terminal) from its own goroutine, racing the program's first
// 80x24 size; when it lost the race the session stayed blank. Like the filter
// of bubbletea.MakeOptions it turns a SuspendMsg into a ResumeMsg, as a
// remote session cannot be suspended.
func keepKnownSize(_ tea.Model, msg tea.Msg) tea.Msg {
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		if msg.Width <= 0 || msg.Height <= 0 {
			return nil
		}
	case tea.SuspendMsg:
		return tea.ResumeMsg{}
	}
	return msg
}

// Serve accepts connections on l until Shutdown or Close.
func (s *Server) Serve(l net.Listener) error {
	s.log.Printf("serving the workspace on %s (%s; at most %d sessions; idle timeout %s; %s to log in, at most %d logging in at once)",
		l.Addr(), s.mode(), s.cfg.MaxSessions, idle(s.cfg.IdleTimeout), s.cfg.AuthTimeout, s.cfg.MaxPending)
	err := s.srv.Serve(l)
	if errors.Is(err, ssh.ErrServerClosed) {
		return nil
	}
	return err
}

func (s *Server) mode() string {
	if s.cfg.Writable {
		return "writable: sessions may save scenarios in " + s.cfg.Files.Dir + " and write the stocks and spec back"
	}
	return "read-only: sessions cannot write files"
}

func idle(d time.Duration) string {
	if d == 0 {
		return "none"
	}
	return d.String()
}

// ListenAndServe listens on Config.Listen and serves.
func (s *Server) ListenAndServe() error {
	l, err := net.Listen("tcp", s.cfg.Listen)
	if err != nil {
		return catalogue.Badf("serve: cannot listen on %s: %v", s.cfg.Listen, err)
	}
	return s.Serve(l)
}

// Shutdown stops accepting connections and waits for sessions to end until
// ctx is done, then closes what is left.
func (s *Server) Shutdown(ctx context.Context) error {
	err := s.srv.Shutdown(ctx)
	if errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) {
		return s.srv.Close()
	}
	return err
}

// Close stops the server and drops every connection.
func (s *Server) Close() error { return s.srv.Close() }
