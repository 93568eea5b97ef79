package main

import (
	"bytes"
	"compress/gzip"
	"context"
	"errors"
	"flag"
	"io"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"testing/fstest"
	"time"

	"sizebudget/site"
)

// fakeEngine stands in for a built engine: a WebAssembly header (the magic number and version 1 of
// the binary format, W3C WebAssembly Core Specification §5.5.16) and a script.
func fakeEngine() fstest.MapFS {
	return fstest.MapFS{
		"main.wasm":    {Data: append([]byte("\x00asm\x01\x00\x00\x00"), bytes.Repeat([]byte{0}, 4096)...)},
		"wasm_exec.js": {Data: []byte("\"use strict\";\n// stand-in for the toolchain's wasm_exec.js\n" + strings.Repeat("//\n", 300))},
	}
}

func newTestApp(t *testing.T) *siteApp {
	t.Helper()
	app, err := newSiteApp(site.Files(), fakeEngine())
	if err != nil {
		t.Fatal(err)
	}
	return app
}

func get(t *testing.T, srv *httptest.Server, path string, header ...string) *http.Response {
	t.Helper()
	req, err := http.NewRequest(http.MethodGet, srv.URL+path, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i+1 < len(header); i += 2 {
		req.Header.Set(header[i], header[i+1])
	}
	tr := &http.Transport{DisableCompression: true}
	resp, err := (&http.Client{Transport: tr}).Do(req)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { resp.Body.Close() })
	return resp
}

func TestServeFiles(t *testing.T) {
	srv := httptest.NewServer(newTestApp(t))
	defer srv.Close()
	for _, tc := range []struct{ path, ctype string }{
		{"/", "text/html; charset=utf-8"},
		{"/index.html", "text/html; charset=utf-8"},
		{"/main.wasm", "application/wasm"}, // WebAssembly.compileStreaming refuses any other type
		{"/app.js", "text/javascript; charset=utf-8"},
		{"/sw.js", "text/javascript; charset=utf-8"},
		{"/style.css", "text/css; charset=utf-8"},
		{"/manifest.webmanifest", "application/manifest+json"},
		{"/icons/icon.svg", "image/svg+xml"},
		{"/icons/icon-192.png", "image/png"},
	} {
		resp := get(t, srv, tc.path)
		if resp.StatusCode != http.StatusOK {
			t.Errorf("GET %s: %s", tc.path, resp.Status)
			continue
		}
		if got := resp.Header.Get("Content-Type"); got != tc.ctype {
			t.Errorf("GET %s: Content-Type %q, want %q", tc.path, got, tc.ctype)
		}
		csp := resp.Header.Get("Content-Security-Policy")
		for _, want := range []string{"default-src 'none'", "script-src 'self' 'wasm-unsafe-eval'", "connect-src 'self'", "frame-ancestors 'none'"} {
			if !strings.Contains(csp, want) {
				t.Errorf("GET %s: CSP %q lacks %q", tc.path, csp, want)
			}
		}
		if strings.Contains(csp, "unsafe-inline") || strings.Contains(csp, "'unsafe-eval'") {
			t.Errorf("GET %s: CSP allows inline code or eval: %q", tc.path, csp)
		}
		if resp.Header.Get("X-Content-Type-Options") != "nosniff" || resp.Header.Get("ETag") == "" {
			t.Errorf("GET %s: headers %v", tc.path, resp.Header)
		}
	}
	for _, path := range []string{"/nope.js", "/../go.mod", "/static/index.html", "/%2e%2e/go.mod"} {
		if resp := get(t, srv, path); resp.StatusCode != http.StatusNotFound {
			t.Errorf("GET %s: %s, want 404", path, resp.Status)
		}
	}
	resp, err := http.Post(srv.URL+"/", "text/plain", strings.NewReader("x"))
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusMethodNotAllowed {
		t.Errorf("POST /: %s, want 405", resp.Status)
	}
}

func TestServeGzipAndETag(t *testing.T) {
	app := newTestApp(t)
	srv := httptest.NewServer(app)
	defer srv.Close()
	plain := get(t, srv, "/main.wasm")
	raw, _ := io.ReadAll(plain.Body)
	zipped := get(t, srv, "/main.wasm", "Accept-Encoding", "gzip, br")
	if zipped.Header.Get("Content-Encoding") != "gzip" {
		t.Fatalf("no gzip variant: %v", zipped.Header)
	}
	zr, err := gzip.NewReader(zipped.Body)
	if err != nil {
		t.Fatal(err)
	}
	unzipped, _ := io.ReadAll(zr)
	if !bytes.Equal(raw, unzipped) {
		t.Error("the gzip variant does not decompress to the file")
	}
	if plain.Header.Get("ETag") == zipped.Header.Get("ETag") {
		t.Error("the gzip variant has the ETag of the plain file")
	}
	again := get(t, srv, "/main.wasm", "If-None-Match", plain.Header.Get("ETag"))
	if again.StatusCode != http.StatusNotModified {
		t.Errorf("If-None-Match: %s, want 304", again.Status)
	}
	if r, g := app.Size("main.wasm"); r != len(raw) || g == 0 || g >= r {
		t.Errorf("Size(main.wasm) = %d, %d", r, g)
	}
}

// TestServeVersion checks that version.js names a hash of the files, so that any change of the app
// gives the service worker a new cache name.
func TestServeVersion(t *testing.T) {
	a := newTestApp(t)
	srv := httptest.NewServer(a)
	defer srv.Close()
	body, _ := io.ReadAll(get(t, srv, "/version.js").Body)
	if want := `self.SIZEBUDGET_VERSION = "` + a.Version() + `";`; strings.TrimSpace(string(body)) != want {
		t.Errorf("version.js = %q, want %q", body, want)
	}
	if !regexp.MustCompile(`^[0-9a-f]{12}$`).MatchString(a.Version()) {
		t.Errorf("version %q is not 12 hex digits", a.Version())
	}
	eng := fakeEngine()
	eng["main.wasm"].Data[len(eng["main.wasm"].Data)-1] = 1
	b, err := newSiteApp(site.Files(), eng)
	if err != nil {
		t.Fatal(err)
	}
	if a.Version() == b.Version() {
		t.Error("a changed engine kept the version")
	}
	again, _ := newSiteApp(site.Files(), fakeEngine())
	if again.Version() != a.Version() {
		t.Error("the version is not a function of the files")
	}
}

// TestServeCacheList checks that every file the service worker caches is served, and that every
// script, style sheet, icon and the manifest the page names is in the cache list: otherwise the app
// would not start offline.
func TestServeCacheList(t *testing.T) {
	srv := httptest.NewServer(newTestApp(t))
	defer srv.Close()
	sw, _ := io.ReadAll(get(t, srv, "/sw.js").Body)
	m := regexp.MustCompile(`(?s)const FILES = \[(.*?)\];`).FindSubmatch(sw)
	if m == nil {
		t.Fatal("sw.js has no FILES list")
	}
	cached := map[string]bool{}
	for _, q := range regexp.MustCompile(`'([^']+)'`).FindAllSubmatch(m[1], -1) {
		name := string(q[1])
		cached[name] = true
		if resp := get(t, srv, "/"+strings.TrimPrefix(name, "./")); resp.StatusCode != http.StatusOK {
			t.Errorf("the service worker caches %s, which is %s", name, resp.Status)
		}
	}
	index, _ := io.ReadAll(get(t, srv, "/").Body)
	var named []string
	for _, q := range regexp.MustCompile(`(?:src|href)="([^"#:]+)"`).FindAllSubmatch(index, -1) {
		named = append(named, string(q[1]))
	}
	manifest, _ := io.ReadAll(get(t, srv, "/manifest.webmanifest").Body)
	for _, q := range regexp.MustCompile(`"src": "([^"]+)"`).FindAllSubmatch(manifest, -1) {
		named = append(named, string(q[1]))
	}
	files, _ := filepath.Glob(filepath.Join("..", "..", "site", "static", "*.js"))
	for _, f := range files {
		if b := filepath.Base(f); b != "sw.js" {
			named = append(named, b)
		}
	}
	named = append(named, "main.wasm", "wasm_exec.js", "version.js")
	if len(named) < 10 {
		t.Fatalf("found only %v", named)
	}
	for _, n := range named {
		if !cached[n] {
			t.Errorf("%s is used by the app but not cached by the service worker", n)
		}
	}
}

func TestServeIndexHasNoInlineCode(t *testing.T) {
	data, err := readStatic("index.html")
	if err != nil {
		t.Fatal(err)
	}
	for _, bad := range []*regexp.Regexp{
		regexp.MustCompile(`<script(?:\s[^>]*)?>\s*[^<\s]`), // a script element with a body
		regexp.MustCompile(`\sstyle="`),
		regexp.MustCompile(`\son[a-z]+="`),
		regexp.MustCompile(`https?://`),
	} {
		if loc := bad.FindIndex(data); loc != nil {
			t.Errorf("index.html has %q (%s): the CSP forbids inline code and the app loads nothing from elsewhere", data[loc[0]:loc[1]], bad)
		}
	}
}

func readStatic(name string) ([]byte, error) {
	return os.ReadFile(filepath.Join("..", "..", "site", "static", name))
}

func TestServeEngineMissing(t *testing.T) {
	if _, err := newSiteApp(site.Files(), fstest.MapFS{"main.wasm": {Data: []byte("\x00asm\x01\x00\x00\x00")}}); err == nil {
		t.Error("an engine without wasm_exec.js was accepted")
	}
	if _, err := newSiteApp(site.Files(), fstest.MapFS{"main.wasm": {Data: []byte("MZ")}, "wasm_exec.js": {Data: []byte("x")}}); err == nil {
		t.Error("a main.wasm that is not WebAssembly was accepted")
	}
}

func TestServeRun(t *testing.T) {
	dir := t.TempDir()
	for name, f := range fakeEngine() {
		if err := os.WriteFile(filepath.Join(dir, name), f.Data, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	eng, err := findEngine(dir, false, io.Discard)
	if err != nil {
		t.Fatal(err)
	}
	app, err := newSiteApp(site.Files(), eng)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	var out syncBuffer
	done := make(chan error, 1)
	go func() { done <- serveApp(ctx, "127.0.0.1:0", app, &out) }()
	var addr string
	for deadline := time.Now().Add(5 * time.Second); time.Now().Before(deadline); time.Sleep(10 * time.Millisecond) {
		if m := regexp.MustCompile(`http://(127\.0\.0\.1:\d+)/`).FindStringSubmatch(out.String()); m != nil {
			addr = m[1]
			break
		}
	}
	if addr == "" {
		t.Fatalf("no address printed: %q", out.String())
	}
	resp, err := http.Get("http://" + addr + "/")
	if err != nil {
		t.Fatal(err)
	}
	resp.Body.Close()
	if resp.StatusCode != http.StatusOK {
		t.Errorf("GET /: %s", resp.Status)
	}
	cancel()
	if err := <-done; err != nil {
		t.Errorf("serve after cancel: %v", err)
	}
	if strings.Contains(out.String(), "reachable from other machines") {
		t.Error("a loopback address was reported as reachable from other machines")
	}
}

func TestServeUsage(t *testing.T) {
	for _, args := range [][]string{
		{"-addr", "no-port"},
		{"-engine", "x", "-rebuild"},
		{"-bogus"},
		{"stray"},
	} {
		var stderr bytes.Buffer
		err := runServe(args, io.Discard, &stderr)
		var ue *usageError
		if !errors.As(err, &ue) {
			t.Errorf("serve %v: err = %v, want a usage error", args, err)
		}
	}
	var stderr bytes.Buffer
	if err := runServe([]string{"-h"}, io.Discard, &stderr); !errors.Is(err, flag.ErrHelp) || !strings.Contains(stderr.String(), "-addr") {
		t.Errorf("serve -h: err = %v, usage %q", err, stderr.String())
	}
	if status := runMain([]string{"serve", "-addr", "x"}, io.Discard, io.Discard); status != 2 {
		t.Errorf("exit status %d for a bad -addr, want 2", status)
	}
}

// TestEngineSourceKey checks that the cache key of the engine follows the source: the same files
// give the same key, a changed file or toolchain another.
func TestEngineSourceKey(t *testing.T) {
	root := t.TempDir()
	write := func(name, body string) {
		p := filepath.Join(root, filepath.FromSlash(name))
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write("go.mod", "module sizebudget\n")
	write("wasm/main.go", "package main\n")
	files := []string{"go.mod", "go.sum", "wasm/main.go"}
	k1, err := sourceKey(root, files, "go1.26.8")
	if err != nil {
		t.Fatal(err)
	}
	if k2, _ := sourceKey(root, files, "go1.26.8"); k2 != k1 {
		t.Error("the key is not a function of the files")
	}
	if k3, _ := sourceKey(root, files, "go1.27"); k3 == k1 {
		t.Error("another toolchain kept the key")
	}
	write("wasm/main.go", "package main // changed\n")
	if k4, _ := sourceKey(root, files, "go1.26.8"); k4 == k1 {
		t.Error("a changed file kept the key")
	}
	if modulePath([]byte("// c\nmodule sizebudget\n\ngo 1.26\n")) != "sizebudget" || modulePath([]byte("module other\n")) != "other" {
		t.Error("modulePath")
	}
}

// TestEngineSources lists the files of the real engine build: its own package, the engine and the
// chart package, never a test file.
func TestEngineSources(t *testing.T) {
	root, err := moduleRoot()
	if err != nil {
		t.Fatal(err)
	}
	files, v, err := engineSources(root)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(v, "go") {
		t.Errorf("toolchain version %q", v)
	}
	has := func(prefix string) bool {
		for _, f := range files {
			if strings.HasPrefix(f, prefix) {
				return true
			}
		}
		return false
	}
	for _, p := range []string{"wasm/main.go", "wasm/store/", "uncertainty/", "core/", "chart/", "go.mod"} {
		if !has(p) {
			t.Errorf("the engine's sources lack %s", p)
		}
	}
	for _, f := range files {
		if strings.HasSuffix(f, "_test.go") || strings.HasPrefix(f, "cmd/") {
			t.Errorf("the engine's sources include %s", f)
		}
	}
}

// syncBuffer is a bytes.Buffer safe for concurrent use.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

func TestPruneEngines(t *testing.T) {
	cache := t.TempDir()
	now := time.Now()
	for i, name := range []string{"engine-a", "engine-b", "engine-c", "engine-d", ".build-x", "other"} {
		p := filepath.Join(cache, name)
		if err := os.Mkdir(p, 0o755); err != nil {
			t.Fatal(err)
		}
		mod := now.Add(time.Duration(i) * time.Minute) // engine-d is the newest engine
		if err := os.Chtimes(p, mod, mod); err != nil {
			t.Fatal(err)
		}
	}
	pruneEngines(cache, 2)
	entries, _ := os.ReadDir(cache)
	var left []string
	for _, e := range entries {
		left = append(left, e.Name())
	}
	if want := []string{".build-x", "engine-c", "engine-d", "other"}; strings.Join(left, " ") != strings.Join(want, " ") {
		t.Errorf("after pruning to 2: %v, want %v", left, want)
	}
}
