//go:build js && wasm

package main

import (
	"context"
	"reflect"
	"syscall/js"
	"testing"

	"sizebudget/uncertainty"
)

// helperPorts makes n MessageChannels whose far ends are served by computeChunks in this same
// instance, as helper workers would serve them, and returns the near ends for newPool.
func helperPorts(t *testing.T, n int) js.Value {
	t.Helper()
	ports := js.Global().Get("Array").New()
	for range n {
		ch := js.Global().Get("MessageChannel").New()
		far := ch.Get("port2")
		f := js.FuncOf(func(_ js.Value, args []js.Value) any {
			computeChunks(args[0].Get("data"), far)
			return nil
		})
		far.Set("onmessage", f)
		ports.Call("push", ch.Get("port1"))
		t.Cleanup(func() {
			ch.Get("port1").Call("close")
			far.Call("close")
			f.Release()
		})
	}
	return ports
}

// TestPoolMatchesPropagate checks that a propagation split over helpers gives exactly the result of
// the engine's own Propagate: the same values, intervals, runs and convergence, for a fixed number of
// trials and for the adaptive procedure (JCGM 101 7.9.4), on one to three helpers.
func TestPoolMatchesPropagate(t *testing.T) {
	ctx := context.Background()
	spec := uncertainty.TrialSpec{Scenario: uncertainty.Demo().Defaults(), Frames: 30, Tracks: 50}
	m, engine, err := uncertainty.TrialModel(spec)
	if err != nil {
		t.Fatal(err)
	}
	spec.Engine = engine
	for _, tc := range []struct {
		name    string
		opt     uncertainty.Options
		helpers []int
	}{
		{"fixed", uncertainty.Options{Coverage: 0.95, Trials: 12345, Seed: 7, Workers: 1}, []int{1, 2, 3}},
		{"adaptive", uncertainty.Options{Coverage: 0.95, Seed: 3, Workers: 1}, []int{2}},
	} {
		want, err := uncertainty.Propagate(ctx, m, tc.opt)
		if err != nil {
			t.Fatal(err)
		}
		for _, n := range tc.helpers {
			p := newPool(helperPorts(t, n))
			var calls [][2]int
			opt := tc.opt
			opt.Progress = func(done, planned int) { calls = append(calls, [2]int{done, planned}) }
			got, err := p.propagate(ctx, spec, opt)
			if err != nil {
				t.Fatalf("%s on %d helpers: %v", tc.name, n, err)
			}
			if !reflect.DeepEqual(got, want) {
				t.Errorf("%s on %d helpers: result differs from Propagate's:\n got  %+v\n want %+v", tc.name, n, summary(got), summary(want))
			}
			if len(calls) == 0 || calls[len(calls)-1] != [2]int{want.Trials, want.Trials} {
				t.Errorf("%s on %d helpers: progress %v, want it to end at %d of %d", tc.name, n, calls, want.Trials, want.Trials)
			}
			for i := 1; i < len(calls); i++ {
				if calls[i][0] < calls[i-1][0] || calls[i][1] < calls[i-1][1] {
					t.Errorf("%s: progress went back: %v then %v", tc.name, calls[i-1], calls[i])
				}
			}
		}
	}
}

// TestPoolHelperError checks that a helper's error comes back as the propagation's error.
func TestPoolHelperError(t *testing.T) {
	spec := uncertainty.TrialSpec{Scenario: uncertainty.Demo().Defaults(), Frames: 1} // too few frames for a model
	p := newPool(helperPorts(t, 2))
	if _, err := p.propagate(context.Background(), spec, uncertainty.Options{Trials: 5000, Seed: 1}); err == nil {
		t.Fatal("no error from helpers that cannot build the model")
	}
}

func summary(r *uncertainty.Result) any {
	if r == nil {
		return nil
	}
	s := *r
	s.Values = nil
	return s
}
