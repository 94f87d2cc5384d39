// Command lipoplan finds the cheapest blend of edible-fat stocks that meets a
// product specification, shows what interesterification does to it, and
// serves a terminal what-if workspace. See README.md.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"sort"
	"strings"
	"time"

	"lipoplan/catalogue"
)

// Exit codes of the CLI contract (README, Commands).
const (
	exitOK         = 0
	exitInternal   = 1
	exitBadInput   = 2
	exitInfeasible = 3
)

// errInfeasible is returned by a command whose spec cannot be met after it
// has printed the diagnosis; main turns it into exit code 3.
var errInfeasible = errors.New("the spec cannot be met")

// app carries the output streams and settings of one run; commands write
// only through it so tests can capture them.
type app struct {
	stdout io.Writer
	stderr io.Writer
	color  bool // ANSI colour allowed (a terminal and NO_COLOR unset)
	// stderrTerm: standard error is a terminal, so long work may draw a
	// progress bar there (progress.go); clock is the time of bars and sheets
	// (nil: time.Now; app.now).
	stderrTerm bool
	clock      func() time.Time
}

// command is one subcommand.
type command struct {
	name    string
	summary string
	run     func(a *app, args []string) error
}

func commands() []command {
	cs := []command{
		{"demo", "solve the embedded demo scenario and print the report", (*app).demo},
		{"check", "validate a stock catalogue and a spec; print every problem", (*app).check},
		{"mix", "properties of a given mix of stocks", (*app).mix},
		{"tags", "TAG distribution of a mix, native or after interesterification", (*app).tags},
		{"explore", "terminal what-if workspace", (*app).explore},
		{"serve", "serve the workspace to a team over SSH", (*app).serve},
		{"solve", "cheapest blend that meets a spec", (*app).solve},
		{"plan", "make several orders from one shared stock at least cost", (*app).plan},
		{"sweep", "cost and blend over a range of one stock's price", (*app).sweep},
		{"calibrate", "fit the TAG model's SFC to the catalogue's measured curves", (*app).calibrate},
		{"replace", "cheapest trans-free blend that melts like a fat you use now", (*app).replace},
		{"compare", "solve saved scenarios and set them side by side", (*app).compare},
		{"routes", "physical blend, chemical and enzymatic interesterification side by side", (*app).routes},
		// further commands add their line here
	}
	sort.SliceStable(cs, func(i, j int) bool { return order(cs[i].name) < order(cs[j].name) })
	return cs
}

var commandOrder = []string{"demo", "check", "mix", "tags", "solve", "replace", "plan", "sweep", "compare", "routes", "calibrate", "explore", "serve"}

func order(name string) int {
	for i, n := range commandOrder {
		if n == name {
			return i
		}
	}
	return len(commandOrder)
}

func main() {
	if pct, ok := batchGCPercent(os.Args[1:], os.Getenv); ok {
		debug.SetGCPercent(pct)
	}
	a := &app{stdout: os.Stdout, stderr: os.Stderr, color: colorAllowed(os.Stdout), stderrTerm: isTerminal(os.Stderr)}
	os.Exit(a.main(os.Args[1:]))
}

// batchGC is the collector's GOGC for a one-shot command (DEVELOPERS.md,
// "Project decisions"): a solve of a 300-stock catalogue allocates a few
// megabytes and exits, so at the runtime's default (100, a first collection
// at a 4 MB heap) the collector's work and the fresh pages it leaves are a
// tenth of the run. At 400 the first collection comes at a 16 MB heap and
// the heap stays within five times what is live (the Go garbage collector
// guide, go.dev/doc/gc-guide, "GOGC").
const batchGC = 400

// batchGCPercent is the GOGC to set for the command line args: batchGC for
// a one-shot command, nothing (ok false) for the long-running workspace and
// server, or when the user set GOGC or GOMEMLIMIT (theirs is kept).
func batchGCPercent(args []string, getenv func(string) string) (pct int, ok bool) {
	if getenv("GOGC") != "" || getenv("GOMEMLIMIT") != "" || len(args) == 0 {
		return 0, false
	}
	switch args[0] {
	case "explore", "serve":
		return 0, false
	}
	return batchGC, true
}

// main runs one command line and returns the exit code. It never lets a panic
// escape as a Go trace: a fault becomes exit 1 with a one-line message.
func (a *app) main(args []string) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(a.stderr, "lipoplan: internal fault: %v (please report it with the command line and input files)\n", r)
			code = exitInternal
		}
	}()
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" || args[0] == "help" {
		if len(args) > 1 && args[0] == "help" {
			return a.main([]string{args[1], "--help"})
		}
		a.usage(a.stdout)
		if len(args) == 0 {
			return exitBadInput
		}
		return exitOK
	}
	if args[0] == "--version" || args[0] == "-version" || args[0] == "version" {
		writeVersion(a.stdout)
		return exitOK
	}
	for _, c := range commands() {
		if c.name == args[0] {
			return a.exit(c.run(a, args[1:]))
		}
	}
	fmt.Fprintf(a.stderr, "lipoplan: unknown command %q; run 'lipoplan --help' for the list\n", args[0])
	return exitBadInput
}

func (a *app) exit(err error) int {
	switch {
	case err == nil:
		return exitOK
	case errors.Is(err, errHelp):
		return exitOK
	case errors.Is(err, errInfeasible):
		return exitInfeasible
	case errors.Is(err, errUsage):
		return exitBadInput
	case catalogue.IsBadInput(err):
		fmt.Fprintln(a.stderr, prefixLines(err.Error()))
		return exitBadInput
	default:
		fmt.Fprintf(a.stderr, "lipoplan: internal fault: %v\n", err)
		return exitInternal
	}
}

func prefixLines(s string) string {
	lines := strings.Split(strings.TrimRight(s, "\n"), "\n")
	for i, l := range lines {
		lines[i] = "lipoplan: " + l
	}
	return strings.Join(lines, "\n")
}

func (a *app) usage(w io.Writer) {
	fmt.Fprintln(w, "lipoplan — cheapest edible-fat blends that meet a spec")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Usage: lipoplan <command> [flags]   (every command takes --help)")
	fmt.Fprintln(w)
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-8s %s\n", c.name, c.summary)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "--stocks and --spec default to the embedded demo data. Exit codes: 0 done, 2 bad input,")
	fmt.Fprintln(w, "3 spec cannot be met (diagnosis printed), 1 internal fault. lipoplan --version names the engine.")
}

func colorAllowed(f *os.File) bool {
	if _, ok := os.LookupEnv("NO_COLOR"); ok {
		return false
	}
	return isTerminal(f)
}
