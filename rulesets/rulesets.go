// Package rulesets embeds the shipped rule sets, so that the binary works with
// no files beside it.
package rulesets

import "embed"

//go:embed *.toml
var files embed.FS

// Builtin returns the text of a shipped rule set by name ("default", "strict").
func Builtin(name string) ([]byte, bool) {
	b, err := files.ReadFile(name + ".toml")
	return b, err == nil
}

// Names lists the shipped rule sets.
func Names() []string { return []string{"default", "strict"} }
