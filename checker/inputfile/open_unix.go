//go:build unix

package inputfile

import "syscall"

// openFlags opens a FIFO without waiting for a writer; the mode check after
// the open then refuses it.
const openFlags = syscall.O_NONBLOCK
