//go:build js && wasm

package main

import (
	"context"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"syscall/js"
	"time"

	"sizebudget/trackfile"
	"sizebudget/uncertainty"
	"sizebudget/wasm/store"
)

// Reading a track file in the coordinator.
const (
	blobChunk = 1 << 20 // bytes fetched from the Blob at a time
	// readEvery is the least time between two reports of the bytes read; the page's promise is one at
	// least every 250 ms, so this leaves room for a slow chunk.
	readEvery = 100 * time.Millisecond
)

// analyze reads the track file blob (a JavaScript Blob or File) in this worker and analyses it with
// the settings (JSON of store.AnalysisSettings). It posts {type: "progress", id, phase: "read",
// bytes, total} while reading, {type: "progress", id, phase: "compute", done, planned} during the
// Monte Carlo, and finally {type: "result", id, result, charts}, result being the JSON of the
// store.Analysis (file summary, settings, the uncertainty.Analysis), or {type: "error", id, error}.
func (c *coordinator) analyze(id int, settingsText string, blob js.Value) {
	defer func() {
		if v := recover(); v != nil {
			post(map[string]any{"type": "error", "id": id, "error": errorObject(panicError(v))})
		}
	}()
	fail := func(err error) { post(map[string]any{"type": "error", "id": id, "error": errorObject(err)}) }
	st, err := store.ParseAnalysisSettings([]byte(settingsText))
	if err != nil {
		fail(err)
		return
	}
	name := "text"
	if n := blob.Get("name"); n.Type() == js.TypeString && n.String() != "" {
		name = n.String()
	}
	var modified time.Time
	if m := blob.Get("lastModified"); m.Type() == js.TypeNumber {
		modified = time.UnixMilli(int64(m.Float()))
	}
	size := int64(blob.Get("size").Float())
	digest := startDigest(blob)

	var last time.Time
	src := &blobReader{blob: blob, size: size, progress: func(read int64) {
		if now := time.Now(); now.Sub(last) >= readEvery || read == size {
			last = now
			post(map[string]any{"type": "progress", "id": id, "phase": "read", "bytes": read, "total": size})
		}
	}}
	src.progress(0)
	r, err := trackfile.NewReader(src, st.ReadOptions())
	if err != nil {
		fail(fileError(name, err))
		return
	}
	var lastMC time.Time
	opt := uncertainty.PlanOptions{
		Workers: 1,
		Progress: func(done, planned int) {
			if now := time.Now(); now.Sub(lastMC) >= progressEvery || done == planned {
				lastMC = now
				post(map[string]any{"type": "progress", "id": id, "phase": "compute", "done": done, "planned": planned})
			}
		},
	}
	if c.pool.size() > 0 {
		opt.Propagate = c.pool.propagate
	}
	a, err := uncertainty.Analyze(context.Background(), r, st.Scenario(), opt)
	if err != nil {
		var fe *trackfile.Error
		if errors.As(err, &fe) {
			err = fileError(name, err)
		}
		fail(err)
		return
	}
	sha := <-digest
	rec, err := store.NewAnalysis(store.NewTrackFile(name, size, modified, sha, r.Stats()), st, a, time.Now())
	if err != nil {
		fail(err)
		return
	}
	out, err := jsonText(rec)
	if err != nil {
		fail(err)
		return
	}
	charts := js.Global().Get("Object").New()
	for k, svg := range analysisCharts(a) {
		charts.Set(k, svg)
	}
	post(map[string]any{"type": "result", "id": id, "result": out, "charts": charts})
}

// fileError prefixes an error of the track file with the file's name and, for a header that the
// settings cannot read, names the setting to change.
func fileError(name string, err error) error {
	for _, hint := range []struct {
		err         error
		field, hint string
	}{
		{trackfile.ErrNoUnit, "unit", "choose the length unit of the positions"},
		{trackfile.ErrUnitConflict, "unit", "the length unit chosen differs from the file's header"},
		{trackfile.ErrNoPixelSize, "pixel_size_nm", "give the pixel size"},
		{trackfile.ErrNoInterval, "frame_interval_s", "give the frame interval"},
	} {
		if errors.Is(err, hint.err) {
			return &fieldError{field: hint.field, err: fmt.Errorf("%s: %w; %s", name, err, hint.hint)}
		}
	}
	return fmt.Errorf("%s: %w", name, err)
}

// blobReader is an io.Reader of a JavaScript Blob: it fetches the Blob in chunks of blobChunk bytes
// (asking for the next one before the current one is parsed) and reports the bytes handed out.
type blobReader struct {
	blob     js.Value
	size     int64
	fetched  int64    // bytes asked for so far
	started  bool     // the first chunk was asked for
	next     js.Value // Promise of the next chunk's ArrayBuffer, or undefined
	buf      []byte   // the current chunk, not yet read
	read     int64    // bytes handed out
	progress func(read int64)
}

func (b *blobReader) fetch() js.Value {
	if b.fetched >= b.size {
		return js.Undefined()
	}
	end := min(b.fetched+blobChunk, b.size)
	p := b.blob.Call("slice", float64(b.fetched), float64(end)).Call("arrayBuffer")
	b.fetched = end
	return p
}

func (b *blobReader) Read(p []byte) (int, error) {
	if len(b.buf) == 0 {
		if !b.started {
			b.started = true
			b.next = b.fetch()
		}
		if b.next.IsUndefined() {
			return 0, io.EOF
		}
		ab, err := awaitPromise(b.next)
		if err != nil {
			return 0, fmt.Errorf("reading the file: %w", err)
		}
		b.next = b.fetch()
		u8 := js.Global().Get("Uint8Array").New(ab)
		if cap(b.buf) < u8.Length() {
			b.buf = make([]byte, u8.Length())
		}
		b.buf = b.buf[:u8.Length()]
		js.CopyBytesToGo(b.buf, u8)
		if len(b.buf) == 0 {
			return 0, io.EOF
		}
	}
	n := copy(p, b.buf)
	b.buf = b.buf[n:]
	b.read += int64(n)
	b.progress(b.read)
	return n, nil
}

// startDigest computes the SHA-256 of the Blob's bytes with the browser's crypto.subtle and delivers
// it as hexadecimal text, or "" when the browser offers no crypto.subtle (an insecure origin) or it
// fails. crypto.subtle has no streaming form, so the bytes are held by the browser once, beside the
// streamed reading of the rows.
func startDigest(blob js.Value) <-chan string {
	ch := make(chan string, 1)
	subtle := js.Global().Get("crypto")
	if !subtle.IsUndefined() {
		subtle = subtle.Get("subtle")
	}
	if subtle.IsUndefined() || subtle.IsNull() {
		ch <- ""
		return ch
	}
	go func() {
		ab, err := awaitPromise(blob.Call("arrayBuffer"))
		if err == nil {
			ab, err = awaitPromise(subtle.Call("digest", "SHA-256", ab))
		}
		if err != nil {
			js.Global().Get("console").Call("warn", "sizebudget: no SHA-256 of the file: "+err.Error())
			ch <- ""
			return
		}
		u8 := js.Global().Get("Uint8Array").New(ab)
		sum := make([]byte, u8.Length())
		js.CopyBytesToGo(sum, u8)
		ch <- hex.EncodeToString(sum)
	}()
	return ch
}
