package main

import (
	"os"

	"headroom/checker/inputfile"
	"headroom/checker/output"
)

// readFile and exists read the working tree; `check --staged` swaps in the
// git index.
func readFile(p string) ([]byte, error) { return inputfile.Read(p) }

func exists(p string) bool {
	_, err := os.Stat(p)
	return err == nil
}

func errorLine(path string, err error) string { return output.ErrorLine(path, err) }
