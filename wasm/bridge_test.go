//go:build js && wasm

package main

// These tests run the bridge under Node.js:
//
//	GOOS=js GOARCH=wasm go test -exec="$(go env GOROOT)/lib/wasm/go_js_wasm_exec" ./wasm

import (
	"context"
	"encoding/json"
	"errors"
	"strings"
	"syscall/js"
	"testing"
	"time"

	"sizebudget/uncertainty"
)

// await waits for a JavaScript Promise and returns its value or its rejection.
func await(t *testing.T, p js.Value) (js.Value, js.Value) {
	t.Helper()
	type outcome struct{ v, err js.Value }
	ch := make(chan outcome, 1)
	ok := js.FuncOf(func(_ js.Value, a []js.Value) any { ch <- outcome{v: a[0], err: js.Null()}; return nil })
	bad := js.FuncOf(func(_ js.Value, a []js.Value) any { ch <- outcome{v: js.Null(), err: a[0]}; return nil })
	defer ok.Release()
	defer bad.Release()
	p.Call("then", ok, bad)
	select {
	case o := <-ch:
		return o.v, o.err
	case <-time.After(10 * time.Second):
		t.Fatal("the Promise did not settle")
		return js.Null(), js.Null()
	}
}

func TestSyncFuncRecoversPanics(t *testing.T) {
	f := syncFunc(func(args []js.Value) (any, error) {
		return args[0].Get("x").Int(), nil // panics for a number: syscall/js refuses Get on it
	})
	defer f.Release()
	r := f.Invoke(5)
	if r.Type() != js.TypeObject || r.Get("error").IsUndefined() {
		t.Fatalf("a panic gave %v, want {error}", r)
	}
	if msg := r.Get("error").Get("message").String(); !strings.Contains(msg, "internal error") {
		t.Errorf("panic message %q", msg)
	}
	g := syncFunc(func([]js.Value) (any, error) {
		return nil, &uncertainty.FieldError{Field: "frames", Value: 2, Allowed: "3 to 100000"}
	})
	defer g.Release()
	e := g.Invoke().Get("error")
	if e.Get("field").String() != "frames" || !strings.Contains(e.Get("message").String(), "frames = 2") {
		t.Errorf("error %v: want the field and the engine's message", e)
	}
}

func TestAsyncFuncRejects(t *testing.T) {
	f := asyncFunc(func(ctx context.Context, args []js.Value) (any, error) {
		switch args[0].String() {
		case "ok":
			return "fine", nil
		case "err":
			return nil, errors.New("plain failure")
		}
		var m map[string]int
		m["x"] = 1 // panics: assignment to a nil map
		return nil, nil
	})
	defer f.Release()
	if v, err := await(t, f.Invoke("ok")); !err.IsNull() || v.String() != "fine" {
		t.Errorf("ok: %v, %v", v, err)
	}
	if _, err := await(t, f.Invoke("err")); err.IsNull() || err.Get("message").String() != "plain failure" {
		t.Errorf("err: rejection %v", err)
	}
	if _, err := await(t, f.Invoke("panic")); err.IsNull() || !strings.Contains(err.Get("message").String(), "internal error") {
		t.Errorf("panic: rejection %v", err)
	}
}

func TestValidateReply(t *testing.T) {
	doc, _ := uncertainty.Demo().Marshal()
	var ok validation
	if err := json.Unmarshal([]byte(validate(string(doc))), &ok); err != nil || !ok.OK || ok.Scenario == nil {
		t.Fatalf("demo: %+v, %v", ok, err)
	}
	bad := uncertainty.Demo()
	bad.TemperatureC = 150 // water's liquid range at 0.1 MPa ends at the boiling point (IAPWS; common practice, no source)
	doc, _ = bad.Marshal()
	var v validation
	json.Unmarshal([]byte(validate(string(doc))), &v)
	if v.OK || v.Field == "" || v.Message == "" {
		t.Errorf("150 °C water: %+v; want a message naming a field", v)
	}
	json.Unmarshal([]byte(validate(`{"format":`)), &v)
	if v.OK || v.Message == "" {
		t.Errorf("broken JSON: %+v", v)
	}
}

func TestFloat64sRoundTrip(t *testing.T) {
	in := []float64{0, -1.5, 1e-300, 3.141592653589793, 6.02214076e23}
	out := float64sFromJS(float64sToJS(in))
	if len(out) != len(in) {
		t.Fatalf("%d values back of %d", len(out), len(in))
	}
	for i := range in {
		if out[i] != in[i] {
			t.Errorf("value %d: %v back, want %v", i, out[i], in[i])
		}
	}
	if n := len(float64sFromJS(float64sToJS(nil))); n != 0 {
		t.Errorf("empty: %d values", n)
	}
}
