// Package inputfile reads the files headroom is given: circuit files,
// libraries and rule sets. It reads only regular files, never more than
// MaxBytes, so that a FIFO, a device or a folder named where a file is
// expected is an input error instead of a hang or an exhausted memory.
package inputfile

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
)

// MaxBytes is the largest input read. A hand-written circuit of a few
// hundred parts is under 100 kB and a generated part library of thousands of
// parts under 2 MB; 16 MiB leaves a factor of 100 over the largest
// hand-written file while keeping the worst case of parsing (a few tens of
// bytes of memory per byte of text) well under a gigabyte.
const MaxBytes = 16 << 20

// ErrTooLarge is wrapped when an input is larger than MaxBytes.
var ErrTooLarge = fmt.Errorf("larger than %d MiB, the most headroom reads from one file", MaxBytes>>20)

// ErrNotRegular is wrapped when a path names something other than a regular
// file (a folder, a FIFO, a device, a socket).
var ErrNotRegular = errors.New("not a regular file")

// Read reads the regular file at path. It opens without blocking (a FIFO
// with no writer would otherwise hang the open), checks what it opened, and
// reads at most MaxBytes. Errors are *fs.PathError wrapping ErrNotRegular,
// ErrTooLarge or the operating system's reason.
func Read(path string) ([]byte, error) {
	if st, err := os.Stat(path); err != nil {
		return nil, err
	} else if err := regular(path, st); err != nil {
		return nil, err
	}
	f, err := os.OpenFile(path, os.O_RDONLY|openFlags, 0)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	st, err := f.Stat() // what was opened, in case the path changed since
	if err != nil {
		return nil, err
	}
	if err := regular(path, st); err != nil {
		return nil, err
	}
	b, err := ReadAll(f)
	if err != nil {
		return nil, &fs.PathError{Op: "read", Path: path, Err: err}
	}
	return b, nil
}

func regular(path string, st fs.FileInfo) error {
	if st.Mode().IsRegular() {
		return nil
	}
	return &fs.PathError{Op: "read", Path: path, Err: fmt.Errorf("%w: %s", ErrNotRegular, kind(st.Mode()))}
}

// kind names what a non-regular file is, for the message.
func kind(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a folder"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe"
	case m&fs.ModeCharDevice != 0:
		return "a character device"
	case m&fs.ModeDevice != 0:
		return "a device"
	case m&fs.ModeSocket != 0:
		return "a socket"
	}
	return "a special file"
}

// ReadAll reads r (standard input) up to MaxBytes.
func ReadAll(r io.Reader) ([]byte, error) {
	b, err := io.ReadAll(io.LimitReader(r, MaxBytes+1))
	if err != nil {
		return nil, err
	}
	if len(b) > MaxBytes {
		return nil, ErrTooLarge
	}
	return b, nil
}

// Reason is err without the path an *fs.PathError repeats, for a message
// that already names the file.
func Reason(err error) string {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}
