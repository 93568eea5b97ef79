//go:build js && wasm

package main

// These tests run under Node.js (which has Blob and crypto.subtle):
//
//	GOOS=js GOARCH=wasm go test -exec="$(go env GOROOT)/lib/wasm/go_js_wasm_exec" ./wasm

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"syscall/js"
	"testing"

	"sizebudget/trackfile"
	"sizebudget/uncertainty"
)

// blobOf returns a JavaScript Blob of data.
func blobOf(data []byte) js.Value {
	u8 := js.Global().Get("Uint8Array").New(len(data))
	js.CopyBytesToJS(u8, data)
	return js.Global().Get("Blob").New([]any{u8})
}

func TestBlobReader(t *testing.T) {
	// 2.5 chunks of seeded bytes, read in odd-sized pieces across the chunk boundaries.
	data := make([]byte, 5*blobChunk/2+7)
	rng := rand.New(rand.NewPCG(1, 2))
	for i := range data {
		data[i] = byte(rng.Uint32())
	}
	var reports []int64
	r := &blobReader{blob: blobOf(data), size: int64(len(data)), progress: func(n int64) { reports = append(reports, n) }}
	var got bytes.Buffer
	buf := make([]byte, 100003)
	for {
		n, err := r.Read(buf)
		got.Write(buf[:n])
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
	}
	if !bytes.Equal(got.Bytes(), data) {
		t.Fatalf("read %d bytes, not the %d of the Blob", got.Len(), len(data))
	}
	for i := 1; i < len(reports); i++ {
		if reports[i] <= reports[i-1] {
			t.Fatalf("reports of the bytes read went back: %v", reports)
		}
	}
	if reports[len(reports)-1] != int64(len(data)) {
		t.Errorf("last report %d, want %d", reports[len(reports)-1], len(data))
	}
	empty := &blobReader{blob: blobOf(nil), progress: func(int64) {}}
	if n, err := empty.Read(buf); n != 0 || err != io.EOF {
		t.Errorf("empty Blob: %d, %v", n, err)
	}
}

func TestDigest(t *testing.T) {
	data := []byte("track,frame,x_um,y_um\n1,0,1.0,2.0\n")
	want := sha256.Sum256(data) // crypto/sha256 against the browser's crypto.subtle
	if got := <-startDigest(blobOf(data)); got != hex.EncodeToString(want[:]) {
		t.Errorf("digest %q, want %x", got, want)
	}
}

func TestValidateAnalysisReply(t *testing.T) {
	var v analysisValidation
	ok := `{"medium":"water","temperature_C":25,"temperature_u_K":0.5,"frame_interval_s":0.04,"exposure_s":0.01,"seed":1}`
	if err := json.Unmarshal([]byte(validateAnalysis(ok)), &v); err != nil || !v.OK || v.Settings == nil || v.Settings.Seed != 1 {
		t.Fatalf("good settings: %+v, %v", v, err)
	}
	for _, c := range []struct{ doc, field string }{
		{`{"medium":"water","temperature_C":25,"temperature_u_K":0.5,"frame_interval_s":0.04,"exposure_s":0.05,"seed":1}`, "exposure_s"},
		{`{"medium":"water","temperature_C":25,"temperature_u_K":0.5,"frame_interval_s":0.04,"exposure_s":0.01,"min_positions":1}`, "min_positions"},
	} {
		v = analysisValidation{}
		json.Unmarshal([]byte(validateAnalysis(c.doc)), &v)
		if v.OK || v.Field != c.field || v.Message == "" {
			t.Errorf("%s: %+v; want the message on %s", c.doc, v, c.field)
		}
	}
}

func TestFileErrorNamesTheSetting(t *testing.T) {
	_, err := trackfile.NewReader(bytes.NewReader([]byte("track,frame,x_px,y_px\n")), trackfile.Options{})
	d := describe(fileError("cells.csv", err))
	if d.Field != "pixel_size_nm" || !bytes.Contains([]byte(d.Message), []byte("cells.csv")) {
		t.Errorf("positions in px without a pixel size: %+v", d)
	}
	plain := describe(fileError("a.csv", &trackfile.Error{Line: 3, Column: 2, Name: "frame", Err: errors.New("bad")}))
	if plain.Field != "" || plain.Message != "a.csv: trackfile: line 3, column 2 (frame): bad" {
		t.Errorf("a content error: %+v", plain)
	}
	// A range error of the settings keeps its field through the wrapping.
	wrapped := fmt.Errorf("x: %w", &uncertainty.FieldError{Field: "seed", Value: 1, Allowed: "2"})
	if describe(wrapped).Field != "seed" {
		t.Error("a wrapped FieldError lost its field")
	}
}
