package catalogue

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"syscall"
	"time"
)

// Output is one file that a command or the workspace writes. Every output of
// lipoplan (--mps, --svg, demo --write, the workspace's save and write-back)
// goes through Write, which applies one policy (README, "Files lipoplan
// writes"):
//
//   - "-" is standard output, where the caller offers one (Stdout);
//   - a path that is one of the run's inputs is refused, compared with
//     os.SameFile after following symlinks, and the input is left alone;
//   - a folder, a missing folder or a dangling symlink is refused;
//   - a symlink is written through: the file it points to is replaced;
//   - a device or a named pipe is opened and written to, never replaced;
//   - a regular file is replaced atomically (WriteFileAtomic) keeping its
//     mode, and what it held is kept beside it as <name>.<UTC time>.bak
//     unless it held exactly the new data.
//
// Every refusal is a BadInput error naming the path.
type Output struct {
	Path   string
	Perm   fs.FileMode // mode of a new file; 0 means 0644
	Inputs []string    // the run's input files ("" entries are skipped)
	Stdout io.Writer   // where "-" goes; nil refuses "-"
	Now    time.Time   // names the backup; zero means time.Now()
}

// Written says what Output.Write did.
type Written struct {
	Path   string // the file written: the symlink's target, or "-"
	Backup string // where the replaced file was kept; "" when none
}

// Write writes data by the policy of Output.
func (o Output) Write(data []byte) (Written, error) {
	switch o.Path {
	case "":
		return Written{}, Badf("no file name given to write to")
	case "-":
		if o.Stdout == nil {
			return Written{}, Badf("- (standard output) cannot be written here; give a file name")
		}
		if _, err := o.Stdout.Write(data); err != nil {
			return Written{}, &BadInput{Err: fmt.Errorf("writing to standard output: %w", err)}
		}
		return Written{Path: "-"}, nil
	}
	target, st, err := o.resolve()
	if err != nil {
		return Written{}, err
	}
	w := Written{Path: target}
	switch {
	case st == nil:
		perm := o.Perm
		if perm == 0 {
			perm = 0o644
		}
		return w, badWrite(WriteFileAtomic(target, data, perm))
	case !st.Mode().IsRegular():
		return w, writeInPlace(target, st.Mode(), data)
	}
	if w.Backup, err = o.backup(target, st, data); err != nil {
		return Written{}, err
	}
	return w, badWrite(WriteFileAtomic(target, data, st.Mode().Perm()))
}

// resolve follows a symlink at Path and checks what is there: the file to
// write and its mode (nil when it does not exist yet).
func (o Output) resolve() (string, fs.FileInfo, error) {
	target := o.Path
	lst, err := os.Lstat(target)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		dir := filepath.Dir(target)
		if d, err := os.Stat(dir); err != nil || !d.IsDir() {
			return "", nil, Badf("%s: the folder %s does not exist; create it or give another path", target, dir)
		}
		return target, nil, nil
	case err != nil:
		return "", nil, &BadInput{Err: fmt.Errorf("cannot write %s: %w", target, UnwrapPath(err))}
	case lst.Mode()&fs.ModeSymlink != 0:
		resolved, err := filepath.EvalSymlinks(target)
		if err != nil {
			dest, _ := os.Readlink(target)
			return "", nil, Badf("%s is a symlink to %s, which cannot be reached (%v); point it at a file or give another path", target, dest, UnwrapPath(err))
		}
		target = resolved
	}
	st, err := os.Stat(target)
	if err != nil {
		return "", nil, &BadInput{Err: fmt.Errorf("cannot write %s: %w", target, UnwrapPath(err))}
	}
	if st.IsDir() {
		return "", nil, Badf("%s is a folder; give the name of a file to write", o.Path)
	}
	for _, in := range o.Inputs {
		if in == "" || in == "-" {
			continue
		}
		if ist, err := os.Stat(in); err == nil && os.SameFile(ist, st) {
			return "", nil, Badf("%s is %s, an input of this run; writing it would destroy it, so choose another name", o.Path, in)
		}
	}
	return target, st, nil
}

// backup keeps the regular file at target beside it before it is replaced,
// unless it holds exactly data. The old file is hard-linked to the backup
// name (no copy, the same bytes and mode), or copied where links fail.
func (o Output) backup(target string, st fs.FileInfo, data []byte) (string, error) {
	if st.Size() == int64(len(data)) {
		old, err := os.ReadFile(target)
		if err == nil && bytes.Equal(old, data) {
			return "", nil
		}
	}
	now := o.Now
	if now.IsZero() {
		now = time.Now()
	}
	bak := fmt.Sprintf("%s.%s.bak", target, now.UTC().Format("20060102T150405.000Z"))
	if err := os.Link(target, bak); err == nil {
		return bak, nil
	}
	old, err := os.ReadFile(target)
	if err != nil {
		return "", &BadInput{Err: fmt.Errorf("reading %s to keep a backup before replacing it: %w", target, UnwrapPath(err))}
	}
	if err := WriteFileAtomic(bak, old, st.Mode().Perm()); err != nil {
		return "", &BadInput{Err: fmt.Errorf("keeping a backup of %s: %w", target, err)}
	}
	return bak, nil
}

// writeInPlace writes data into a device or named pipe that exists at path.
// It opens without blocking: a pipe nobody reads is refused, not waited on.
func writeInPlace(path string, mode fs.FileMode, data []byte) error {
	f, err := os.OpenFile(path, os.O_WRONLY|syscall.O_NONBLOCK, 0)
	if errors.Is(err, syscall.ENXIO) {
		if mode&fs.ModeNamedPipe != 0 {
			return Badf("nobody is reading the named pipe %s; start the reader first, or write to - (standard output)", path)
		}
		return Badf("cannot write to %s: it is %s that takes no writes", path, kindOf(mode))
	}
	if err != nil {
		return &BadInput{Err: fmt.Errorf("cannot write to %s: %w", path, UnwrapPath(err))}
	}
	if _, err := f.Write(data); err != nil {
		_ = f.Close()
		return &BadInput{Err: fmt.Errorf("writing to %s: %w", path, UnwrapPath(err))}
	}
	if err := f.Close(); err != nil {
		return &BadInput{Err: fmt.Errorf("writing to %s: %w", path, UnwrapPath(err))}
	}
	return nil
}

// badWrite marks a failed write as bad input: the path is the user's choice.
func badWrite(err error) error {
	if err == nil {
		return nil
	}
	return &BadInput{Err: err}
}
