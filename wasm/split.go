//go:build js && wasm

package main

import (
	"context"
	"encoding/json"
	"fmt"
	"math/rand/v2"
	"syscall/js"

	"sizebudget/uncertainty"
)

// pool hands the chunks of a Monte Carlo propagation to helper workers over MessagePorts.
//
// A propagation is cut into blocks: the one block of a fixed number of trials, or the runs of the
// adaptive procedure of JCGM 101 7.9.4. Each block's chunks are shared out in contiguous ranges, one
// per helper; each helper computes its range with uncertainty.RunChunks (chunk k always draws from the
// stream of (seed, k), whichever worker computes it) and returns the values in trial order. The
// coordinator then replays the block, in chunk order, into an uncertainty.Run through a Model that
// hands out the values received: the Run applies the engine's own stopping rule and summary, so the
// result is bit for bit the one the native Propagate gives, on any number of helpers.
type pool struct {
	ports   []js.Value
	replies chan helperReply
	funcs   []js.Func
	job     int
}

// helperReply is one message from a helper: progress, values or an error, for job Job.
type helperReply struct {
	helper int
	job    int
	kind   string // "progress", "values", "error"
	done   int    // progress: trials done of the helper's range
	values []float64
	err    error
}

func newPool(ports js.Value) *pool {
	p := &pool{replies: make(chan helperReply, 64)}
	n := ports.Length()
	for i := range n {
		port := ports.Index(i)
		f := js.FuncOf(func(this js.Value, args []js.Value) any {
			rep := readReply(i, args[0].Get("data"))
			go func() { p.replies <- rep }() // never block the event loop
			return nil
		})
		port.Set("onmessage", f)
		p.ports = append(p.ports, port)
		p.funcs = append(p.funcs, f)
	}
	return p
}

func (p *pool) size() int {
	if p == nil {
		return 0
	}
	return len(p.ports)
}

func readReply(helper int, d js.Value) helperReply {
	r := helperReply{helper: helper, job: d.Get("job").Int(), kind: d.Get("type").String()}
	switch r.kind {
	case "progress":
		r.done = d.Get("done").Int()
	case "values":
		r.values = float64sFromJS(d.Get("values"))
	case "error":
		r.err = fmt.Errorf("%s", d.Get("message").String())
	}
	return r
}

// chunkOptions is the part of uncertainty.Options that fixes the random layout and the values of a
// propagation; it travels to the helpers as JSON.
type chunkOptions struct {
	Coverage  float64 `json:"coverage"`
	Trials    int     `json:"trials"`
	NDig      int     `json:"n_dig"`
	Seed      uint64  `json:"seed"`
	Chunk     int     `json:"chunk"`
	MaxTrials int     `json:"max_trials"`
}

func (o chunkOptions) options() uncertainty.Options {
	return uncertainty.Options{Coverage: o.Coverage, Trials: o.Trials, NDig: o.NDig, Seed: o.Seed, Chunk: o.Chunk, MaxTrials: o.MaxTrials, Workers: 1}
}

// propagate is an uncertainty.PlanOptions.Propagate that runs the chunks on the helpers.
func (p *pool) propagate(ctx context.Context, spec uncertainty.TrialSpec, opt uncertainty.Options) (*uncertainty.Result, error) {
	progress := opt.Progress
	co := chunkOptions{Coverage: opt.Coverage, Trials: opt.Trials, NDig: opt.NDig, Seed: opt.Seed, Chunk: opt.Chunk, MaxTrials: opt.MaxTrials}
	if co.Coverage == 0 {
		co.Coverage = uncertainty.DefaultCoverage
	}
	if co.Chunk == 0 {
		co.Chunk = uncertainty.DefaultChunk
	}
	block := co.Trials
	if block == 0 {
		block = uncertainty.RunSize(co.Coverage)
	}
	chunk := min(co.Chunk, block)
	perBlock := (block + chunk - 1) / chunk

	// The replay model hands out the values of the current block, chunk by chunk, in order.
	var buf []float64
	replay := func(_ *rand.Rand, y []float64) {
		n := copy(y, buf)
		buf = buf[n:]
	}
	run, err := uncertainty.NewRun(replay, co.options())
	if err != nil {
		return nil, err
	}
	specText, err := json.Marshal(spec)
	if err != nil {
		return nil, err
	}
	optText, err := json.Marshal(co)
	if err != nil {
		return nil, err
	}
	doneBefore := 0
	for h := 0; ; h++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		planned := doneBefore + block
		vals, err := p.block(ctx, string(specText), string(optText), h*perBlock, perBlock, func(done int) {
			if progress != nil {
				progress(doneBefore+done, planned)
			}
		})
		if err != nil {
			return nil, err
		}
		buf = vals
		done := run.Step(len(vals))
		if len(buf) != 0 {
			return nil, fmt.Errorf("wasm: block %d left %d values unused", h, len(buf))
		}
		doneBefore += len(vals)
		if done {
			break
		}
	}
	return run.Result()
}

// block computes chunks first, …, first+count−1 on the helpers and returns their values in trial order.
// onProgress gets the trials done so far of the block.
func (p *pool) block(ctx context.Context, spec, opt string, first, count int, onProgress func(done int)) ([]float64, error) {
	p.job++
	job := p.job
	n := min(len(p.ports), count)
	parts := make([][]float64, n)
	done := make([]int, n)
	for i := range n {
		lo, hi := first+i*count/n, first+(i+1)*count/n
		p.ports[i].Call("postMessage", map[string]any{"type": "chunks", "job": job, "spec": spec, "options": opt, "first": lo, "count": hi - lo})
	}
	waiting := n
	for waiting > 0 {
		var r helperReply
		select {
		case <-ctx.Done():
			return nil, ctx.Err()
		case r = <-p.replies:
		}
		if r.job != job || r.helper >= n { // a reply to an earlier, abandoned block
			continue
		}
		switch r.kind {
		case "progress":
			done[r.helper] = r.done
			sum := 0
			for _, d := range done {
				sum += d
			}
			onProgress(sum)
		case "values":
			parts[r.helper] = r.values
			waiting--
		case "error":
			return nil, r.err
		}
	}
	total := 0
	for _, part := range parts {
		total += len(part)
	}
	out := make([]float64, 0, total)
	for _, part := range parts {
		out = append(out, part...)
	}
	onProgress(total)
	return out, nil
}
