package scripts

import (
	"embed"
	"io/fs"
)

//go:embed rules/*.lua
var shipped embed.FS

// Shipped is the folder of rules that ship with pitcard (rules/*.lua), which
// `pitcard init` copies into a new event folder.
func Shipped() fs.FS { return shipped }
