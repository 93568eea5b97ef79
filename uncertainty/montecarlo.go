package uncertainty

import (
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
)

// Model is a measurement model for the Monte Carlo propagation of distributions (JCGM 101:2008 clauses
// 7.3–7.4: sampling the inputs and evaluating the model). A call fills every element of y with an independent trial value of the output quantity,
// drawing every input quantity from r and from nothing else, so that a trial is a function of the
// generator state alone. Filling many trials per call lets a model sample its inputs in batches.
//
// Propagate calls a Model from several goroutines at once when Options.Workers > 1, each call with its
// own r and y: a Model must not write shared state. A value left unwritten is reported as an error
// (the engine fills y with NaN before the call), as is any non-finite value.
type Model func(r *rand.Rand, y []float64)

// Options control a Monte Carlo propagation. The zero value asks for the adaptive procedure of JCGM
// 101 clause 7.9 at 95 % coverage with two significant digits, seed 0, on all processors.
type Options struct {
	// Coverage is the coverage probability p in (0, 1); 0 means 0.95.
	Coverage float64
	// Trials is the fixed number of Monte Carlo trials M; 0 selects the adaptive procedure of JCGM 101
	// clause 7.9.4 (see RunSize). A fixed M must be at least MinTrials(Coverage).
	Trials int
	// NDig is the number of significant decimal digits n_dig regarded as meaningful in u(y), which sets
	// the numerical tolerance (NumericalTolerance) used by the adaptive procedure; 0 means 2.
	NDig int
	// Seed selects the random streams; the result is a function of (Model, Options without Workers and
	// Progress) alone.
	Seed uint64
	// Workers is the number of goroutines that run chunks; 0 means runtime.GOMAXPROCS(0). It changes the
	// speed, never the result.
	Workers int
	// Chunk is the number of trials per chunk, the unit of work, of seeding, of cancellation and of
	// progress reports; 0 means 1000. It is part of the random layout: changing it changes the values.
	Chunk int
	// MaxTrials caps the adaptive procedure; 0 means 10⁷. It must allow at least two runs. A result
	// that hit the cap has Converged == false.
	MaxTrials int
	// Progress, if not nil, is called after each chunk with the number of trials done and the number
	// planned so far (for the adaptive procedure, the trials of the runs started). Calls are serialised
	// and come from the goroutine that called Propagate or Run.Step.
	Progress func(done, planned int)
}

// Defaults of Options.
const (
	DefaultCoverage  = 0.95
	DefaultNDig      = 2
	DefaultChunk     = 1000
	DefaultMaxTrials = 10_000_000
)

// Result is the outcome of a Monte Carlo propagation (JCGM 101:2008 clauses 7.5–7.9). Quantities have
// the unit of the model values.
type Result struct {
	Trials int    // number of model values M (all runs together)
	Seed   uint64 // Options.Seed of the propagation; 0 from Summarise
	// Mean is the estimate y = (1/M) Σ y_r and StdUnc the standard uncertainty
	// u(y) = √(Σ (y_r − y)² / (M − 1)) (clause 7.6).
	Mean, StdUnc float64
	// Low and High bound the probabilistically symmetric coverage interval (clause 7.7.1).
	Low, High float64
	// ShortLow and ShortHigh bound the shortest coverage interval (clause 7.7.2).
	ShortLow, ShortHigh float64
	Coverage            float64 // coverage probability p
	NDig                int     // significant digits n_dig used for Tolerance
	// Tolerance is the numerical tolerance δ of u(y) at NDig digits (clause 7.9.2).
	Tolerance float64
	// Converged reports that the adaptive procedure (clause 7.9.4) stopped by its stability rule; it is
	// false for a fixed number of trials and when the adaptive procedure hit MaxTrials.
	Converged bool
	// Runs is the number h of applications of the Monte Carlo method of Trials/h values each (clause
	// 7.9.4); 1 for a fixed number of trials.
	Runs int
	// Values are the M model values sorted ascending (a discrete representation of the distribution
	// function, clause 7.5). The caller may drop them.
	Values []float64
}

// Summarise computes a Result from model values (JCGM 101:2008 clauses 7.5–7.7 and 7.9.2): the mean
// and standard uncertainty, the probabilistically symmetric and the shortest 100p % coverage intervals
// and the numerical tolerance of u at ndig digits:
//
//	y = (1/M) Σ y_r,   u²(y) = (1/(M−1)) Σ (y_r − y)²,   [y_low, y_high] as in SymmetricInterval
//
// values is sorted in place (unless it is sorted already) and kept as Result.Values; all statistics are
// computed from the sorted values, so any set of chunks merged in any order gives bit-identical
// results. p = 0 means 0.95 and ndig = 0 means 2. The result has Runs = 1, Seed = 0 and
// Converged = false; callers that know better set them. It returns an error if p or ndig are out of
// range, if a value is not finite or if there are fewer than MinTrials(p) values.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clauses 7.5, 7.6, 7.7 and 7.9.2.
func Summarise(values []float64, p float64, ndig int) (*Result, error) {
	if p == 0 {
		p = DefaultCoverage
	}
	if ndig == 0 {
		ndig = DefaultNDig
	}
	if !(p > 0 && p < 1) {
		return nil, fmt.Errorf("uncertainty: coverage probability = %v is outside the allowed range (0, 1)", p)
	}
	if ndig < 1 || ndig > maxNDig {
		return nil, fmt.Errorf("uncertainty: significant digits = %d is outside the allowed range [1, %d]", ndig, maxNDig)
	}
	for i, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("uncertainty: model value %d is %v, not a finite number", i, v)
		}
	}
	if n := MinTrials(p); len(values) < n {
		return nil, fmt.Errorf("uncertainty: %d model values are too few for a %v coverage interval (need at least %d)", len(values), p, n)
	}
	if !slices.IsSorted(values) {
		slices.Sort(values)
	}
	mean, u := meanStdUnc(values)
	res := &Result{
		Trials:    len(values),
		Mean:      mean,
		StdUnc:    u,
		Coverage:  p,
		NDig:      ndig,
		Tolerance: NumericalTolerance(u, ndig),
		Runs:      1,
		Values:    values,
	}
	res.Low, res.High = SymmetricInterval(values, p)
	res.ShortLow, res.ShortHigh = ShortestInterval(values, p)
	return res, nil
}

// meanStdUnc returns the mean and the sample standard deviation (divisor M − 1) of x by two passes,
// the second correcting the mean for rounding.
func meanStdUnc(x []float64) (mean, sd float64) {
	n := float64(len(x))
	var s float64
	for _, v := range x {
		s += v
	}
	mean = s / n
	var d, d2 float64
	for _, v := range x {
		e := v - mean
		d += e
		d2 += e * e
	}
	mean += d / n
	if len(x) < 2 {
		return mean, 0
	}
	return mean, math.Sqrt(math.Max(0, (d2-d*d/n)/(n-1)))
}

// Merge merges ascending sorted parts (for example the sorted values of RunChunks computed by separate
// workers) into one new ascending slice, ready for Summarise. It panics if a part is not sorted.
func Merge(parts ...[]float64) []float64 {
	bounds := []int{0}
	for _, p := range parts {
		mustSorted(p)
		bounds = append(bounds, bounds[len(bounds)-1]+len(p))
	}
	out := make([]float64, 0, bounds[len(bounds)-1])
	for _, p := range parts {
		out = append(out, p...)
	}
	return mergeRuns(out, bounds, 1)
}

// mergeRuns merges the ascending runs x[bounds[i]:bounds[i+1]] into one ascending slice, by rounds of
// pairwise merges of neighbouring runs (O(n log k) for k runs) shared out to up to workers goroutines.
// The result is x itself or a new slice of the same length; x is overwritten.
func mergeRuns(x []float64, bounds []int, workers int) []float64 {
	if len(bounds) <= 2 {
		return x
	}
	src, dst := x, make([]float64, len(x))
	for len(bounds) > 2 {
		pairs := len(bounds) / 2 // ⌈k/2⌉ tasks: runs 2i and 2i+1, or a lone last run copied
		mergePair := func(i int) {
			lo, mid := bounds[2*i], bounds[2*i+1]
			if 2*i+2 < len(bounds) {
				hi := bounds[2*i+2]
				mergeSorted2(dst[lo:hi], src[lo:mid], src[mid:hi])
			} else {
				copy(dst[lo:mid], src[lo:mid])
			}
		}
		if w := min(workers, pairs); w <= 1 {
			for i := range pairs {
				mergePair(i)
			}
		} else {
			var next atomic.Int64
			var wg sync.WaitGroup
			for range w {
				wg.Go(func() {
					for i := int(next.Add(1)) - 1; i < pairs; i = int(next.Add(1)) - 1 {
						mergePair(i)
					}
				})
			}
			wg.Wait()
		}
		merged := make([]int, 0, pairs+1)
		for i := 0; i < len(bounds); i += 2 {
			merged = append(merged, bounds[i])
		}
		if merged[len(merged)-1] != bounds[len(bounds)-1] {
			merged = append(merged, bounds[len(bounds)-1])
		}
		bounds = merged
		src, dst = dst, src
	}
	return src
}

func mergeSorted2(dst, a, b []float64) {
	i, j, k := 0, 0, 0
	for i < len(a) && j < len(b) {
		if b[j] < a[i] {
			dst[k] = b[j]
			j++
		} else {
			dst[k] = a[i]
			i++
		}
		k++
	}
	k += copy(dst[k:], a[i:])
	copy(dst[k:], b[j:])
}

// Propagate propagates distributions through the model m by the Monte Carlo method of JCGM 101:2008:
// opt.Trials trials, or the adaptive procedure of clause 7.9.4 when opt.Trials is 0 (see RunSize), and
// summarises the values with Summarise.
//
// The trials are cut into chunks of opt.Chunk trials (the last chunk of a run may be shorter) and
// chunk k draws from its own stream, ChaCha8 seeded with the 32 bytes
//
//	Seed (little-endian uint64) ‖ k (little-endian uint64) ‖ "JCGM101 chunk v1"
//
// The values are stored in chunk order, so the result depends on m and on opt's Seed, Trials,
// Coverage, NDig, Chunk and MaxTrials only: not on Workers, not on scheduling, and not on whether the
// run was driven by Propagate, by Run.Step or as pieces by RunChunks. opt.Workers goroutines run the
// chunks; ctx is checked before each chunk and Propagate returns ctx.Err() after the chunks in flight
// end. A model that panics has its panic re-raised in the caller's goroutine. All values are kept:
// 8 bytes per trial, 16 while the final sort merges the parts sorted by several workers.
//
// It returns an error for out-of-range options and for model values that are not finite.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clauses 7 (7.4–7.9).
func Propagate(ctx context.Context, m Model, opt Options) (*Result, error) {
	e, err := newMCEngine(m, opt)
	if err != nil {
		return nil, err
	}
	e.startBlock()
	for !e.finished {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		first, count := e.next, e.blockEnd()-e.next
		if err := e.computeParallel(ctx, first, count, e.values[e.lay.offset(first):], e.lay.offset(first), true); err != nil {
			return nil, err
		}
		e.next += count
		e.endBlock()
	}
	return e.result(e.opt.Workers)
}

// ChunkCount returns the number of chunks of a fixed-size propagation (opt.Trials > 0), to share them
// out with RunChunks. It returns an error for out-of-range options or an adaptive opt.
func ChunkCount(opt Options) (int, error) {
	o, err := opt.normalise()
	if err != nil {
		return 0, err
	}
	if o.Trials == 0 {
		return 0, errors.New("uncertainty: ChunkCount needs a fixed number of trials (Options.Trials > 0)")
	}
	return newChunkLayout(o.Chunk, o.Trials).perBlock, nil
}

// RunChunks returns the model values of chunks first, …, first+count−1 of the propagation described
// by m and opt, in trial order: exactly the values that Propagate computes for those chunks. It lets
// separate workers (for instance two browser Web Workers, each with its own WebAssembly instance) share
// a fixed-size propagation:
//
//	n, _ := ChunkCount(opt)
//	a, _ := RunChunks(ctx, m, opt, 0, n/2)   // worker 1; slices.Sort(a) there
//	b, _ := RunChunks(ctx, m, opt, n/2, n-n/2) // worker 2; slices.Sort(b) there
//	res, _ := Summarise(Merge(a, b), opt.Coverage, opt.NDig) // main thread; res.Seed = opt.Seed
//
// gives a Result identical to Propagate's. With an adaptive opt (Trials 0) the chunks of run h
// (0-based) are h·n, …, (h+1)·n − 1 with n = ⌈RunSize(p)/Chunk⌉, up to the runs allowed by MaxTrials;
// the stopping rule then has to be applied by the caller (Run does it for one worker). RunChunks uses
// opt.Workers goroutines and reports progress through opt.Progress. It returns an error for
// out-of-range options, chunk indices beyond the propagation, a cancelled ctx or non-finite values.
func RunChunks(ctx context.Context, m Model, opt Options, first, count int) ([]float64, error) {
	e, err := newMCEngine(m, opt)
	if err != nil {
		return nil, err
	}
	total := e.lay.perBlock * e.maxBlocks
	if first < 0 || count < 0 || first+count > total {
		return nil, fmt.Errorf("uncertainty: chunks [%d, %d) are outside the %d chunks of this propagation", first, first+count, total)
	}
	if count == 0 {
		return []float64{}, nil
	}
	base := e.lay.offset(first)
	end := e.lay.offset(first+count-1) + e.lay.size(first+count-1)
	dst := make([]float64, end-base)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := e.computeParallel(ctx, first, count, dst, base, false); err != nil {
		return nil, err
	}
	return dst, nil
}

// Run is an incremental, single-threaded driver of the same propagation as Propagate, for hosts that
// must not block (a WebAssembly worker that has to answer messages between chunks): call Step until it
// reports done, then Result. Its values are identical to Propagate's for the same Model and Options.
// A Run is not safe for concurrent use.
type Run struct {
	e    *mcEngine
	src  *rand.ChaCha8
	rng  *rand.Rand
	res  *Result
	err  error
	done bool
}

// NewRun prepares a propagation of m under opt (opt.Workers is ignored: a Run uses the caller's
// goroutine). It returns an error for out-of-range options.
func NewRun(m Model, opt Options) (*Run, error) {
	e, err := newMCEngine(m, opt)
	if err != nil {
		return nil, err
	}
	e.startBlock()
	src := rand.NewChaCha8([32]byte{})
	return &Run{e: e, src: src, rng: rand.New(src)}, nil
}

// Step runs whole chunks, as many as fit in maxTrials more trials and at least one, and reports
// whether the propagation has finished (by its fixed size, by the stability rule or by MaxTrials, or
// by an error that Result returns). Calling Step after it reported done does nothing.
func (r *Run) Step(maxTrials int) (done bool) {
	e := r.e
	budget := maxTrials
	for first := true; !r.done; first = false {
		if e.finished {
			r.finish()
			break
		}
		k := e.next
		n := e.lay.size(k)
		if !first && n > budget {
			break
		}
		off := e.lay.offset(k)
		if err := e.fill(r.rng, r.src, k, e.values[off:off+n], off); err != nil {
			r.err, r.done = err, true
			break
		}
		e.next++
		budget -= n
		if e.opt.Progress != nil {
			e.opt.Progress(off+n, len(e.values))
		}
		if e.next%e.lay.perBlock == 0 { // the chunk ended its block
			e.endBlock()
		}
	}
	return r.done
}

// Progress returns the trials done and the trials planned so far (for the adaptive procedure, the
// trials of the runs started).
func (r *Run) Progress() (done, planned int) {
	return r.e.lay.offset(r.e.next), len(r.e.values)
}

// Result returns the result of a finished Run, or the error that stopped it; before Step reported
// done it returns an error saying so.
func (r *Run) Result() (*Result, error) {
	if !r.done {
		return nil, errors.New("uncertainty: Run.Result called before Step reported done")
	}
	return r.res, r.err
}

func (r *Run) finish() {
	r.done = true
	r.res, r.err = r.e.result(1)
}

// chunkLayout cuts the trials into blocks (the runs of the adaptive procedure, or the single block of a
// fixed-size propagation) and each block into chunks of chunk trials, the last one possibly shorter.
type chunkLayout struct {
	chunk, block, perBlock int
}

func newChunkLayout(chunk, block int) chunkLayout {
	if chunk > block {
		chunk = block
	}
	return chunkLayout{chunk: chunk, block: block, perBlock: (block + chunk - 1) / chunk}
}

// offset returns the index of the first trial of chunk k.
func (l chunkLayout) offset(k int) int {
	return (k/l.perBlock)*l.block + (k%l.perBlock)*l.chunk
}

// size returns the number of trials of chunk k.
func (l chunkLayout) size(k int) int {
	if j := k % l.perBlock; j == l.perBlock-1 {
		return l.block - j*l.chunk
	}
	return l.chunk
}

// chunkStreamSeed returns the ChaCha8 seed of chunk k (see Propagate).
func chunkStreamSeed(seed uint64, k int) [32]byte {
	var s [32]byte
	binary.LittleEndian.PutUint64(s[0:], seed)
	binary.LittleEndian.PutUint64(s[8:], uint64(k))
	copy(s[16:], "JCGM101 chunk v1")
	return s
}

// normalise fills in the defaults and checks the ranges.
func (o Options) normalise() (Options, error) {
	if o.Coverage == 0 {
		o.Coverage = DefaultCoverage
	}
	if o.NDig == 0 {
		o.NDig = DefaultNDig
	}
	if o.Workers == 0 {
		o.Workers = runtime.GOMAXPROCS(0)
	}
	if o.Chunk == 0 {
		o.Chunk = DefaultChunk
	}
	if o.MaxTrials == 0 {
		o.MaxTrials = DefaultMaxTrials
	}
	switch {
	case !(o.Coverage > 0 && o.Coverage < 1):
		return o, fmt.Errorf("uncertainty: coverage probability = %v is outside the allowed range (0, 1)", o.Coverage)
	case o.NDig < 1 || o.NDig > maxNDig:
		return o, fmt.Errorf("uncertainty: significant digits = %d is outside the allowed range [1, %d]", o.NDig, maxNDig)
	case o.Workers < 1:
		return o, fmt.Errorf("uncertainty: workers = %d is outside the allowed range [1, ∞)", o.Workers)
	case o.Chunk < 1:
		return o, fmt.Errorf("uncertainty: chunk = %d trials is outside the allowed range [1, ∞)", o.Chunk)
	case o.Trials < 0:
		return o, fmt.Errorf("uncertainty: trials = %d is outside the allowed range [0, ∞) (0: adaptive)", o.Trials)
	case o.Trials > 0 && o.Trials < MinTrials(o.Coverage):
		return o, fmt.Errorf("uncertainty: trials = %d is outside the allowed range [%d, ∞) for coverage %v",
			o.Trials, MinTrials(o.Coverage), o.Coverage)
	case o.Trials == 0 && o.MaxTrials < 2*RunSize(o.Coverage):
		return o, fmt.Errorf("uncertainty: max trials = %d is outside the allowed range [%d, ∞) (two adaptive runs)",
			o.MaxTrials, 2*RunSize(o.Coverage))
	}
	return o, nil
}

// mcEngine holds the state shared by Propagate, Run and RunChunks.
type mcEngine struct {
	model     Model
	opt       Options // normalised
	lay       chunkLayout
	adaptive  bool
	maxBlocks int          // blocks allowed (1 for a fixed size)
	values    []float64    // values of the blocks started, in trial order
	next      int          // next chunk to compute
	stab      runStability // adaptive only
	finished  bool
	converged bool
}

func newMCEngine(m Model, opt Options) (*mcEngine, error) {
	if m == nil {
		panic("uncertainty: nil Model")
	}
	o, err := opt.normalise()
	if err != nil {
		return nil, err
	}
	e := &mcEngine{model: m, opt: o, adaptive: o.Trials == 0, maxBlocks: 1}
	if e.adaptive {
		run := RunSize(o.Coverage)
		e.lay = newChunkLayout(o.Chunk, run)
		e.maxBlocks = o.MaxTrials / run
		e.stab = runStability{p: o.Coverage, ndig: o.NDig}
	} else {
		e.lay = newChunkLayout(o.Chunk, o.Trials)
	}
	return e, nil
}

// blockEnd returns the chunk index that ends the current block.
func (e *mcEngine) blockEnd() int {
	return (e.next/e.lay.perBlock + 1) * e.lay.perBlock
}

// startBlock makes room for the values of the block about to be computed.
func (e *mcEngine) startBlock() {
	e.values = slices.Grow(e.values, e.lay.block)[:len(e.values)+e.lay.block]
}

// endBlock is called when the chunks of a block are all done: it applies the stopping rule.
func (e *mcEngine) endBlock() {
	if !e.adaptive {
		e.finished = true
		return
	}
	h := e.next / e.lay.perBlock
	e.stab.add(e.values[(h-1)*e.lay.block : h*e.lay.block])
	switch {
	case e.stab.stable():
		e.finished, e.converged = true, true
	case h >= e.maxBlocks:
		e.finished = true
	default:
		e.startBlock()
	}
}

func (e *mcEngine) result(workers int) (*Result, error) {
	res, err := Summarise(sortValues(e.values, workers), e.opt.Coverage, e.opt.NDig)
	if err != nil {
		return nil, err
	}
	res.Seed = e.opt.Seed
	res.Converged = e.converged
	if e.adaptive {
		res.Runs = e.next / e.lay.perBlock
	}
	return res, nil
}

// sortValues sorts x ascending, in place with one worker; with more, it sorts that many parts in
// parallel and merges them into a new slice. Any way of sorting gives the same slice.
func sortValues(x []float64, workers int) []float64 {
	if workers = min(workers, len(x)/(1<<14)); workers <= 1 {
		slices.Sort(x)
		return x
	}
	bounds := make([]int, workers+1)
	for i := range bounds {
		bounds[i] = i * len(x) / workers
	}
	var wg sync.WaitGroup
	for i := range workers {
		wg.Go(func() { slices.Sort(x[bounds[i]:bounds[i+1]]) })
	}
	wg.Wait()
	return mergeRuns(x, bounds, workers)
}

// fill computes chunk k into y (whose first trial has global index off).
func (e *mcEngine) fill(r *rand.Rand, src *rand.ChaCha8, k int, y []float64, off int) error {
	for i := range y {
		y[i] = math.NaN()
	}
	src.Seed(chunkStreamSeed(e.opt.Seed, k))
	e.model(r, y)
	for i, v := range y {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("uncertainty: the model gave %v in trial %d (chunk %d): values must be finite and every element of y written", v, off+i, k)
		}
	}
	return nil
}

// computeParallel computes chunks first, …, first+count−1 into dst, whose element 0 is the trial of
// global index base, with up to opt.Workers goroutines. If top, progress counts from the start of
// the propagation (Propagate); otherwise from the start of dst (RunChunks).
func (e *mcEngine) computeParallel(ctx context.Context, first, count int, dst []float64, base int, top bool) error {
	doneBefore, planned := 0, len(dst)
	if top {
		doneBefore, planned = base, len(e.values)
	}
	progress := func(done int) {
		if e.opt.Progress != nil {
			e.opt.Progress(doneBefore+done, planned)
		}
	}
	slice := func(k int) ([]float64, int) {
		off := e.lay.offset(k)
		return dst[off-base : off-base+e.lay.size(k)], off
	}
	workers := min(e.opt.Workers, count)
	if workers <= 1 {
		src := rand.NewChaCha8([32]byte{})
		r := rand.New(src)
		done := 0
		for k := first; k < first+count; k++ {
			if err := ctx.Err(); err != nil {
				return err
			}
			y, off := slice(k)
			if err := e.fill(r, src, k, y, off); err != nil {
				return err
			}
			done += len(y)
			progress(done)
		}
		return nil
	}

	type report struct {
		n     int // trials done
		err   error
		panic any
		k     int
	}
	var (
		next    atomic.Int64
		stop    atomic.Bool
		wg      sync.WaitGroup
		reports = make(chan report, count)
	)
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			src := rand.NewChaCha8([32]byte{})
			r := rand.New(src)
			k := -1
			defer func() {
				if v := recover(); v != nil {
					stop.Store(true)
					reports <- report{panic: v, k: k}
				}
			}()
			for !stop.Load() && ctx.Err() == nil {
				j := int(next.Add(1)) - 1
				if j >= count {
					return
				}
				k = first + j
				y, off := slice(k)
				if err := e.fill(r, src, k, y, off); err != nil {
					stop.Store(true)
					reports <- report{err: err, k: k}
					return
				}
				reports <- report{n: len(y), k: k}
			}
		}()
	}
	finished := make(chan struct{})
	go func() { wg.Wait(); close(finished) }()

	var (
		firstErr   error
		firstPanic any
		panicked   bool
		done       int
		received   int
	)
	handle := func(rep report) {
		received++
		switch {
		case rep.panic != nil:
			if !panicked {
				firstPanic, panicked = rep.panic, true
			}
		case rep.err != nil:
			if firstErr == nil {
				firstErr = rep.err
			}
		case firstErr == nil && !panicked:
			done += rep.n
			progress(done)
		}
	}
	for received < count && firstErr == nil && !panicked {
		if err := ctx.Err(); err != nil {
			firstErr = err
			break
		}
		select {
		case rep := <-reports:
			handle(rep)
		case <-ctx.Done():
			firstErr = ctx.Err()
		case <-finished:
			// Every worker has left: take what they reported; if chunks are missing, they saw ctx
			// cancelled before the coordinator did.
			for len(reports) > 0 {
				handle(<-reports)
			}
			if firstErr == nil && !panicked && received < count {
				if firstErr = ctx.Err(); firstErr == nil {
					firstErr = errors.New("uncertainty: workers stopped before all chunks were done")
				}
			}
		}
	}
	stop.Store(true)
	<-finished
	if panicked {
		panic(firstPanic)
	}
	return firstErr
}
