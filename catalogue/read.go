package catalogue

import (
	"fmt"
	"io"
	"io/fs"
	"os"
	"syscall"
)

// Limits on what lipoplan reads (README, "Files lipoplan reads"): only a
// regular file, at most MaxInputBytes, nested at most MaxTOMLDepth deep. A
// device such as /dev/zero, a FIFO or a folder is refused before anything is
// read from it, and an absurdly nested file before the TOML decoder (whose
// time and memory grow with the square of the depth) sees it. The size limit
// is far above any real catalogue (the demo's 14 stocks take 7 kB) and keeps
// the decoder, which needs up to about 100 times a file's size in memory and
// about a second per MB for a file of tiny tables, to a few seconds.
const (
	MaxInputBytes = 4 << 20
	MaxTOMLDepth  = 32
)

// ReadInput reads the input file at path, following symlinks. It refuses
// anything but a regular file and a file over MaxInputBytes with an
// *fs.PathError naming path. The file is opened without blocking, so a FIFO
// with no writer is refused at once instead of waiting for one.
func ReadInput(path string) ([]byte, error) {
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return nil, err
	}
	if !st.Mode().IsRegular() {
		return nil, &fs.PathError{Op: "read", Path: path, Err: refused("it is %s, not a regular file", kindOf(st.Mode()))}
	}
	if st.Size() > MaxInputBytes {
		return nil, &fs.PathError{Op: "read", Path: path, Err: tooBig(st.Size())}
	}
	data, err := readAll(io.LimitReader(f, MaxInputBytes+1), int(st.Size())+1)
	if err != nil {
		return nil, err
	}
	if len(data) > MaxInputBytes {
		return nil, &fs.PathError{Op: "read", Path: path, Err: tooBig(int64(len(data)))}
	}
	return data, nil
}

// readAll is io.ReadAll into one buffer of size bytes to start with, the
// file's size and one byte to see it end, as os.ReadFile sizes its buffer,
// so that a file that does not grow while it is read is read without
// copying; append grows the buffer for one that does.
func readAll(r io.Reader, size int) ([]byte, error) {
	data := make([]byte, 0, size)
	for {
		if len(data) == cap(data) {
			data = append(data, 0)[:len(data)]
		}
		n, err := r.Read(data[len(data):cap(data)])
		data = data[:len(data)+n]
		if err == io.EOF {
			return data, nil
		}
		if err != nil {
			return nil, err
		}
	}
}

// refusedInput is why ReadInput will not read a file that exists.
type refusedInput struct{ msg string }

func (e *refusedInput) Error() string { return e.msg }

func refused(format string, args ...any) error {
	return &refusedInput{fmt.Sprintf(format, args...)}
}

func tooBig(n int64) error {
	return refused("it holds %d MB, more than the %d MB lipoplan reads", (n+1<<20-1)>>20, MaxInputBytes>>20)
}

// kindOf names a file mode that is not a regular file.
func kindOf(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a folder"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe (FIFO)"
	case m&fs.ModeSocket != 0:
		return "a socket"
	case m&fs.ModeDevice != 0:
		return "a device"
	}
	return "a special file"
}

// DepthError is CheckTOMLDepth's finding: where a file nests too deep.
type DepthError struct{ Line int }

func (e *DepthError) Error() string {
	return fmt.Sprintf("line %d: %s", e.Line, e.Problem())
}

// Problem is the message without the line.
func (e *DepthError) Problem() string {
	return fmt.Sprintf("tables, arrays or dotted keys nest more than %d levels deep (lipoplan's own files nest at most 4); flatten the file", MaxTOMLDepth)
}

// CheckTOMLDepth scans TOML text without decoding it and returns an error
// (a *DepthError) naming the line where tables, arrays, inline tables or dotted keys first
// nest more than MaxTOMLDepth levels deep. It skips strings and comments and
// counts every segment of a dotted key or table header as a level; it is a
// cheap guard, not a parser, and refuses no file the loaders could use.
func CheckTOMLDepth(data []byte) error {
	if deepest, line := tomlDepth(data, MaxTOMLDepth); deepest > MaxTOMLDepth {
		return &DepthError{Line: line}
	}
	return nil
}

// tomlDepth returns the deepest nesting in data, stopping at the line where it
// first exceeds limit.
func tomlDepth(data []byte, limit int) (deepest, line int) {
	type open struct {
		base   int  // depth inside this [ or {
		inline bool // an inline table (keys follow , and {), not an array
	}
	line = 1
	var (
		stack     []open
		table     int // depth of the last [table] header
		dots      int // dots so far in the current key
		keyMode   = true
		lineStart = true
	)
	depth := func() int {
		if len(stack) > 0 {
			return stack[len(stack)-1].base + dots
		}
		return table + dots
	}
	// deeper notes the depth reached and reports whether it is over limit
	deeper := func(d int) bool {
		deepest = max(deepest, d)
		return d > limit
	}
	for i := 0; i < len(data); i++ {
		c := data[i]
		switch c {
		case ' ', '\t', '\r':
			continue
		case '\n':
			line++
			lineStart = true
			if len(stack) == 0 {
				keyMode, dots = true, 0
			}
			continue
		case '#':
			for i+1 < len(data) && data[i+1] != '\n' {
				i++
			}
		case '"', '\'':
			i = skipString(data, i, &line)
		case '.':
			if keyMode {
				dots++
				if deeper(depth()) {
					return deepest, line
				}
			}
		case '=':
			keyMode = false
		case ',':
			keyMode = len(stack) > 0 && stack[len(stack)-1].inline
			dots = 0
		case '[', '{':
			if c == '[' && lineStart && len(stack) == 0 {
				// a [table] or [[array of tables]] header
				n := 1
				for i++; i < len(data) && data[i] != ']' && data[i] != '\n'; i++ {
					switch data[i] {
					case '.':
						n++
					case '"', '\'':
						i = skipString(data, i, &line)
					}
				}
				for i+1 < len(data) && data[i+1] == ']' {
					i++
				}
				table, dots, keyMode = n, 0, true
				if deeper(table) {
					return deepest, line
				}
				break
			}
			stack = append(stack, open{base: depth() + 1, inline: c == '{'})
			dots, keyMode = 0, c == '{'
			if deeper(depth()) {
				return deepest, line
			}
		case ']', '}':
			if len(stack) > 0 {
				stack = stack[:len(stack)-1]
			}
			dots, keyMode = 0, false
		}
		lineStart = false
	}
	return deepest, line
}

// skipString returns the index of the last byte of the TOML string that
// opens at data[i] (basic "...", literal '...', or either multi-line form),
// counting the newlines it spans into line. An unclosed string runs to the
// end of its line (single-line) or of the data (multi-line).
func skipString(data []byte, i int, line *int) int {
	q := data[i]
	multi := i+2 < len(data) && data[i+1] == q && data[i+2] == q
	if multi {
		i += 2
	}
	for i++; i < len(data); i++ {
		switch c := data[i]; {
		case c == '\\' && q == '"':
			if i+1 < len(data) && data[i+1] == '\n' {
				*line++
			}
			i++
		case c == '\n':
			if !multi {
				return i - 1
			}
			*line++
		case c == q && !multi:
			return i
		case c == q && i+2 < len(data) && data[i+1] == q && data[i+2] == q:
			// up to two more quotes may belong to the content ("""a"""")
			i += 2
			for i+1 < len(data) && data[i+1] == q {
				i++
			}
			return i
		}
	}
	return len(data) - 1
}
