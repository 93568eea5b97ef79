//go:build js && wasm

package main

import (
	"context"
	"encoding/json"
	"fmt"
	"syscall/js"
	"time"
	"unsafe"

	"sizebudget/uncertainty"
)

// installHelper installs globalThis.sizebudgetWorker in a helper Web Worker:
//
//	chunks(message, port)   message {type: "chunks", job, spec, options, first, count} from the
//	                        coordinator; computes the chunks (blocking this worker, which has nothing
//	                        else to do) and answers on port with {type: "progress", job, done} after
//	                        chunks and {type: "values", job, values: Float64Array} or
//	                        {type: "error", job, message}.
func installHelper(g js.Value) {
	w := js.Global().Get("Object").New()
	w.Set("chunks", syncFunc(func(args []js.Value) (any, error) {
		if len(args) < 2 {
			return nil, fmt.Errorf("chunks needs a message and a port")
		}
		computeChunks(args[0], args[1])
		return nil, nil
	}))
	g.Set("sizebudgetWorker", w)
}

func computeChunks(msg, port js.Value) {
	job := msg.Get("job").Int()
	fail := func(err error) {
		port.Call("postMessage", map[string]any{"type": "error", "job": job, "message": err.Error()})
	}
	defer func() {
		if v := recover(); v != nil {
			fail(panicError(v))
		}
	}()
	var spec uncertainty.TrialSpec
	if err := json.Unmarshal([]byte(msg.Get("spec").String()), &spec); err != nil {
		fail(fmt.Errorf("chunks: bad spec: %v", err))
		return
	}
	var co chunkOptions
	if err := json.Unmarshal([]byte(msg.Get("options").String()), &co); err != nil {
		fail(fmt.Errorf("chunks: bad options: %v", err))
		return
	}
	m, _, err := uncertainty.TrialModel(spec)
	if err != nil {
		fail(err)
		return
	}
	opt := co.options()
	var last time.Time
	opt.Progress = func(done, planned int) {
		if now := time.Now(); now.Sub(last) >= progressEvery {
			last = now
			port.Call("postMessage", map[string]any{"type": "progress", "job": job, "done": done})
		}
	}
	vals, err := uncertainty.RunChunks(context.Background(), m, opt, msg.Get("first").Int(), msg.Get("count").Int())
	if err != nil {
		fail(err)
		return
	}
	arr := float64sToJS(vals)
	port.Call("postMessage", map[string]any{"type": "values", "job": job, "values": arr}, []any{arr.Get("buffer")})
}

// float64sToJS copies v into a new Float64Array.
func float64sToJS(v []float64) js.Value {
	u8 := js.Global().Get("Uint8Array").New(len(v) * 8)
	if len(v) > 0 {
		js.CopyBytesToJS(u8, unsafe.Slice((*byte)(unsafe.Pointer(&v[0])), len(v)*8))
	}
	return js.Global().Get("Float64Array").New(u8.Get("buffer"))
}

// float64sFromJS copies a Float64Array into a new slice.
func float64sFromJS(a js.Value) []float64 {
	n := a.Get("length").Int()
	v := make([]float64, n)
	if n > 0 {
		u8 := js.Global().Get("Uint8Array").New(a.Get("buffer"), a.Get("byteOffset"), n*8)
		js.CopyBytesToGo(unsafe.Slice((*byte)(unsafe.Pointer(&v[0])), n*8), u8)
	}
	return v
}
