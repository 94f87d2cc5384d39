package catalogue

import (
	"errors"
	"fmt"
	"strings"
)

// Problem is one finding of validation. Where names the stock id, limit or
// key it concerns; Fix says what to change.
type Problem struct {
	File    string
	Where   string // e.g. `stock "pko-r"`, `limit "iv"`, `key "batch"`
	Msg     string
	Warning bool
}

func (p Problem) String() string {
	kind := "error"
	if p.Warning {
		kind = "warning"
	}
	var b strings.Builder
	if p.File != "" {
		b.WriteString(p.File)
		b.WriteString(": ")
	}
	b.WriteString(kind)
	b.WriteString(": ")
	if p.Where != "" {
		b.WriteString(p.Where)
		b.WriteString(": ")
	}
	b.WriteString(p.Msg)
	return b.String()
}

// Problems is every finding of one load. As an error it lists them all.
type Problems []Problem

// Errors returns only the findings that are not warnings.
func (ps Problems) Errors() Problems {
	var out Problems
	for _, p := range ps {
		if !p.Warning {
			out = append(out, p)
		}
	}
	return out
}

// Warnings returns only the warnings.
func (ps Problems) Warnings() Problems {
	var out Problems
	for _, p := range ps {
		if p.Warning {
			out = append(out, p)
		}
	}
	return out
}

// Err returns the errors among ps as an error (a Problems), or nil when
// there are none: warnings alone are no error.
func (ps Problems) Err() error {
	if errs := ps.Errors(); len(errs) > 0 {
		return errs
	}
	return nil
}

func (ps Problems) Error() string {
	lines := make([]string, len(ps))
	for i, p := range ps {
		lines[i] = p.String()
	}
	return strings.Join(lines, "\n")
}

// BadInput marks an error caused by what the user wrote (a file, a flag, a
// stock or a limit); the CLI answers it with exit code 2.
type BadInput struct{ Err error }

func (e *BadInput) Error() string { return e.Err.Error() }
func (e *BadInput) Unwrap() error { return e.Err }

// Badf makes a BadInput error from a format string.
func Badf(format string, args ...any) error {
	return &BadInput{Err: fmt.Errorf(format, args...)}
}

// IsBadInput reports whether err (or anything it wraps) is bad user input,
// including a Problems list with at least one error.
func IsBadInput(err error) bool {
	var b *BadInput
	if errors.As(err, &b) {
		return true
	}
	var ps Problems
	if errors.As(err, &ps) {
		return len(ps.Errors()) > 0
	}
	return false
}
