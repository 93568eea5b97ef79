package uncertainty

import (
	"context"
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"sync/atomic"
	"testing"
)

// sumOfNormals is the model of JCGM 101:2008 clause 9.2.2: Y = X1 + X2 + X3 + X4, X_i ~ N(0, 1).
func sumOfNormals(r *rand.Rand, y []float64) {
	for i := range y {
		y[i] = r.NormFloat64() + r.NormFloat64() + r.NormFloat64() + r.NormFloat64()
	}
}

// quantileSE returns the asymptotic standard error √(P(1−P)/M)/f of the sample quantile at level P
// for a density f there (order-statistic asymptotics, common practice, no source).
func quantileSE(level, density float64, m int) float64 {
	return math.Sqrt(level*(1-level)/float64(m)) / density
}

// stdUncSE returns the asymptotic standard error √((m4 − s⁴)/M)/(2s) of the sample standard
// deviation s, with the fourth central moment m4 estimated from the values (delta method, common
// practice, no source).
func stdUncSE(values []float64, mean, s float64) float64 {
	var m4 float64
	for _, v := range values {
		d := v - mean
		m4 += d * d * d * d
	}
	m4 /= float64(len(values))
	return math.Sqrt(math.Max(m4-s*s*s*s, 0)/float64(len(values))) / (2 * s)
}

// near reports |got − want| ≤ tol and logs the comparison on failure.
func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if !(math.Abs(got-want) <= tol) {
		t.Errorf("%s = %.6g, want %.6g ± %.3g", what, got, want, tol)
	}
}

func TestPropagateJCGM101Clause922(t *testing.T) {
	// JCGM 101:2008 clause 9.2.2 (REFERENCES.md §7, as transcribed): Y = ΣX_i, four X_i ~ N(0, 1);
	// published u(y) = 2.00 and 95 % interval ±3.92. Exact result: Y ~ N(0, 4), so u = 2 and the
	// probabilistically symmetric interval is ±2·Φ⁻¹(0.975).
	const m = 1_000_000
	res, err := Propagate(context.Background(), sumOfNormals, Options{Trials: m, Seed: 922})
	if err != nil {
		t.Fatal(err)
	}
	// Φ⁻¹(0.975) = 1.959964 (standard normal tables, from memory) against the stdlib computation.
	z := normalQuantile(0.975)
	near(t, "Φ⁻¹(0.975)", z, 1.959964, 0.5e-6)

	seMean := 2 / math.Sqrt(m)           // σ/√M
	seU := 2 / math.Sqrt(2*float64(m-1)) // σ/√(2(M−1)) for a normal law
	seEnd := quantileSE(0.025, normalPDF(z)/2, m)
	// Exact law, 4 standard errors:
	near(t, "mean (exact 0)", res.Mean, 0, 4*seMean)
	near(t, "u (exact 2)", res.StdUnc, 2, 4*seU)
	near(t, "y_low (exact −2·1.959964)", res.Low, -2*z, 4*seEnd)
	near(t, "y_high (exact 2·1.959964)", res.High, 2*z, 4*seEnd)
	// Published digits: half a unit in the last printed digit plus 4 standard errors.
	near(t, "mean (published 0.00)", res.Mean, 0.00, 0.005+4*seMean)
	near(t, "u (published 2.00)", res.StdUnc, 2.00, 0.005+4*seU)
	near(t, "y_low (published −3.92)", res.Low, -3.92, 0.005+4*seEnd)
	near(t, "y_high (published 3.92)", res.High, 3.92, 0.005+4*seEnd)

	if res.Trials != m || len(res.Values) != m || !slices.IsSorted(res.Values) {
		t.Errorf("Trials = %d, %d values, sorted %v", res.Trials, len(res.Values), slices.IsSorted(res.Values))
	}
	if res.Runs != 1 || res.Converged || res.Seed != 922 || res.Coverage != 0.95 || res.NDig != 2 {
		t.Errorf("Runs %d Converged %v Seed %d Coverage %v NDig %d; want 1 false 922 0.95 2",
			res.Runs, res.Converged, res.Seed, res.Coverage, res.NDig)
	}
	// δ of u = 2.0 at two digits (JCGM 101 7.9.2): 20 × 10^−1 → 0.05.
	if res.Tolerance != 0.05 {
		t.Errorf("Tolerance = %v, want 0.05", res.Tolerance)
	}
}

// sameResult reports the first difference between two results, compared bit for bit.
func sameResult(a, b *Result) string {
	switch {
	case a.Trials != b.Trials:
		return "Trials"
	case a.Seed != b.Seed:
		return "Seed"
	case a.Mean != b.Mean || a.StdUnc != b.StdUnc:
		return "Mean/StdUnc"
	case a.Low != b.Low || a.High != b.High:
		return "Low/High"
	case a.ShortLow != b.ShortLow || a.ShortHigh != b.ShortHigh:
		return "ShortLow/ShortHigh"
	case a.Coverage != b.Coverage || a.NDig != b.NDig || a.Tolerance != b.Tolerance:
		return "Coverage/NDig/Tolerance"
	case a.Converged != b.Converged || a.Runs != b.Runs:
		return "Converged/Runs"
	case !slices.Equal(a.Values, b.Values):
		return "Values"
	}
	return ""
}

func stepAll(t *testing.T, m Model, opt Options, maxTrials int) *Result {
	t.Helper()
	run, err := NewRun(m, opt)
	if err != nil {
		t.Fatal(err)
	}
	for steps := 0; !run.Step(maxTrials); steps++ {
		if steps > 1e6 {
			t.Fatal("Run did not finish")
		}
	}
	res, err := run.Result()
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func TestPropagateReproducible(t *testing.T) {
	ctx := context.Background()
	// A fixed size that is not a multiple of the chunk (the last chunk is short).
	opt := Options{Trials: 20_345, Chunk: 777, Seed: 7}
	ref, err := Propagate(ctx, sumOfNormals, Options{Trials: opt.Trials, Chunk: opt.Chunk, Seed: opt.Seed, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	check := func(name string, got *Result) {
		t.Helper()
		if d := sameResult(ref, got); d != "" {
			t.Errorf("%s differs from Propagate with one worker in %s", name, d)
		}
	}
	for _, w := range []int{2, 4, 7} {
		o := opt
		o.Workers = w
		res, err := Propagate(ctx, sumOfNormals, o)
		if err != nil {
			t.Fatal(err)
		}
		check("Propagate with more workers", res)
	}
	for _, step := range []int{0, 777, 5000, 1 << 30} {
		check("Run.Step", stepAll(t, sumOfNormals, opt, step))
	}
	// Shares of the chunks, as two or three browser workers would compute them.
	n, err := ChunkCount(opt)
	if err != nil {
		t.Fatal(err)
	}
	if n != 27 { // ⌈20 345 / 777⌉ = 27
		t.Fatalf("ChunkCount = %d, want 27", n)
	}
	for _, cuts := range [][]int{{0, n / 2, n}, {0, 1, 20, n}, {0, n}} {
		var parts [][]float64
		for i := 0; i+1 < len(cuts); i++ {
			o := opt
			o.Workers = 1 + i
			v, err := RunChunks(ctx, sumOfNormals, o, cuts[i], cuts[i+1]-cuts[i])
			if err != nil {
				t.Fatal(err)
			}
			slices.Sort(v)
			parts = append(parts, v)
		}
		res, err := Summarise(Merge(parts...), opt.Coverage, opt.NDig)
		if err != nil {
			t.Fatal(err)
		}
		res.Seed = opt.Seed
		check("RunChunks + Merge + Summarise", res)
	}
	// The adaptive procedure, too.
	aopt := Options{Seed: 11, Chunk: 3000}
	aref, err := Propagate(ctx, sumOfNormals, Options{Seed: 11, Chunk: 3000, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	for _, got := range []*Result{
		must(Propagate(ctx, sumOfNormals, Options{Seed: 11, Chunk: 3000, Workers: 3})),
		stepAll(t, sumOfNormals, aopt, 1),
		stepAll(t, sumOfNormals, aopt, 25_000),
	} {
		if d := sameResult(aref, got); d != "" {
			t.Errorf("adaptive: differs in %s", d)
		}
	}
	// Another seed gives other values (the seed is used at all).
	other, err := Propagate(ctx, sumOfNormals, Options{Trials: opt.Trials, Chunk: opt.Chunk, Seed: 8})
	if err != nil {
		t.Fatal(err)
	}
	if slices.Equal(other.Values, ref.Values) {
		t.Error("seeds 7 and 8 gave the same values")
	}
}

func must(res *Result, err error) *Result {
	if err != nil {
		panic(err)
	}
	return res
}

func TestChunkStreamContract(t *testing.T) {
	// The documented stream of chunk k: ChaCha8 seeded with Seed (LE uint64) ‖ k (LE uint64) ‖
	// "JCGM101 chunk v1". Rebuild chunk 3 of a propagation by hand from that description.
	const seed, chunk = 0xDEADBEEF, 100
	opt := Options{Trials: 1000, Chunk: chunk, Seed: seed}
	got, err := RunChunks(context.Background(), sumOfNormals, opt, 3, 1)
	if err != nil {
		t.Fatal(err)
	}
	var key [32]byte
	binary.LittleEndian.PutUint64(key[:8], seed)
	binary.LittleEndian.PutUint64(key[8:16], 3)
	copy(key[16:], "JCGM101 chunk v1")
	want := make([]float64, chunk)
	sumOfNormals(rand.New(rand.NewChaCha8(key)), want)
	if !slices.Equal(got, want) {
		t.Error("chunk 3 does not follow the documented seeding")
	}
	// RunChunks of everything is Propagate's values before sorting, in trial order.
	all, err := RunChunks(context.Background(), sumOfNormals, opt, 0, 10)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(all[300:400], want) {
		t.Error("RunChunks(0, 10) does not hold chunk 3 at trials 300–399")
	}
	res, err := Propagate(context.Background(), sumOfNormals, opt)
	if err != nil {
		t.Fatal(err)
	}
	slices.Sort(all)
	if !slices.Equal(all, res.Values) {
		t.Error("sorted RunChunks values differ from Propagate's")
	}
}

func TestPropagateCancel(t *testing.T) {
	for _, workers := range []int{1, 2, 4} {
		ctx, cancel := context.WithCancel(context.Background())
		var calls, late atomic.Int64
		model := func(r *rand.Rand, y []float64) {
			calls.Add(1)
			if ctx.Err() != nil {
				late.Add(1)
			}
			sumOfNormals(r, y)
		}
		opt := Options{Trials: 100_000, Chunk: 100, Workers: workers,
			Progress: func(done, planned int) { cancel() }}
		res, err := Propagate(ctx, model, opt)
		if !errors.Is(err, context.Canceled) || res != nil {
			t.Errorf("workers %d: got %v, %v; want nil, context.Canceled", workers, res, err)
		}
		// A chunk may only start after the cancellation if its worker had already passed its check:
		// at most one per worker (and none with a single worker, which checks in the same goroutine).
		if n := late.Load(); n > int64(workers) || (workers == 1 && n > 0) {
			t.Errorf("workers %d: %d chunks started after cancellation", workers, n)
		}
		if workers == 1 && calls.Load() != 1 {
			t.Errorf("one worker: %d chunks ran, want 1", calls.Load())
		}
		cancel()
	}
	// A context cancelled before the start runs nothing.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	called := false
	if _, err := Propagate(ctx, func(r *rand.Rand, y []float64) { called = true }, Options{Trials: 1000}); !errors.Is(err, context.Canceled) || called {
		t.Errorf("pre-cancelled: err %v, model called %v", err, called)
	}
	if _, err := RunChunks(ctx, sumOfNormals, Options{Trials: 1000}, 0, 1); !errors.Is(err, context.Canceled) {
		t.Errorf("pre-cancelled RunChunks: err %v", err)
	}
}

func TestPropagateProgress(t *testing.T) {
	for _, workers := range []int{1, 3} {
		var calls, last, plannedSeen int // plain ints: calls must be serialised (go test -race)
		opt := Options{Trials: 10_500, Chunk: 1000, Workers: workers, Progress: func(done, planned int) {
			calls++
			if done <= last || done > planned {
				t.Errorf("workers %d: progress %d/%d after %d", workers, done, planned, last)
			}
			last, plannedSeen = done, planned
		}}
		if _, err := Propagate(context.Background(), sumOfNormals, opt); err != nil {
			t.Fatal(err)
		}
		if calls != 11 || last != 10_500 || plannedSeen != 10_500 { // ⌈10 500/1000⌉ = 11 chunks
			t.Errorf("workers %d: %d calls, last %d/%d; want 11 calls, 10500/10500", workers, calls, last, plannedSeen)
		}
	}
	// Adaptive: planned grows by whole runs of RunSize(0.95) = 10⁴ trials.
	var last, planned int
	res, err := Propagate(context.Background(), sumOfNormals, Options{Seed: 3, Progress: func(d, p int) {
		if p%10_000 != 0 || d > p || d <= last {
			t.Errorf("adaptive progress %d/%d after %d", d, p, last)
		}
		last, planned = d, p
	}})
	if err != nil {
		t.Fatal(err)
	}
	if last != res.Trials || planned != res.Trials {
		t.Errorf("adaptive: last progress %d/%d, result has %d trials", last, planned, res.Trials)
	}
	// Run reports the same through Progress().
	run, err := NewRun(sumOfNormals, Options{Trials: 5000, Chunk: 1000})
	if err != nil {
		t.Fatal(err)
	}
	run.Step(2000)
	if d, p := run.Progress(); d != 2000 || p != 5000 {
		t.Errorf("Run.Progress after Step(2000) = %d/%d, want 2000/5000", d, p)
	}
	if _, err := run.Result(); err == nil {
		t.Error("Run.Result before done: no error")
	}
	run.Step(0) // at least one chunk
	if d, _ := run.Progress(); d != 3000 {
		t.Errorf("Step(0) ran to %d trials, want 3000", d)
	}
}

func TestPropagateBadModelValues(t *testing.T) {
	models := map[string]Model{
		"NaN": func(r *rand.Rand, y []float64) {
			for i := range y {
				y[i] = r.Float64()
			}
			y[len(y)/2] = math.NaN()
		},
		"Inf": func(r *rand.Rand, y []float64) {
			for i := range y {
				y[i] = 1 / (r.Float64() - 2) // finite ...
			}
			y[0] = math.Inf(-1) // ... but one
		},
		"unwritten": func(r *rand.Rand, y []float64) {
			for i := range y[1:] {
				y[i+1] = r.Float64()
			}
		},
	}
	for name, m := range models {
		for _, w := range []int{1, 2} {
			if _, err := Propagate(context.Background(), m, Options{Trials: 5000, Workers: w}); err == nil {
				t.Errorf("%s, %d workers: no error", name, w)
			}
		}
		run, err := NewRun(m, Options{Trials: 5000})
		if err != nil {
			t.Fatal(err)
		}
		if !run.Step(1000) {
			t.Errorf("%s: Step did not stop on the bad value", name)
		}
		if _, err := run.Result(); err == nil {
			t.Errorf("%s: Run.Result gave no error", name)
		}
		if _, err := RunChunks(context.Background(), m, Options{Trials: 5000}, 1, 2); err == nil {
			t.Errorf("%s: RunChunks gave no error", name)
		}
	}
}

func TestPropagateModelPanic(t *testing.T) {
	defer func() {
		if v := recover(); v != "model bug" {
			t.Errorf("recovered %v, want the model's own panic value", v)
		}
	}()
	var n atomic.Int64
	Propagate(context.Background(), func(r *rand.Rand, y []float64) {
		if n.Add(1) == 3 {
			panic("model bug")
		}
		sumOfNormals(r, y)
	}, Options{Trials: 50_000, Workers: 2})
	t.Error("no panic")
}

func TestOptionsOutOfRange(t *testing.T) {
	for name, opt := range map[string]Options{
		"coverage 1":       {Coverage: 1, Trials: 1000},
		"coverage −0.1":    {Coverage: -0.1, Trials: 1000},
		"coverage NaN":     {Coverage: math.NaN(), Trials: 1000},
		"ndig 16":          {NDig: 16, Trials: 1000},
		"ndig −1":          {NDig: -1, Trials: 1000},
		"workers −1":       {Workers: -1, Trials: 1000},
		"chunk −1":         {Chunk: -1, Trials: 1000},
		"trials −5":        {Trials: -5},
		"trials 10 at 95%": {Trials: 10}, // MinTrials(0.95) = 11
		"max trials 15000": {MaxTrials: 15_000},
	} {
		if _, err := Propagate(context.Background(), sumOfNormals, opt); err == nil {
			t.Errorf("%s: Propagate gave no error", name)
		}
		if _, err := NewRun(sumOfNormals, opt); err == nil {
			t.Errorf("%s: NewRun gave no error", name)
		}
	}
	if _, err := Propagate(context.Background(), sumOfNormals, Options{Trials: 11}); err != nil {
		t.Errorf("11 trials at 95 %%: %v", err)
	}
	if _, err := ChunkCount(Options{}); err == nil {
		t.Error("ChunkCount of an adaptive propagation: no error")
	}
	for _, c := range [][2]int{{-1, 1}, {0, 11}, {9, 2}, {2, -1}} {
		if _, err := RunChunks(context.Background(), sumOfNormals, Options{Trials: 10_000}, c[0], c[1]); err == nil {
			t.Errorf("RunChunks(%d, %d) of 10 chunks: no error", c[0], c[1])
		}
	}
	// The adaptive layout ends where MaxTrials does: 10⁵ trials, 10 runs of 10 chunks.
	if _, err := RunChunks(context.Background(), sumOfNormals, Options{MaxTrials: 100_000}, 99, 1); err != nil {
		t.Errorf("last adaptive chunk: %v", err)
	}
	if _, err := RunChunks(context.Background(), sumOfNormals, Options{MaxTrials: 100_000}, 100, 1); err == nil {
		t.Error("chunk beyond MaxTrials: no error")
	}
}

func TestSummariseAndMerge(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 1001)
	for i := range x {
		x[i] = r.NormFloat64()
	}
	sorted := slices.Sorted(slices.Values(x))
	a, err := Summarise(slices.Clone(x), 0, 0) // unsorted input, default p and n_dig
	if err != nil {
		t.Fatal(err)
	}
	b, err := Summarise(slices.Clone(sorted), 0.95, 2)
	if err != nil {
		t.Fatal(err)
	}
	if d := sameResult(a, b); d != "" {
		t.Errorf("Summarise of unsorted and sorted values differ in %s", d)
	}
	// Mean and u against a direct computation (analytic identity, 1e-12 relative).
	var s float64
	for _, v := range x {
		s += v
	}
	mean := s / float64(len(x))
	var ss float64
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	near(t, "mean", a.Mean, mean, 1e-12)
	near(t, "u", a.StdUnc, math.Sqrt(ss/float64(len(x)-1)), 1e-12*a.StdUnc)
	// Interval indices for M = 1001, p = 0.95: q = ⌊950.95 + ½⌋ = 951, M − q = 50 even → r = 25.
	if a.Low != sorted[24] || a.High != sorted[24+951] {
		t.Errorf("interval [%v, %v], want [y_(25), y_(976)] = [%v, %v]", a.Low, a.High, sorted[24], sorted[975])
	}
	if _, err := Summarise([]float64{1, 2, math.NaN(), 4, 5, 6, 7, 8, 9, 10, 11}, 0.95, 2); err == nil {
		t.Error("NaN value: no error")
	}
	if _, err := Summarise(make([]float64, 10), 0.95, 2); err == nil {
		t.Error("10 values at 95 %: no error")
	}
	if _, err := Summarise(make([]float64, 100), 1.5, 2); err == nil {
		t.Error("p = 1.5: no error")
	}
	if _, err := Summarise(make([]float64, 100), 0.95, 20); err == nil {
		t.Error("ndig = 20: no error")
	}
	// Merge of sorted parts (including empty ones) is the sorted concatenation.
	for _, cuts := range [][]int{{0, 1001}, {0, 500, 1001}, {0, 0, 300, 301, 1001}, {0, 100, 200, 300, 400, 1001, 1001}} {
		var parts [][]float64
		for i := 0; i+1 < len(cuts); i++ {
			parts = append(parts, slices.Sorted(slices.Values(x[cuts[i]:cuts[i+1]])))
		}
		if got := Merge(parts...); !slices.Equal(got, sorted) {
			t.Errorf("Merge of parts cut at %v is not the sorted values", cuts)
		}
	}
	if len(Merge()) != 0 {
		t.Error("Merge() not empty")
	}
	func() {
		defer func() {
			if recover() == nil {
				t.Error("Merge of an unsorted part: no panic")
			}
		}()
		Merge([]float64{2, 1})
	}()
}
