package main

import (
	"context"
	"errors"
	"fmt"
	"net"
	"os"
	"os/signal"
	"path/filepath"
	"syscall"
	"time"

	tea "charm.land/bubbletea/v2"

	"lipoplan/catalogue"
	"lipoplan/tui"
	"lipoplan/tui/serve"
)

// scenarioFlags are the inputs explore and serve share.
type scenarioFlags struct {
	stocks, spec, scenario, calibration *string
}

func (a *app) scenarioFlags(fs interface {
	String(name, value, usage string) *string
}) scenarioFlags {
	return scenarioFlags{
		stocks:      fs.String("stocks", "", "stock catalogue `file` (default: the embedded demo stocks)"),
		spec:        fs.String("spec", "", "product spec `file` (default: the first embedded demo spec)"),
		scenario:    fs.String("scenario", "", "start from a saved scenario `file` instead of --stocks/--spec"),
		calibration: fs.String("calibration", "", calibrationFlagHelp),
	}
}

// load builds the starting scenario and a description of where it came from.
func (a *app) load(f scenarioFlags) (*tui.Scenario, string, error) {
	sc, src, err := a.loadScenario(f)
	if err != nil {
		return nil, "", err
	}
	if sc.Model, err = a.sfcModel(*f.calibration); err != nil {
		return nil, "", err
	}
	return sc, src, nil
}

func (a *app) loadScenario(f scenarioFlags) (*tui.Scenario, string, error) {
	if *f.scenario != "" {
		sc, err := loadScenario(*f.scenario, *f.stocks, *f.spec)
		if err != nil {
			return nil, "", err
		}
		return sc, *f.scenario, nil
	}
	cat, err := a.stocks(*f.stocks)
	if err != nil {
		return nil, "", err
	}
	spec, err := a.spec(*f.spec, cat)
	if err != nil {
		return nil, "", err
	}
	src := "demo data"
	if *f.stocks != "" || *f.spec != "" {
		src = fmt.Sprintf("%s + %s", orDemo(*f.stocks), orDemo(*f.spec))
	}
	return tui.NewScenario(cat, spec), src, nil
}

func orDemo(p string) string {
	if p == "" {
		return "demo"
	}
	return p
}

func (a *app) explore(args []string) error {
	fs := a.newFlags("explore", "[--stocks F] [--spec F] [--scenario F]",
		"Open the terminal what-if workspace: edit prices, availability, allowed stocks, limits and the\n"+
			"batch and watch the cheapest blend, what binds, price ranging, the SFC curve and TAG classes\n"+
			"follow. Runs on the embedded demo data when no files are given. Keys are listed on the\n"+
			"bottom line; scenarios are saved as one TOML file (s) and opened again (o).")
	sf := a.scenarioFlags(fs)
	if err := a.parse(fs, args); err != nil {
		return err
	}
	sc, src, err := a.load(sf)
	if err != nil {
		return err
	}
	files := tui.Files{StocksPath: *sf.stocks, SpecPath: *sf.spec}
	g := tui.NewGuard(tui.NewWithScenario(sc, src, files))
	p := tea.NewProgram(g, tea.WithOutput(a.stdout))
	_, err = p.Run()
	g.Close()
	return exploreEnd(g, err)
}

// exploreEnd turns how the workspace ended into the command's result: a fault
// in it (caught by the guard or by bubbletea) is an internal fault, exit 1.
func exploreEnd(g *tui.Guard, err error) error {
	switch {
	case g.Fault() != nil:
		return fmt.Errorf("in the workspace: %w; it stopped and nothing was saved", g.Fault())
	case errors.Is(err, tea.ErrProgramPanic):
		return fmt.Errorf("the workspace stopped on an internal fault: %w", err)
	case err == nil, errors.Is(err, tea.ErrProgramKilled), errors.Is(err, tea.ErrInterrupted):
		return nil
	}
	return catalogue.Badf("explore needs an interactive terminal (%v); for scripts use 'lipoplan solve'", err)
}

func (a *app) serve(args []string) error {
	fs := a.newFlags("serve", "--authorized-keys F --host-key F [--listen ADDR] [--stocks F --spec F | --scenario F] [--max-sessions N] [--idle-timeout D] [--auth-timeout D] [--max-pending N] [--writable] [--scenario-dir DIR]",
		"Serve the workspace over SSH. Only the public keys in --authorized-keys get in; each session\n"+
			"has its own copy of the scenario. The host key is created at --host-key (mode 0600) when absent\n"+
			"and reused after. Without --writable nothing is written: saving is refused. With --writable,\n"+
			"sessions save scenarios by plain name into --scenario-dir and may write the stocks and spec back\n"+
			"(W). A connection must log in within --auth-timeout, and at most --max-pending may be logging\n"+
			"in at once (more are closed at once). Sessions' key fingerprints and times are logged to stderr.")
	listen := fs.String("listen", "127.0.0.1:2222", "`address` to listen on (loopback by default)")
	auth := fs.String("authorized-keys", "", "authorized_keys `file`: the public keys allowed in")
	hostKey := fs.String("host-key", "", "host private key `file` (created with mode 0600 when absent)")
	maxSessions := fs.Int("max-sessions", serve.DefaultMaxSessions, "most sessions open at once")
	idleTimeout := fs.Duration("idle-timeout", 30*time.Minute, "drop a session with no traffic for this `duration` (0 = never)")
	authTimeout := fs.Duration("auth-timeout", serve.DefaultAuthTimeout, "close a connection that has not logged in within this `duration`")
	maxPending := fs.Int("max-pending", serve.DefaultMaxPending, "most connections logging in at once; more are closed at once")
	writable := fs.Bool("writable", false, "let sessions save scenarios and write the stocks and spec files back")
	dir := fs.String("scenario-dir", "", "`folder` for scenarios sessions save and open (default: the --stocks file's folder, or the current one)")
	sf := a.scenarioFlags(fs)
	if err := a.parse(fs, args); err != nil {
		return err
	}
	sc, src, err := a.load(sf)
	if err != nil {
		return err
	}
	if *maxSessions < 1 {
		return catalogue.Badf("serve: --max-sessions %d: allow at least one session", *maxSessions)
	}
	if *maxPending < 1 {
		return catalogue.Badf("serve: --max-pending %d: allow at least one connection to log in", *maxPending)
	}
	if *authTimeout <= 0 {
		return catalogue.Badf("serve: --auth-timeout %v: give a duration above zero, such as 15s", *authTimeout)
	}
	d := *dir
	if d == "" {
		d = "."
		if *sf.stocks != "" {
			d = filepath.Dir(*sf.stocks)
		}
	}
	srv, err := serve.New(serve.Config{
		Listen: *listen, AuthorizedKeys: *auth, HostKey: *hostKey,
		Scenario: sc, Source: src,
		Files:    tui.Files{Dir: d, StocksPath: *sf.stocks, SpecPath: *sf.spec},
		Writable: *writable, MaxSessions: *maxSessions, IdleTimeout: *idleTimeout,
		AuthTimeout: *authTimeout, MaxPending: *maxPending,
		Log: a.stderr,
	})
	if err != nil {
		return err
	}
	l, err := net.Listen("tcp", *listen)
	if err != nil {
		return catalogue.Badf("serve: cannot listen on %s: %v", *listen, err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	done := make(chan error, 1)
	go func() { done <- srv.Serve(l) }()
	select {
	case err := <-done:
		return err
	case <-ctx.Done():
	}
	fmt.Fprintln(a.stderr, "lipoplan serve: stopping; waiting up to 10 s for sessions to end")
	sctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
	defer cancel()
	if err := srv.Shutdown(sctx); err != nil && !errors.Is(err, net.ErrClosed) {
		return fmt.Errorf("serve: shutting down: %w", err)
	}
	return nil
}
