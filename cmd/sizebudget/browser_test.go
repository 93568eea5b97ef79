package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"net"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"sizebudget/site"
	"sizebudget/uncertainty"
)

// The browser tests drive the app in headless Chromium (Debian's chromium package) against the serve
// handler on 127.0.0.1. Without a browser they skip, unless CI=true, where a missing browser fails.
// -screens writes the screenshots of docs/screens.
var writeScreens = flag.Bool("screens", false, "write the browser app's screenshots to docs/screens")

// cspProbe runs in every document before the page's own scripts (DevTools injects it, so the page's
// CSP does not apply to it) and counts Content-Security-Policy violations.
const cspProbe = `window.__csp = [];
document.addEventListener('securitypolicyviolation', (e) => window.__csp.push(e.violatedDirective + ' ' + e.blockedURI));`

func findChrome(t testing.TB) string {
	t.Helper()
	for _, name := range []string{os.Getenv("SIZEBUDGET_CHROME"), "chromium", "chromium-browser", "google-chrome"} {
		if name == "" {
			continue
		}
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	if os.Getenv("CI") == "true" {
		t.Fatal("no Chromium found (install Debian's chromium package); with CI=true the browser tests must run")
	}
	t.Skip("no Chromium found; install Debian's chromium package to run the browser tests")
	return ""
}

// appServer is the app served on a fixed loopback address that can be stopped and started again
// (the service worker is bound to the origin, so the port must stay).
type appServer struct {
	app  *siteApp
	addr string
	srv  *http.Server
	done chan struct{}
}

func (s *appServer) start(t testing.TB) {
	t.Helper()
	addr := s.addr
	if addr == "" {
		addr = "127.0.0.1:0"
	}
	var ln net.Listener
	var err error
	for range 50 { // the port of a stopped server may need a moment
		if ln, err = net.Listen("tcp", addr); err == nil {
			break
		}
		time.Sleep(100 * time.Millisecond)
	}
	if err != nil {
		t.Fatal(err)
	}
	s.addr = ln.Addr().String()
	s.srv = &http.Server{Handler: s.app, ReadHeaderTimeout: 5 * time.Second}
	s.done = make(chan struct{})
	go func() {
		defer close(s.done)
		s.srv.Serve(ln)
	}()
}

func (s *appServer) stop() {
	if s.srv == nil {
		return
	}
	s.srv.Close()
	<-s.done
	s.srv = nil
}

func (s *appServer) url() string { return "http://" + s.addr + "/" }

type logWriter struct{ t testing.TB }

func (w logWriter) Write(p []byte) (int, error) {
	w.t.Log(strings.TrimSpace(string(p)))
	return len(p), nil
}

// browser is one Chromium with its own fresh profile and one tab, recording the console messages and
// the URLs of the requests of the tab.
type browser struct {
	ctx      context.Context
	mu       sync.Mutex
	console  []chromedp.ConsoleMessage
	requests []string
}

func newBrowser(t testing.TB, chrome string, width, height int) *browser {
	t.Helper()
	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(chrome),
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-quic", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(width, height),
	)
	actx, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancel := chromedp.NewContext(actx)
	t.Cleanup(func() {
		cancel()
		cancelAlloc()
	})
	b := &browser{ctx: ctx}
	if err := chromedp.Do(ctx); err != nil {
		t.Fatalf("starting %s: %v", chrome, err)
	}
	msgs := chromedp.Console(ctx)
	reqs := chromedp.Events(ctx, network.RequestWillBeSent)
	go func() {
		for m, err := range msgs {
			if err != nil {
				return
			}
			b.mu.Lock()
			b.console = append(b.console, m)
			b.mu.Unlock()
		}
	}()
	go func() {
		for ev, err := range reqs {
			if err != nil {
				return
			}
			b.mu.Lock()
			b.requests = append(b.requests, ev.Request.URL)
			b.mu.Unlock()
		}
	}()
	if _, err := chromedp.Call(ctx, network.Enable, network.EnableParams{}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(ctx, page.AddScriptToEvaluateOnNewDocument, page.AddScriptToEvaluateOnNewDocumentParams{Source: cspProbe}); err != nil {
		t.Fatal(err)
	}
	return b
}

// do runs actions with a time limit.
func (b *browser) do(t testing.TB, limit time.Duration, actions ...chromedp.Action[chromedp.Void]) {
	t.Helper()
	ctx, cancel := context.WithTimeout(b.ctx, limit)
	defer cancel()
	if err := chromedp.Do(ctx, actions...); err != nil {
		t.Fatal(err)
	}
}

// eval evaluates a JavaScript expression (awaiting a Promise) and decodes its value into T.
func eval[T any](t testing.TB, b *browser, expr string) T {
	t.Helper()
	v, err := evalErr[T](b, expr, 90*time.Second)
	if err != nil {
		t.Fatalf("%s: %v", firstLine(expr), err)
	}
	return v
}

func evalErr[T any](b *browser, expr string, limit time.Duration) (T, error) {
	ctx, cancel := context.WithTimeout(b.ctx, limit)
	defer cancel()
	return chromedp.Run(ctx, chromedp.Evaluate[T](expr, chromedp.EvalAwaitPromise))
}

func firstLine(s string) string {
	s, _, _ = strings.Cut(strings.TrimSpace(s), "\n")
	return s
}

// open loads the app and waits until it is ready.
func (b *browser) open(t testing.TB, u string) {
	t.Helper()
	b.do(t, 30*time.Second, chromedp.Navigate(u))
	b.waitReady(t)
}

func (b *browser) waitReady(t testing.TB) {
	t.Helper()
	ctx, cancel := context.WithTimeout(b.ctx, 60*time.Second)
	defer cancel()
	if _, err := chromedp.Run(ctx, chromedp.Poll[bool](`document.documentElement.dataset.ready === 'true'`,
		chromedp.WithPollingInterval(50*time.Millisecond), chromedp.WithPollingTimeout(60*time.Second))); err != nil {
		status, _ := evalErr[string](b, `document.getElementById('status').textContent`, 5*time.Second)
		t.Fatalf("the app did not get ready (status %q): %v", status, err)
	}
}

// waitFor polls a JavaScript condition.
func (b *browser) waitFor(t testing.TB, cond string, limit time.Duration) {
	t.Helper()
	ctx, cancel := context.WithTimeout(b.ctx, limit+5*time.Second)
	defer cancel()
	if _, err := chromedp.Run(ctx, chromedp.Poll[bool](cond, chromedp.WithPollingInterval(50*time.Millisecond), chromedp.WithPollingTimeout(limit))); err != nil {
		t.Fatalf("waiting for %s: %v", cond, err)
	}
}

// checkClean fails the test for console errors, uncaught exceptions, CSP violations and requests that
// leave the origin, recorded so far.
func (b *browser) checkClean(t *testing.T, origin string) {
	t.Helper()
	b.mu.Lock()
	defer b.mu.Unlock()
	for _, m := range b.console {
		if m.Type == "warning" {
			t.Logf("console warning: %s", m.Text)
		}
		if m.IsException() || m.Type == "error" || m.Type == "assert" {
			t.Errorf("console %s: %s (%s:%d)", m.Type, m.Text, m.URL, m.Line)
		}
	}
	for _, r := range b.requests {
		u, err := url.Parse(r)
		if err != nil || (u.Scheme != "data" && u.Scheme != "blob" && u.Scheme+"://"+u.Host != origin) {
			t.Errorf("a request left the origin %s: %s", origin, r)
		}
	}
	if n, err := evalErr[[]string](b, `window.__csp || []`, 5*time.Second); err != nil || len(n) != 0 {
		t.Errorf("Content-Security-Policy violations: %v (%v)", n, err)
	}
}

// setField sets a settings field as typing would (an input event).
func setField(t *testing.T, b *browser, key, value string) {
	t.Helper()
	eval[bool](t, b, fmt.Sprintf(`(() => { const i = document.getElementById('f-' + %q); i.value = %q;
		i.dispatchEvent(new Event('input', {bubbles: true})); i.dispatchEvent(new Event('change', {bubbles: true})); return true; })()`, key, value))
}

// startBrowserApp finds the browser, builds (or takes from the cache) the engine of the current source
// and serves the app on 127.0.0.1. It returns the browser's path, the server and the source root.
func startBrowserApp(t testing.TB) (string, *appServer, string) {
	chrome := findChrome(t)
	root, err := moduleRoot()
	if err != nil {
		t.Fatal(err)
	}
	dir, err := cachedEngine(root, false, logWriter{t})
	if err != nil {
		t.Fatal(err)
	}
	app, err := newSiteApp(site.Files(), os.DirFS(dir))
	if err != nil {
		t.Fatal(err)
	}
	srv := &appServer{app: app}
	srv.start(t)
	t.Cleanup(srv.stop)
	return chrome, srv, root
}

func TestBrowserApp(t *testing.T) {
	chrome, srv, root := startBrowserApp(t)
	raw, gz := srv.app.Size("main.wasm")
	t.Logf("engine: main.wasm %d bytes raw, %d bytes gzip (%.2f MB, %.2f MB)", raw, gz, float64(raw)/1e6, float64(gz)/1e6)
	origin := strings.TrimSuffix(srv.url(), "/")

	b := newBrowser(t, chrome, 1280, 800)
	b.open(t, srv.url())

	t.Run("FirstResult", func(t *testing.T) {
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#run-plan")))
		b.waitFor(t, `!document.getElementById('results').hidden`, 90*time.Second)
		text := eval[string](t, b, `document.getElementById('results').textContent`)
		for _, want := range []string{"coverage interval", "Uncertainty budget", "GUM against Monte Carlo", "Frames needed"} {
			if !strings.Contains(text, want) {
				t.Errorf("results lack %q", want)
			}
		}
		if n := eval[int](t, b, `document.querySelectorAll('#results svg').length`); n != 3 {
			t.Errorf("%d charts in the results; want 3 (histogram, frames curve, budget bars)", n)
		}
	})

	t.Run("DemoMatchesNative", func(t *testing.T) {
		native, err := uncertainty.Plan(context.Background(), uncertainty.Demo(), uncertainty.PlanOptions{})
		if err != nil {
			t.Fatal(err)
		}
		nb, _ := json.Marshal(native)
		var want any
		json.Unmarshal(nb, &want)
		one := eval[string](t, b, `sizebudget.plan(sizebudget.demo(), {workers: 1}).then(JSON.stringify)`)
		two := eval[string](t, b, `sizebudget.plan(sizebudget.demo(), {workers: 2}).then(JSON.stringify)`)
		if one != two {
			t.Errorf("one worker and two workers disagree:\n%s\n%s", one, two)
		}
		var got any
		if err := json.Unmarshal([]byte(two), &got); err != nil {
			t.Fatal(err)
		}
		// Same seed, same numbers: the WebAssembly build and the native build differ at most in
		// the rounding of a few math functions (assembly on amd64, Go on wasm).
		compareJSON(t, "plan", want, got, 1e-9)
	})

	t.Run("ProgressAndCancel", func(t *testing.T) {
		eval[bool](t, b, `(() => {
			window.__prog = []; window.__outcome = null;
			const s = {...sizebudget.demo(), trials: 400000};
			sizebudget.plan(s, {onProgress: (p) => window.__prog.push([performance.now(), p.done, p.planned])})
				.then(() => { window.__outcome = 'finished'; }, (e) => { window.__outcome = e.name + ': ' + e.message; window.__cancelledAt = performance.now(); });
			return true; })()`)
		b.waitFor(t, `window.__prog.length >= 3`, 60*time.Second)
		eval[bool](t, b, `(() => { window.__cancelAsked = performance.now(); sizebudget.cancel(); return true; })()`)
		b.waitFor(t, `window.__outcome !== null`, 10*time.Second)
		outcome := eval[string](t, b, `window.__outcome`)
		if !strings.HasPrefix(outcome, "AbortError") {
			t.Fatalf("cancel: the plan ended with %q, want an AbortError", outcome)
		}
		n := eval[int](t, b, `window.__prog.length`)
		time.Sleep(400 * time.Millisecond)
		if m := eval[int](t, b, `window.__prog.length`); m != n {
			t.Errorf("%d progress reports after the cancel", m-n)
		}
		prog := eval[[][3]float64](t, b, `window.__prog`)
		gap := 0.0
		for i := 1; i < len(prog); i++ {
			gap = math.Max(gap, prog[i][0]-prog[i-1][0])
			if prog[i][1] < prog[i-1][1] && prog[i][2] == prog[i-1][2] {
				t.Errorf("progress went back: %v then %v", prog[i-1], prog[i])
			}
		}
		if len(prog) < 3 {
			t.Errorf("%d progress reports", len(prog))
		}
		t.Logf("progress: %d reports before the cancel, largest gap %.0f ms (timings are measured by the benchmarks; this is for the log)", len(prog), gap)
		// The app computes again after a cancel.
		r := eval[float64](t, b, `sizebudget.plan({...sizebudget.demo(), trials: 10000}).then((r) => r.relative_expanded_uncertainty)`)
		if !(r > 0 && r < 1) {
			t.Errorf("plan after cancel: U/r = %v", r)
		}
	})

	t.Run("ValidationAsYouType", func(t *testing.T) {
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#tab-results")))
		setField(t, b, "frames", "")
		b.do(t, 10*time.Second, chromedp.SendKeys(chromedp.CSS("#f-frames"), "2"))
		b.waitFor(t, `!document.getElementById('e-frames').hidden`, 5*time.Second)
		msg := eval[string](t, b, `document.getElementById('e-frames').textContent`)
		if !strings.Contains(msg, "frames = 2") {
			t.Errorf("frames = 2: message %q, want the engine's message naming the field and value", msg)
		}
		if v := eval[string](t, b, `document.getElementById('f-frames').getAttribute('aria-invalid')`); v != "true" {
			t.Errorf("aria-invalid = %q", v)
		}
		b.do(t, 10*time.Second, chromedp.SendKeys(chromedp.CSS("#f-frames"), "0"))
		b.waitFor(t, `document.getElementById('e-frames').hidden`, 5*time.Second)
	})

	t.Run("Review", func(t *testing.T) {
		verdict := eval[string](t, b, `sizebudget.check({...sizebudget.demo(), reported_radius_nm: 50, reported_u_nm: 0.2, reported_k: 2}).then((c) => c.verdict)`)
		if verdict != uncertainty.VerdictBelowBound {
			t.Errorf("50 ± 0.2 nm from 100 tracks of 60 frames: verdict %q, want %q", verdict, uncertainty.VerdictBelowBound)
		}
		_, err := evalErr[string](b, `sizebudget.check(sizebudget.demo()).then((c) => c.verdict)`, 30*time.Second)
		if err == nil || !strings.Contains(err.Error(), "reported_radius_nm") {
			t.Errorf("check without a reported radius: err = %v, want the engine's message on reported_radius_nm", err)
		}
	})

	t.Run("Unreachable", func(t *testing.T) {
		// 0.5 % is below what temperature, viscosity and calibration allow on their own (the demo's
		// budget: 0.75 %, 1 % and 1 % relative standard uncertainty).
		setField(t, b, "target_relative_expanded_uncertainty", "0.005")
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#run-plan")))
		b.waitFor(t, `document.getElementById('results').textContent.includes('out of reach')`, 60*time.Second)
		setField(t, b, "target_relative_expanded_uncertainty", "0.05")
	})

	var exported string
	t.Run("SessionsSurviveReload", func(t *testing.T) {
		setField(t, b, "tracks", "250")
		b.do(t, 10*time.Second,
			chromedp.Click(chromedp.CSS("#tab-sessions")),
			chromedp.SendKeys(chromedp.CSS("#save-name"), "Invented: 250 tracks"),
			chromedp.SendKeys(chromedp.CSS("#save-note"), "saved by the browser test"),
			chromedp.Click(chromedp.CSS("#save-new")))
		b.waitFor(t, `document.querySelectorAll('#session-list .session').length === 1`, 10*time.Second)
		id := eval[string](t, b, `sizebudget.sessions.list().then((l) => l[0].id)`)
		second := eval[string](t, b, `sizebudget.sessions.save({...sizebudget.demo(), frames: 120}, 'Invented: long tracks')`)
		setField(t, b, "localisation_nm", "33")
		// The draft is saved 300 ms after the last change.
		b.waitFor(t, `sizebudget.draft.get().then((d) => !!d && JSON.parse(d).state.localisation_nm === '33')`, 10*time.Second)

		b.do(t, 30*time.Second, chromedp.Reload())
		b.waitReady(t)
		list := eval[[]map[string]any](t, b, `sizebudget.sessions.list()`)
		if len(list) != 2 || list[0]["id"] != second || list[1]["id"] != id {
			t.Fatalf("after reload: sessions %v; want [%s %s], newest first", list, second, id)
		}
		if v := eval[string](t, b, `document.getElementById('f-localisation_nm').value`); v != "33" {
			t.Errorf("the draft was not restored: localisation_nm = %q, want 33", v)
		}
		// Reopen the first session from the list.
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#tab-sessions")))
		b.waitFor(t, `document.querySelectorAll('#session-list .session').length === 2`, 10*time.Second)
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS(fmt.Sprintf(`#session-list [data-id=%q] .actions button.primary`, id))))
		b.waitFor(t, `document.getElementById('f-tracks').value === '250' && document.getElementById('f-localisation_nm').value === '40'`, 10*time.Second)
		// Search, rename, duplicate, delete with undo.
		if n := eval[int](t, b, `sizebudget.sessions.list('long').then((l) => l.length)`); n != 1 {
			t.Errorf("search 'long': %d sessions, want 1", n)
		}
		eval[any](t, b, fmt.Sprintf(`sizebudget.sessions.rename(%q, 'Invented: 250 tracks, renamed', 'a note')`, id))
		dup := eval[string](t, b, fmt.Sprintf(`sizebudget.sessions.duplicate(%q)`, id))
		gone := eval[map[string]any](t, b, fmt.Sprintf(`sizebudget.sessions.remove(%q)`, dup))
		if gone["name"] != "Invented: 250 tracks, renamed (copy)" {
			t.Errorf("removed %v", gone["name"])
		}
		eval[any](t, b, fmt.Sprintf(`sizebudget.sessions.get(%q).then(() => 'found', (e) => e.message)`, dup))
		eval[any](t, b, `sizebudget.sessions.restore(`+mustJSON(gone)+`)`)
		if n := eval[int](t, b, `sizebudget.sessions.list().then((l) => l.length)`); n != 3 {
			t.Errorf("after undo of a delete: %d sessions, want 3", n)
		}
		// Delete and undo from the list, then compare two sessions side by side.
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#tab-sessions")))
		eval[bool](t, b, `(document.getElementById('search').dispatchEvent(new Event('input')), true)`)
		b.waitFor(t, `document.querySelectorAll('#session-list .session').length === 3`, 10*time.Second)
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS(fmt.Sprintf(`#session-list [data-id=%q] .actions button.danger`, dup))))
		b.waitFor(t, `document.querySelectorAll('#session-list .session').length === 2 && !document.getElementById('toast').hidden`, 10*time.Second)
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#toast-action")))
		b.waitFor(t, `document.querySelectorAll('#session-list .session').length === 3`, 10*time.Second)
		b.do(t, 10*time.Second,
			chromedp.Click(chromedp.CSS(fmt.Sprintf(`#pick-%s`, id))),
			chromedp.Click(chromedp.CSS(fmt.Sprintf(`#pick-%s`, second))),
			chromedp.Click(chromedp.CSS("#compare")))
		b.waitFor(t, `!document.getElementById('comparison').hidden`, 10*time.Second)
		differs := eval[[]string](t, b, `[...document.querySelectorAll('#comparison tr.differs th')].map((th) => th.textContent)`)
		if len(differs) != 2 || !strings.HasPrefix(differs[0], "Frames per track") || !strings.HasPrefix(differs[1], "Tracks") {
			t.Errorf("compare: differing rows %v; want frames and tracks", differs)
		}
		eval[any](t, b, fmt.Sprintf(`sizebudget.sessions.remove(%q)`, dup))
		one := eval[[]string](t, b, fmt.Sprintf(`sizebudget.exportOne(%q).then((text) => JSON.parse(text).sessions.map((s) => s.id))`, second))
		if !slices.Equal(one, []string{second}) {
			t.Errorf("exportOne: sessions %v, want [%s]", one, second)
		}
		exported = eval[string](t, b, `sizebudget.exportAll()`)
	})

	t.Run("OfflineStart", func(t *testing.T) {
		b.waitFor(t, `navigator.serviceWorker.controller !== null`, 20*time.Second)
		b.waitFor(t, `caches.keys().then((k) => k.length === 1 && k[0] === 'sizebudget-' + sizebudget.version)`, 20*time.Second)
		srv.stop()
		if _, err := http.Get(srv.url()); err == nil {
			t.Fatal("the server still answers")
		}
		b.do(t, 30*time.Second, chromedp.Reload())
		b.waitReady(t)
		r := eval[float64](t, b, `sizebudget.plan({...sizebudget.demo(), trials: 10000}).then((r) => r.relative_expanded_uncertainty)`)
		if !(r > 0 && r < 1) {
			t.Errorf("offline plan: U/r = %v", r)
		}
		if n := eval[int](t, b, `sizebudget.sessions.list().then((l) => l.length)`); n != 2 {
			t.Errorf("offline: %d sessions, want 2", n)
		}
		srv.start(t)
	})

	b.checkClean(t, origin)

	t.Run("ImportIntoFreshProfile", func(t *testing.T) {
		if exported == "" {
			t.Skip("no export from the sessions test")
		}
		f := newBrowser(t, chrome, 390, 844)
		f.open(t, srv.url())
		file := filepath.Join(t.TempDir(), "sessions.json")
		if err := os.WriteFile(file, []byte(exported), 0o644); err != nil {
			t.Fatal(err)
		}
		f.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#tab-sessions")))
		f.do(t, 10*time.Second, chromedp.SetUploadFiles(chromedp.CSS("#import-file"), []string{file}))
		f.waitFor(t, `document.querySelectorAll('#session-list .session').length === 2`, 10*time.Second)
		msg := eval[string](t, f, `document.getElementById('sessions-message').textContent`)
		if !strings.Contains(msg, "Imported 2 sessions") {
			t.Errorf("import message %q", msg)
		}
		var want, got struct {
			Sessions []map[string]any `json:"sessions"`
		}
		json.Unmarshal([]byte(exported), &want)
		json.Unmarshal([]byte(eval[string](t, f, `sizebudget.exportAll()`)), &got)
		compareJSON(t, "sessions", any(toAny(want.Sessions)), any(toAny(got.Sessions)), 0)

		// A bad file: a clear message, and nothing changes.
		bad := filepath.Join(root, "wasm", "store", "testdata", "sessions-bad-scenario.json")
		f.do(t, 10*time.Second, chromedp.SetUploadFiles(chromedp.CSS("#import-file"), []string{bad}))
		f.waitFor(t, `document.getElementById('sessions-message').textContent.startsWith('Nothing was imported')`, 10*time.Second)
		msg = eval[string](t, f, `document.getElementById('sessions-message').textContent`)
		if !strings.Contains(msg, "session 2") || !strings.Contains(msg, "frames") {
			t.Errorf("bad file message %q; want it to name the session and the field", msg)
		}
		if n := eval[int](t, f, `sizebudget.sessions.list().then((l) => l.length)`); n != 2 {
			t.Errorf("after a bad import: %d sessions, want 2", n)
		}
		f.checkClean(t, origin)
	})

	t.Run("UpgradeFromVersion1", func(t *testing.T) {
		u := newBrowser(t, chrome, 1280, 800)
		// A database as version 1 of the app left it: only the sessions store.
		u.do(t, 20*time.Second, chromedp.Navigate(srv.url()+"manifest.webmanifest"))
		// And a cache of an older build, which the service worker must remove when it activates.
		eval[bool](t, u, `caches.open('sizebudget-0ldbuild').then((c) => c.put('old.txt', new Response('old'))).then(() => true)`)
		doc, _ := uncertainty.Demo().Marshal()
		eval[bool](t, u, `new Promise((resolve, reject) => {
			const req = indexedDB.open('sizebudget', 1);
			req.onupgradeneeded = () => req.result.createObjectStore('sessions', {keyPath: 'id'});
			req.onsuccess = () => {
				const tx = req.result.transaction('sessions', 'readwrite');
				tx.objectStore('sessions').put({id: 'old-1', name: 'Invented: from version 1', created: '2030-01-01T00:00:00Z',
					modified: '2030-01-01T00:00:00Z', scenario: `+string(doc)+`});
				tx.oncomplete = () => { req.result.close(); resolve(true); };
				tx.onerror = () => reject(tx.error);
			};
			req.onerror = () => reject(req.error);
		})`)
		u.open(t, srv.url())
		names := eval[[]string](t, u, `sizebudget.sessions.list().then((l) => l.map((s) => s.name))`)
		if !slices.Equal(names, []string{"Invented: from version 1"}) {
			t.Errorf("after the upgrade: sessions %v", names)
		}
		eval[any](t, u, `sizebudget.draft.save('{"format":"x"}')`)
		v := eval[int](t, u, `new Promise((resolve) => { const r = indexedDB.open('sizebudget'); r.onsuccess = () => { resolve(r.result.version); r.result.close(); }; })`)
		if v != 2 {
			t.Errorf("database version %d after the upgrade, want 2", v)
		}
		u.waitFor(t, `navigator.serviceWorker.controller !== null`, 20*time.Second)
		keys := eval[[]string](t, u, `caches.keys()`)
		if want := []string{"sizebudget-" + srv.app.Version()}; !slices.Equal(keys, want) {
			t.Errorf("caches after activation: %v, want %v (the old build's cache removed)", keys, want)
		}
		u.checkClean(t, origin)
	})

	t.Run("Accessibility", func(t *testing.T) {
		a := newBrowser(t, chrome, 360, 740)
		a.do(t, 10*time.Second, chromedp.EmulateViewport(360, 740))
		a.open(t, srv.url())
		for _, tab := range []string{"tab-settings", "tab-results", "tab-review", "tab-analysis", "tab-sessions"} {
			a.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#"+tab)))
			// Every control has a label; every target is at least 44 px both ways (checkboxes count
			// by their label); nothing is wider than a 360 px screen.
			problems := eval[[]string](t, a, layoutProblems)
			for _, p := range problems {
				t.Errorf("%s: %s", tab, p)
			}
		}
		// The tabs follow the arrow keys.
		a.do(t, 10*time.Second, chromedp.Focus(chromedp.CSS("#tab-results")), chromedp.KeyEvent(kb.ArrowRight))
		if sel := eval[string](t, a, `document.activeElement.id + ' ' + document.activeElement.getAttribute('aria-selected')`); sel != "tab-review true" {
			t.Errorf("ArrowRight from the Results tab: focus on %q, want the selected Review tab", sel)
		}
		// The print report: no navigation or buttons, the settings and the results.
		if _, err := chromedp.Call(a.ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: "print"}); err != nil {
			t.Fatal(err)
		}
		shown := eval[[]string](t, a, `['.tabs', '#run-plan', '#panel-settings', '#panel-results', '.caution']
			.map((q) => q + ' ' + getComputedStyle(document.querySelector(q)).display)`)
		if want := []string{".tabs none", "#run-plan none", "#panel-settings block", "#panel-results block", ".caution block"}; !slices.Equal(shown, want) {
			t.Errorf("print: %v, want %v", shown, want)
		}
		a.checkClean(t, origin)
	})

	if *writeScreens {
		t.Run("Screenshots", func(t *testing.T) { screenshots(t, chrome, srv.url(), root) })
	}
}

// BenchmarkBrowserFirstResult measures the time from opening the page in a fresh profile to the
// rendered results of the demo scenario, "Compute plan" pressed as soon as the app is ready: the
// page's clock (performance.now) at the result, as ms/first-result. Each iteration starts a browser.
func BenchmarkBrowserFirstResult(b *testing.B) {
	chrome, srv, _ := startBrowserApp(b)
	var total float64
	for b.Loop() {
		br := newBrowser(b, chrome, 1280, 800)
		br.open(b, srv.url())
		br.do(b, 10*time.Second, chromedp.Click(chromedp.CSS("#run-plan")))
		br.waitFor(b, `!document.getElementById('results').hidden`, 90*time.Second)
		total += eval[float64](b, br, `performance.now()`)
		chromedp.Cancel(br.ctx)
	}
	b.ReportMetric(total/float64(b.N), "ms/first-result")
}

// BenchmarkBrowserPlan measures a plan computed in the browser's workers on 1 and 2 workers (the
// team of workers is started before the clock runs): the demo scenario (adaptive Monte Carlo and
// the planner) and a fixed 200000-trial run of it.
func BenchmarkBrowserPlan(b *testing.B) {
	chrome, srv, _ := startBrowserApp(b)
	br := newBrowser(b, chrome, 1280, 800)
	br.open(b, srv.url())
	for _, sc := range []struct{ name, expr string }{
		{"demo", `sizebudget.demo()`},
		{"trials=200000", `({...sizebudget.demo(), trials: 200000})`},
	} {
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("%s/workers=%d", sc.name, workers), func(b *testing.B) {
				expr := fmt.Sprintf(`sizebudget.plan(%s, {workers: %d}).then((r) => r.elapsed_ms)`, sc.expr, workers)
				eval[float64](b, br, expr) // start the team of this size
				var ms float64
				for b.Loop() {
					ms += eval[float64](b, br, expr)
				}
				b.ReportMetric(ms/float64(b.N), "ms/plan")
			})
		}
	}
}

// screenshots saves the main screens at phone (390×844) and desktop (1280×800) sizes; the analysis
// screen shows the invented demo track file.
func screenshots(t *testing.T, chrome, u, root string) {
	dir := filepath.Join(root, "docs", "screens")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, size := range [][2]int{{390, 844}, {1280, 800}} {
		w, h := size[0], size[1]
		b := newBrowser(t, chrome, w, h)
		b.do(t, 10*time.Second, chromedp.EmulateViewport(int64(w), int64(h)))
		b.open(t, u)
		shot := func(name string) {
			t.Helper()
			time.Sleep(300 * time.Millisecond)
			img, err := chromedp.Run(b.ctx, chromedp.CaptureScreenshot())
			if err != nil {
				t.Fatal(err)
			}
			file := filepath.Join(dir, fmt.Sprintf("%s-%dx%d.png", name, w, h))
			if err := os.WriteFile(file, img, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		if w < 960 {
			shot("settings")
		}
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#run-plan")))
		b.waitFor(t, `!document.getElementById('results').hidden`, 90*time.Second)
		eval[bool](t, b, `(window.scrollTo(0, 0), true)`)
		shot("results")
		eval[bool](t, b, `(document.querySelector('#results .charts').scrollIntoView(), true)`)
		shot("charts")
		setField(t, b, "reported_radius_nm", "50")
		setField(t, b, "reported_u_nm", "1.5")
		setField(t, b, "reported_k", "2")
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#tab-review")), chromedp.Click(chromedp.CSS("#run-check")))
		b.waitFor(t, `document.querySelector('#verdict .verdict') !== null`, 60*time.Second)
		eval[bool](t, b, `(document.getElementById('run-check').scrollIntoView(), true)`)
		shot("review")
		eval[string](t, b, `sizebudget.sessions.save(sizebudget.demo(), 'Invented: demo beads', 'an invented scenario')`)
		eval[string](t, b, `sizebudget.sessions.save({...sizebudget.demo(), medium: 'glycerol', glycerol_mass_fraction: 0.4}, 'Invented: beads in 40 % glycerol', '')`)
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#tab-sessions")))
		eval[bool](t, b, `(document.getElementById('search').dispatchEvent(new Event('input')), true)`)
		b.waitFor(t, `document.querySelectorAll('#session-list .session').length === 2`, 10*time.Second)
		eval[bool](t, b, `(window.scrollTo(0, 0), true)`)
		shot("sessions")
		b.do(t, 10*time.Second, chromedp.Click(chromedp.CSS("#tab-analysis")),
			chromedp.SetUploadFiles(chromedp.CSS("#track-file"), []string{filepath.Join(root, "testdata", "tracks", "demo.csv")}))
		b.waitFor(t, `sizebudget.shownAnalysis !== null && !sizebudget.busy`, 90*time.Second)
		// The summary and the figures on a desktop; the figures on a phone.
		target := "#analysis"
		if w < 960 {
			target = "#analysis .headline"
		}
		eval[bool](t, b, fmt.Sprintf(`(window.scrollTo(0, document.querySelector(%q).getBoundingClientRect().top + window.scrollY - 90), true)`, target))
		shot("analysis")
	}
}

func mustJSON(v any) string {
	b, err := json.Marshal(v)
	if err != nil {
		panic(err)
	}
	return string(b)
}

func toAny(v any) any {
	var out any
	json.Unmarshal([]byte(mustJSON(v)), &out)
	return out
}

// compareJSON compares decoded JSON values: numbers within a relative tolerance, everything else
// exactly.
func compareJSON(t *testing.T, path string, want, got any, tol float64) {
	t.Helper()
	switch w := want.(type) {
	case map[string]any:
		g, ok := got.(map[string]any)
		if !ok {
			t.Errorf("%s: got %T, want an object", path, got)
			return
		}
		for k := range w {
			if _, ok := g[k]; !ok {
				t.Errorf("%s.%s: missing", path, k)
			}
		}
		for k := range g {
			if _, ok := w[k]; !ok {
				t.Errorf("%s.%s: unexpected", path, k)
				continue
			}
			compareJSON(t, path+"."+k, w[k], g[k], tol)
		}
	case []any:
		g, ok := got.([]any)
		if !ok || len(g) != len(w) {
			t.Errorf("%s: got %v, want %d elements", path, got, len(w))
			return
		}
		for i := range w {
			compareJSON(t, fmt.Sprintf("%s[%d]", path, i), w[i], g[i], tol)
		}
	case float64:
		g, ok := got.(float64)
		if !ok || !(math.Abs(g-w) <= tol*math.Abs(w) || g == w) {
			t.Errorf("%s: got %v, want %v (relative tolerance %g)", path, got, w, tol)
		}
	default:
		if fmt.Sprint(want) != fmt.Sprint(got) {
			t.Errorf("%s: got %v, want %v", path, got, want)
		}
	}
}
