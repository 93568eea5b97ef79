//go:build js && wasm

package main

import (
	"context"
	"encoding/json"
	"fmt"
	"sync/atomic"
	"syscall/js"
	"time"

	"sizebudget/uncertainty"
)

// progressEvery is the least time between two progress messages to the page (the last one is always
// sent): often enough for a smooth bar, rare enough not to flood the page.
const progressEvery = 50 * time.Millisecond

// installCoordinator installs globalThis.sizebudgetWorker in the coordinating Web Worker:
//
//	attach(ports)                           MessagePorts of the helper workers (none: compute here)
//	run(kind, id, scenario, options[, file]) kind "plan" or "check"; returns at once, then posts
//	                                        {type: "progress", id, done, planned} while computing and
//	                                        finally {type: "result", id, result, charts} or
//	                                        {type: "error", id, error}
//	                                        kind "analyze": scenario is the JSON of the analysis
//	                                        settings and file the track file (a Blob); see analyze
//
// options is JSON: {"engine": ""} (forces the track-statistics engine; "" picks the fastest exact one).
func installCoordinator(g js.Value) {
	c := &coordinator{}
	w := js.Global().Get("Object").New()
	w.Set("attach", syncFunc(func(args []js.Value) (any, error) {
		if len(args) < 1 || args[0].Type() != js.TypeObject {
			return nil, fmt.Errorf("attach needs an array of MessagePorts")
		}
		c.pool = newPool(args[0])
		return c.pool.size(), nil
	}))
	w.Set("run", syncFunc(func(args []js.Value) (any, error) {
		kind, err := argString(args, 0, "kind")
		if err != nil {
			return nil, err
		}
		if kind != "plan" && kind != "check" && kind != "analyze" {
			return nil, fmt.Errorf("run: kind must be \"plan\", \"check\" or \"analyze\", not %q", kind)
		}
		if len(args) < 2 {
			return nil, fmt.Errorf("run needs a job id")
		}
		id := args[1].Int()
		text, err := argString(args, 2, "scenario")
		if err != nil {
			return nil, err
		}
		var opts struct {
			Engine string `json:"engine"`
		}
		if o := optString(args, 3); o != "" {
			if err := json.Unmarshal([]byte(o), &opts); err != nil {
				return nil, fmt.Errorf("run: bad options: %v", err)
			}
		}
		var file js.Value
		if kind == "analyze" {
			if len(args) < 5 || !args[4].InstanceOf(js.Global().Get("Blob")) {
				return nil, fmt.Errorf("run: an analysis needs the track file as a Blob or File")
			}
			file = args[4]
		}
		if !c.busy.CompareAndSwap(false, true) {
			return nil, fmt.Errorf("run: job %d is refused, another one is in progress (one job at a time per team)", id)
		}
		go func() {
			defer c.busy.Store(false)
			if kind == "analyze" {
				c.analyze(id, text, file)
				return
			}
			c.run(kind, id, text, opts.Engine)
		}()
		return nil, nil
	}))
	g.Set("sizebudgetWorker", w)
}

type coordinator struct {
	pool *pool       // nil or empty: compute in this worker
	busy atomic.Bool // a job is running: the pool's helpers serve one propagation at a time
}

// errorObject is the form of an error in a message: a plain object {message, field}, since an Error's
// own properties do not survive structured cloning.
func errorObject(err error) map[string]any {
	d := describe(err)
	return map[string]any{"message": d.Message, "field": d.Field}
}

// post sends a message to the page.
func post(msg map[string]any) { js.Global().Call("postMessage", msg) }

// run computes one job and posts its progress and its result. A panic is posted as an error.
func (c *coordinator) run(kind string, id int, text, engine string) {
	defer func() {
		if v := recover(); v != nil {
			post(map[string]any{"type": "error", "id": id, "error": errorObject(panicError(v))})
		}
	}()
	fail := func(err error) { post(map[string]any{"type": "error", "id": id, "error": errorObject(err)}) }
	sc, err := uncertainty.ParseScenario([]byte(text))
	if err != nil {
		fail(err)
		return
	}
	var last time.Time
	opt := uncertainty.PlanOptions{
		Engine:  engine,
		Workers: 1,
		Progress: func(done, planned int) {
			if now := time.Now(); now.Sub(last) >= progressEvery || done == planned {
				last = now
				post(map[string]any{"type": "progress", "id": id, "done": done, "planned": planned})
			}
		},
	}
	if c.pool.size() > 0 {
		opt.Propagate = c.pool.propagate
	}
	ctx := context.Background()
	var (
		result any
		plan   *uncertainty.PlanResult
	)
	if kind == "plan" {
		plan, err = uncertainty.Plan(ctx, sc, opt)
		result = plan
	} else {
		var cr *uncertainty.CheckResult
		cr, err = uncertainty.Check(ctx, sc, opt)
		if cr != nil {
			plan = cr.Plan
		}
		result = cr
	}
	if err != nil {
		fail(err)
		return
	}
	out, err := jsonText(result)
	if err != nil {
		fail(err)
		return
	}
	charts := js.Global().Get("Object").New()
	if plan != nil {
		for name, svg := range planCharts(plan) {
			charts.Set(name, svg)
		}
	}
	post(map[string]any{"type": "result", "id": id, "result": out, "charts": charts})
}
