package main

import (
	"fmt"
	"io"

	"lipoplan/catalogue"
)

// output is one file a command writes besides its report, named by its flag.
type output struct {
	flag, path string
}

// reportTo checks a command's outputs and returns where its report goes:
// standard output, or standard error when one output is "-" (standard output
// then carries that file alone). Two outputs may not share a path.
func (a *app) reportTo(outs ...output) (io.Writer, error) {
	w := a.stdout
	seen := map[string]string{}
	for _, o := range outs {
		if o.path == "" {
			continue
		}
		if prev, dup := seen[o.path]; dup {
			if o.path == "-" {
				return nil, catalogue.Badf("%s and %s both ask for - (standard output); give one of them a file name", prev, o.flag)
			}
			return nil, catalogue.Badf("%s and %s both name %s; give each its own file", prev, o.flag, o.path)
		}
		seen[o.path] = o.flag
		if o.path == "-" {
			w = a.stderr
		}
	}
	return w, nil
}

// write writes one output by the rules every output follows
// (catalogue.Output), never over the run's inputs; a replaced file's backup
// is reported on standard error.
func (a *app) write(o output, data []byte, inputs ...string) error {
	w, err := catalogue.Output{Path: o.path, Inputs: inputs, Stdout: a.stdout}.Write(data)
	if err != nil {
		return fmt.Errorf("%s: %w", o.flag, err)
	}
	if w.Backup != "" {
		fmt.Fprintf(a.stderr, "lipoplan: %s: kept the old %s as %s\n", o.flag, w.Path, w.Backup)
	}
	return nil
}
