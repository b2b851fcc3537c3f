//go:build !unix

package inputfile

// openFlags: elsewhere the check before the open is the guard.
const openFlags = 0
