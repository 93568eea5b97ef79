// Package site holds the static files of the browser app (HTML, CSS, ES-module JavaScript, the
// worker and service-worker scripts, the web manifest and the icons) for the serve command.
//
// The built files — main.wasm, wasm_exec.js (copied from $(go env GOROOT)/lib/wasm) and version.js —
// are written into static/ by scripts/build-wasm and are not committed; the embed pattern below
// compiles without them because static/ always holds the committed files.
package site

import (
	"embed"
	"io/fs"
)

//go:embed all:static
var files embed.FS

// Files returns the app's files, rooted at the folder that holds index.html.
func Files() fs.FS {
	sub, err := fs.Sub(files, "static")
	if err != nil {
		panic("site: " + err.Error()) // cannot happen: the directory is embedded
	}
	return sub
}

// Built lists the files that are built rather than committed, relative to Files.
var Built = []string{"main.wasm", "wasm_exec.js", "version.js"}
