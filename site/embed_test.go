package site

import (
	"io/fs"
	"slices"
	"strings"
	"testing"
)

func TestFiles(t *testing.T) {
	f := Files()
	for _, name := range []string{"index.html", "style.css", "app.js", "api.js", "worker.js", "sw.js", "manifest.webmanifest", "icons/icon.svg"} {
		data, err := fs.ReadFile(f, name)
		if err != nil || len(data) == 0 {
			t.Errorf("%s: %v (%d bytes)", name, err, len(data))
		}
	}
	// The files are rooted at the app's folder: no "static/" prefix and nothing from beside it.
	for _, name := range []string{"static/index.html", "embed.go", "README.md"} {
		if _, err := fs.Stat(f, name); err == nil {
			t.Errorf("%s is among the app's files", name)
		}
	}
	if !slices.Equal(Built, []string{"main.wasm", "wasm_exec.js", "version.js"}) {
		t.Errorf("Built = %v", Built)
	}
	index, _ := fs.ReadFile(f, "index.html")
	for _, b := range Built[1:] { // the page loads the built scripts by these names
		if !strings.Contains(string(index), `src="`+b+`"`) {
			t.Errorf("index.html does not load %s", b)
		}
	}
}
