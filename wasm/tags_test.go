package main

import (
	"go/build/constraint"
	"go/parser"
	"go/token"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestBuildTags checks that every other Go file of this package is built only for js && wasm, as
// the JavaScript boundary must be (DESIGN.md, "Style models": go-indexeddb's habit).
func TestBuildTags(t *testing.T) {
	files, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 2 {
		t.Fatalf("found %d Go files; the package has gone missing", len(files))
	}
	want := "js && wasm"
	for _, name := range files {
		if name == "tags_test.go" {
			continue // this file runs natively
		}
		expr, err := buildConstraint(name)
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if expr == nil || expr.String() != want {
			t.Errorf("%s: build constraint %v, want //go:build %s", name, expr, want)
		}
	}
}

// TestStoreIsPure checks that the session logic in wasm/store stays free of syscall/js, so that its
// tests run natively.
func TestStoreIsPure(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("store", "*.go"))
	if err != nil {
		t.Fatal(err)
	}
	if len(files) == 0 {
		t.Fatal("no Go files in wasm/store")
	}
	fset := token.NewFileSet()
	for _, name := range files {
		f, err := parser.ParseFile(fset, name, nil, parser.ImportsOnly)
		if err != nil {
			t.Fatal(err)
		}
		for _, imp := range f.Imports {
			if p, _ := strconv.Unquote(imp.Path.Value); p == "syscall/js" || strings.HasPrefix(p, "github.com/hack-pad/") {
				t.Errorf("%s imports %s; the store package must build natively", name, p)
			}
		}
		if expr, err := buildConstraint(name); err != nil || expr != nil {
			t.Errorf("%s: build constraint %v (%v); the store package has none", name, expr, err)
		}
	}
}

// buildConstraint returns the //go:build expression of a file (nil if it has none), read from the
// comment lines before the package clause.
func buildConstraint(name string) (constraint.Expr, error) {
	data, err := os.ReadFile(name)
	if err != nil {
		return nil, err
	}
	for _, line := range strings.Split(string(data), "\n") {
		line = strings.TrimSpace(line)
		if line == "" || strings.HasPrefix(line, "//") && !constraint.IsGoBuild(line) {
			continue
		}
		if constraint.IsGoBuild(line) {
			return constraint.Parse(line)
		}
		break // the package clause or other code: no constraint
	}
	return nil, nil
}
