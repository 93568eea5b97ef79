package main

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"maps"
	"mime"
	"net"
	"net/http"
	"os"
	"os/exec"
	"os/signal"
	"path"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"time"

	"sizebudget/site"
)

const serveAbout = `Serve runs the browser app on this machine: the settings form, the results with their charts, the
review check and the saved sessions, computed by the same engine as the command line, compiled to
WebAssembly and run in the browser's Web Workers. Open the printed address in a browser; after the
first visit the app also starts with the server stopped and no network (it installs itself with a
service worker), and it can be added to a tablet's home screen.

The engine (main.wasm, and wasm_exec.js from the Go toolchain) is taken from -engine DIR if given;
otherwise, in a clone of the source, it is built with the local Go toolchain the first time and after
every change of the source (the build is cached under the user cache folder, keyed by a hash of the
source); otherwise it is the one embedded at build time by scripts/build-wasm.

The app sends nothing anywhere: every response carries a strict Content-Security-Policy that allows
this origin only. Keep -addr on 127.0.0.1 (or localhost): browsers allow the offline mode only on a
secure origin, and a loopback address is one.`

// runServe is the serve subcommand.
func runServe(args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("serve", "[-addr host:port] [-engine DIR] [-rebuild]", serveAbout, stderr)
	addr := fs.String("addr", "127.0.0.1:8080", "`host:port` to listen on")
	engine := fs.String("engine", "", "`folder` holding a built main.wasm and wasm_exec.js to serve (default: build or cache)")
	rebuild := fs.Bool("rebuild", false, "rebuild the engine even if a build of the current source is cached")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if *engine != "" && *rebuild {
		return usagef(fs, "-engine and -rebuild exclude each other")
	}
	if _, _, err := net.SplitHostPort(*addr); err != nil {
		return usagef(fs, "-addr %q is not host:port: %v", *addr, err)
	}
	eng, err := findEngine(*engine, *rebuild, stdout)
	if err != nil {
		return err
	}
	app, err := newSiteApp(site.Files(), eng)
	if err != nil {
		return err
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	return serveApp(ctx, *addr, app, stdout)
}

// serveApp listens on addr and serves app until ctx is done; it prints the address to open.
func serveApp(ctx context.Context, addr string, app http.Handler, stdout io.Writer) error {
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		return fmt.Errorf("serve: %w", err)
	}
	host, _, _ := net.SplitHostPort(ln.Addr().String())
	fmt.Fprintf(stdout, "sizebudget: the app is at http://%s/ (Ctrl-C stops the server)\n", ln.Addr())
	if ip := net.ParseIP(host); ip == nil || !ip.IsLoopback() {
		fmt.Fprintln(stdout, "sizebudget: note: this address is reachable from other machines, and browsers there will not enable the offline mode (it needs https or a loopback address)")
	}
	srv := &http.Server{Handler: app, ReadHeaderTimeout: 10 * time.Second}
	done := make(chan struct{})
	go func() {
		defer close(done)
		<-ctx.Done()
		sctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		_ = srv.Shutdown(sctx)
	}()
	err = srv.Serve(ln)
	if errors.Is(err, http.ErrServerClosed) {
		<-done
		return nil
	}
	return fmt.Errorf("serve: %w", err)
}

// contentSecurityPolicy allows this origin only: scripts from files (no inline script, no eval;
// 'wasm-unsafe-eval' lets WebAssembly compile), styles from files (the page sets no style attribute),
// workers and the service worker from this origin, charts inline as SVG elements, downloads as blobs.
const contentSecurityPolicy = "default-src 'none'; script-src 'self' 'wasm-unsafe-eval'; style-src 'self'; " +
	"img-src 'self' data: blob:; connect-src 'self'; worker-src 'self'; manifest-src 'self'; " +
	"form-action 'none'; base-uri 'none'; frame-ancestors 'none'"

// siteApp serves the app's files from memory, each with its type, an ETag, a gzip variant and the
// security headers. version.js is generated: it names the build, a hash of every other file, so
// that the service worker's cache name changes with any change of the app.
type siteApp struct {
	files   map[string]*siteFile // by path without the leading slash
	version string
}

type siteFile struct {
	body, gz []byte
	ctype    string
	etag     string
}

// newSiteApp assembles the app from the static files (site.Files) and the engine folder, which must
// hold main.wasm and wasm_exec.js. Built files found among the static files are ignored in favour of
// the engine's.
func newSiteApp(static, engine fs.FS) (*siteApp, error) {
	app := &siteApp{files: map[string]*siteFile{}}
	err := fs.WalkDir(static, ".", func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() || slices.Contains(site.Built, p) {
			return err
		}
		body, err := fs.ReadFile(static, p)
		if err != nil {
			return err
		}
		app.files[p] = &siteFile{body: body}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("serve: reading the site: %w", err)
	}
	if app.files["index.html"] == nil {
		return nil, errors.New("serve: the site has no index.html")
	}
	for _, name := range []string{"main.wasm", "wasm_exec.js"} {
		body, err := fs.ReadFile(engine, name)
		if err != nil {
			return nil, fmt.Errorf("serve: the engine is incomplete: %w", err)
		}
		app.files[name] = &siteFile{body: body}
	}
	if !bytes.HasPrefix(app.files["main.wasm"].body, []byte("\x00asm")) {
		return nil, errors.New("serve: main.wasm is not a WebAssembly module")
	}
	if icon := app.files["icons/icon-192.png"]; icon != nil && app.files["favicon.ico"] == nil {
		app.files["favicon.ico"] = &siteFile{body: icon.body} // browsers ask for it outside the page too; PNG is accepted
	}
	h := sha256.New()
	for _, name := range slices.Sorted(maps.Keys(app.files)) {
		fmt.Fprintf(h, "%s\x00%d\x00", name, len(app.files[name].body))
		h.Write(app.files[name].body)
	}
	app.version = hex.EncodeToString(h.Sum(nil))[:12]
	app.files["version.js"] = &siteFile{body: fmt.Appendf(nil, "self.SIZEBUDGET_VERSION = %q;\n", app.version)}
	for name, f := range app.files {
		sum := sha256.Sum256(f.body)
		f.etag = `"` + hex.EncodeToString(sum[:8]) + `"`
		f.ctype = contentType(name)
		if compressible(f.ctype) && len(f.body) > 512 {
			var b bytes.Buffer
			zw, _ := gzip.NewWriterLevel(&b, gzip.BestCompression)
			zw.Write(f.body)
			zw.Close()
			f.gz = b.Bytes()
		}
	}
	return app, nil
}

func contentType(name string) string {
	switch path.Ext(name) {
	case ".ico":
		return "image/png"
	case ".wasm":
		return "application/wasm"
	case ".webmanifest":
		return "application/manifest+json"
	case ".js":
		return "text/javascript; charset=utf-8"
	case ".svg":
		return "image/svg+xml"
	}
	if t := mime.TypeByExtension(path.Ext(name)); t != "" {
		return t
	}
	return "application/octet-stream"
}

func compressible(ctype string) bool {
	return !strings.HasPrefix(ctype, "image/png")
}

// Version returns the build version of the app (the hash in version.js).
func (a *siteApp) Version() string { return a.version }

// Size returns the size of a served file and of its gzip variant (0 if none), in bytes.
func (a *siteApp) Size(name string) (raw, gz int) {
	f := a.files[name]
	if f == nil {
		return 0, 0
	}
	return len(f.body), len(f.gz)
}

func (a *siteApp) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	hd := w.Header()
	hd.Set("Content-Security-Policy", contentSecurityPolicy)
	hd.Set("X-Content-Type-Options", "nosniff")
	hd.Set("Referrer-Policy", "no-referrer")
	hd.Set("Cross-Origin-Opener-Policy", "same-origin")
	hd.Set("Cross-Origin-Resource-Policy", "same-origin")
	hd.Set("Permissions-Policy", "camera=(), microphone=(), geolocation=()")
	if r.Method != http.MethodGet && r.Method != http.MethodHead {
		hd.Set("Allow", "GET, HEAD")
		http.Error(w, "method not allowed", http.StatusMethodNotAllowed)
		return
	}
	name := strings.TrimPrefix(path.Clean("/"+r.URL.Path), "/")
	if name == "" {
		name = "index.html"
	}
	f := a.files[name]
	if f == nil {
		http.NotFound(w, r)
		return
	}
	hd.Set("Content-Type", f.ctype)
	hd.Set("Cache-Control", "no-cache")
	hd.Add("Vary", "Accept-Encoding")
	body, etag := f.body, f.etag
	if f.gz != nil && r.Header.Get("Range") == "" && acceptsGzip(r) {
		body, etag = f.gz, strings.TrimSuffix(f.etag, `"`)+`-gz"`
		hd.Set("Content-Encoding", "gzip")
	}
	hd.Set("ETag", etag)
	http.ServeContent(w, r, name, time.Time{}, bytes.NewReader(body))
}

func acceptsGzip(r *http.Request) bool {
	for _, part := range strings.Split(r.Header.Get("Accept-Encoding"), ",") {
		enc, q, _ := strings.Cut(strings.TrimSpace(part), ";")
		if strings.TrimSpace(enc) == "gzip" && strings.TrimSpace(q) != "q=0" {
			return true
		}
	}
	return false
}

// ---- the engine ---------------------------------------------------------------------------------

// findEngine returns the folder with main.wasm and wasm_exec.js: dir if given; else, in a clone of
// the source, the cached build of the current source (built now if missing, or if rebuild); else the
// engine embedded in the site.
func findEngine(dir string, rebuild bool, log io.Writer) (fs.FS, error) {
	if dir != "" {
		return os.DirFS(dir), nil
	}
	static := site.Files()
	_, embedErr := fs.Stat(static, "main.wasm")
	if root, err := moduleRoot(); err == nil {
		built, err := cachedEngine(root, rebuild, log)
		if err == nil {
			return os.DirFS(built), nil
		}
		if embedErr != nil || rebuild {
			return nil, err
		}
		fmt.Fprintf(log, "sizebudget: %v\nsizebudget: serving the engine built into this program instead\n", err)
	}
	if embedErr == nil {
		return static, nil
	}
	return nil, errors.New("serve: the WebAssembly engine is not built into this program and no source is at hand: " +
		"run it from a clone of the source (it builds the engine), or run scripts/build-wasm there before go build, or give -engine DIR")
}

// moduleRoot returns the root of the sizebudget source tree that holds the working directory.
func moduleRoot() (string, error) {
	dir, err := os.Getwd()
	if err != nil {
		return "", err
	}
	for {
		data, err := os.ReadFile(filepath.Join(dir, "go.mod"))
		if err == nil {
			if modulePath(data) == "sizebudget" {
				if _, err := os.Stat(filepath.Join(dir, "wasm")); err == nil {
					return dir, nil
				}
			}
			return "", fmt.Errorf("serve: %s is not the sizebudget source", dir)
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return "", errors.New("serve: not inside the sizebudget source")
		}
		dir = parent
	}
}

func modulePath(gomod []byte) string {
	sc := bufio.NewScanner(bytes.NewReader(gomod))
	for sc.Scan() {
		if f := strings.Fields(sc.Text()); len(f) == 2 && f[0] == "module" {
			return strings.Trim(f[1], `"`)
		}
	}
	return ""
}

// engineSources lists the files that the WebAssembly build of ./wasm reads from the source tree (the
// Go files of every package it imports from the module, and go.mod and go.sum), as paths relative to
// root, sorted; and the toolchain version.
func engineSources(root string) (files []string, goVersion string, err error) {
	cmd := exec.Command("go", "list", "-deps", "-f", "{{if not .Standard}}{{.Dir}}{{range .GoFiles}} {{.}}{{end}}{{range .EmbedFiles}} {{.}}{{end}}{{end}}", "./wasm")
	cmd.Dir = root
	cmd.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		return nil, "", fmt.Errorf("serve: listing the engine's source: %v: %s", err, strings.TrimSpace(stderr.String()))
	}
	for _, line := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		f := strings.Fields(line)
		if len(f) == 0 {
			continue
		}
		rel, err := filepath.Rel(root, f[0])
		if err != nil || strings.HasPrefix(rel, "..") {
			continue // a dependency outside the tree: pinned by go.sum
		}
		for _, name := range f[1:] {
			files = append(files, filepath.ToSlash(filepath.Join(rel, name)))
		}
	}
	files = append(files, "go.mod", "go.sum")
	slices.Sort(files)
	v, err := exec.Command("go", "env", "GOVERSION").Output()
	if err != nil {
		return nil, "", fmt.Errorf("serve: go env GOVERSION: %v", err)
	}
	return files, strings.TrimSpace(string(v)), nil
}

// sourceKey hashes the named files under root with the toolchain version.
func sourceKey(root string, files []string, goVersion string) (string, error) {
	h := sha256.New()
	fmt.Fprintf(h, "%s\x00", goVersion)
	for _, name := range files {
		data, err := os.ReadFile(filepath.Join(root, filepath.FromSlash(name)))
		if err != nil && !(errors.Is(err, fs.ErrNotExist) && name == "go.sum") {
			return "", err
		}
		fmt.Fprintf(h, "%s\x00%d\x00", name, len(data))
		h.Write(data)
	}
	return hex.EncodeToString(h.Sum(nil))[:16], nil
}

// cachedEngine returns the cache folder with the engine built from the source at root, building it
// first when it is missing or rebuild is set.
func cachedEngine(root string, rebuild bool, log io.Writer) (string, error) {
	files, goVersion, err := engineSources(root)
	if err != nil {
		return "", err
	}
	key, err := sourceKey(root, files, goVersion)
	if err != nil {
		return "", err
	}
	cache, err := os.UserCacheDir()
	if err != nil || os.MkdirAll(filepath.Join(cache, "sizebudget"), 0o755) != nil {
		cache = os.TempDir()
	}
	dir := filepath.Join(cache, "sizebudget", "engine-"+key)
	if !rebuild {
		if _, err := os.Stat(filepath.Join(dir, "main.wasm")); err == nil {
			if _, err := os.Stat(filepath.Join(dir, "wasm_exec.js")); err == nil {
				return dir, nil
			}
		}
	}
	fmt.Fprintf(log, "sizebudget: building the WebAssembly engine with %s (once per change of the source; about a minute)…\n", goVersion)
	start := time.Now()
	if err := buildEngine(root, dir); err != nil {
		return "", err
	}
	st, _ := os.Stat(filepath.Join(dir, "main.wasm"))
	fmt.Fprintf(log, "sizebudget: built main.wasm (%.1f MB) in %.0f s, cached in %s\n", float64(st.Size())/1e6, time.Since(start).Seconds(), dir)
	pruneEngines(filepath.Dir(dir), keptEngines)
	return dir, nil
}

// keptEngines is how many cached engine builds pruneEngines keeps (each is about 5 MB).
const keptEngines = 4

// pruneEngines removes all but the keep most recently built engine-* folders of the cache folder.
func pruneEngines(cache string, keep int) {
	entries, err := os.ReadDir(cache)
	if err != nil {
		return
	}
	type build struct {
		path string
		mod  time.Time
	}
	var builds []build
	for _, e := range entries {
		if !e.IsDir() || !strings.HasPrefix(e.Name(), "engine-") {
			continue
		}
		if info, err := e.Info(); err == nil {
			builds = append(builds, build{filepath.Join(cache, e.Name()), info.ModTime()})
		}
	}
	slices.SortFunc(builds, func(a, b build) int { return b.mod.Compare(a.mod) })
	for _, b := range builds[min(keep, len(builds)):] {
		os.RemoveAll(b.path)
	}
}

// buildEngine builds ./wasm for js/wasm into dir/main.wasm and copies the toolchain's wasm_exec.js
// beside it. It builds into a fresh folder and renames it, so a cache folder is complete or absent.
func buildEngine(root, dir string) error {
	if err := os.MkdirAll(filepath.Dir(dir), 0o755); err != nil {
		return err
	}
	tmp, err := os.MkdirTemp(filepath.Dir(dir), ".build-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp)
	cmd := exec.Command("go", "build", "-trimpath", "-ldflags=-s -w", "-o", filepath.Join(tmp, "main.wasm"), "./wasm")
	cmd.Dir = root
	cmd.Env = append(os.Environ(), "GOOS=js", "GOARCH=wasm")
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Run(); err != nil {
		return fmt.Errorf("serve: building the engine failed: %v\n%s", err, strings.TrimSpace(out.String()))
	}
	goroot, err := exec.Command("go", "env", "GOROOT").Output()
	if err != nil {
		return fmt.Errorf("serve: go env GOROOT: %v", err)
	}
	gr := strings.TrimSpace(string(goroot))
	var execJS []byte
	for _, p := range []string{filepath.Join(gr, "lib", "wasm", "wasm_exec.js"), filepath.Join(gr, "misc", "wasm", "wasm_exec.js")} {
		if execJS, err = os.ReadFile(p); err == nil {
			break
		}
	}
	if err != nil {
		return fmt.Errorf("serve: wasm_exec.js not found in %s: %v", gr, err)
	}
	if err := os.WriteFile(filepath.Join(tmp, "wasm_exec.js"), execJS, 0o644); err != nil {
		return err
	}
	if err := os.RemoveAll(dir); err != nil {
		return err
	}
	if err := os.Rename(tmp, dir); err != nil {
		// Another serve may have finished the same build meanwhile: its folder is complete.
		if _, serr := os.Stat(filepath.Join(dir, "wasm_exec.js")); serr == nil {
			return nil
		}
		return err
	}
	return nil
}
