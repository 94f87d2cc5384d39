package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
)

// errHelp ends a command after --help was printed (exit 0); errUsage after a
// flag error was printed (exit 2).
var (
	errHelp  = errors.New("help shown")
	errUsage = errors.New("usage error")
)

// newFlags makes a flag set for one command whose usage text names the
// command, its synopsis and a description.
func (a *app) newFlags(name, synopsis, about string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {
		w := a.stdout
		fmt.Fprintf(w, "Usage: lipoplan %s %s\n\n%s\n\nFlags:\n", name, synopsis, about)
		fs.SetOutput(w)
		fs.PrintDefaults()
		fs.SetOutput(io.Discard)
	}
	return fs
}

// parse parses args; --help prints usage and returns errHelp, a bad flag
// prints the problem and returns errUsage.
func (a *app) parse(fs *flag.FlagSet, args []string) error {
	err := fs.Parse(args)
	switch {
	case err == nil:
		if fs.NArg() > 0 {
			fmt.Fprintf(a.stderr, "lipoplan %s: unexpected argument %q; run 'lipoplan %s --help'\n", fs.Name(), fs.Arg(0), fs.Name())
			return errUsage
		}
		return nil
	case errors.Is(err, flag.ErrHelp):
		// flag.Parse has already printed the usage text
		return errHelp
	default:
		fmt.Fprintf(a.stderr, "lipoplan %s: %v; run 'lipoplan %s --help'\n", fs.Name(), err, fs.Name())
		return errUsage
	}
}
