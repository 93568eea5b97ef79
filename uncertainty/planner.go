package uncertainty

import (
	"context"
	"fmt"
	"math"

	"sizebudget/core"
)

// plan fills the planner fields of res: the smallest frames per track that reach the target at the
// scenario's number of tracks, searched on the GUM model and confirmed by simulation (the Monte Carlo
// relative expanded uncertainty at the recommendation is ≤ target and one frame fewer is above it);
// when a focal depth limits the frames a particle can give, the tracks needed at those frames; and the
// analytic curve of relative expanded uncertainty against frames.
func (u *setup) plan(ctx context.Context, res *PlanResult, opt PlanOptions, pr *progress) error {
	target := u.s.TargetRelU
	defer func() { res.Curve = u.curve(res.RecommendedMinFrames) }()
	if target == 0 {
		return nil
	}
	no := false
	res.TargetReachable = &no
	b := u.budget(u.groups)
	kInf := coverageFactor(u.p, math.Inf(1))
	if fixed := kInf * math.Sqrt(b.fixedRelVar()); fixed >= target {
		src := b.dominantFixed()
		res.Unreachable = fmt.Sprintf("the sources that do not shrink with frames already give %.3g %% > target %.3g %%; %s dominates (%.3g %% alone)",
			100*fixed, 100*target, src, 100*kInf*relUOf(b, src))
		return nil
	}
	gum := func(frames int) float64 { return u.budget(uniform(frames, u.tracks)).RelExpanded }
	if gum(MaxFrames) > target {
		res.Unreachable = fmt.Sprintf("even %d frames per track with %d tracks give %.3g %% > target %.3g %%; use more tracks", MaxFrames, u.tracks, 100*gum(MaxFrames), 100*target)
		return nil
	}
	first := searchInt(u.minFrames(), MaxFrames, func(n int) bool { return gum(n) <= target })
	mcAt := func(frames, tracks int) (float64, error) {
		r, _, err := runMC(ctx, u.s, frames, tracks, plannerTrials, opt, pr)
		if err != nil {
			return 0, err
		}
		return (r.High - r.Low) / (2 * u.r0 * 1e9), nil
	}
	n, ok, err := confirm(first, u.minFrames(), MaxFrames, func(n int) (bool, error) {
		v, err := mcAt(n, u.tracks)
		return v <= target, err
	})
	if err != nil {
		return err
	}
	if !ok {
		res.Unreachable = fmt.Sprintf("the Monte Carlo does not reach %.3g %% with up to %d frames per track", 100*target, MaxFrames)
		return nil
	}
	res.RecommendedMinFrames = &n
	yes := true
	res.TargetReachable = &yes
	if u.s.FocusDepthUM > 0 {
		return u.planFocus(res, n, mcAt)
	}
	return nil
}

// planFocus reports the residence in the focal slab and, when particles leave it before the recommended
// number of frames, the tracks needed at the frames they can give.
func (u *setup) planFocus(res *PlanResult, frames int, mcAt func(frames, tracks int) (float64, error)) error {
	h := u.s.FocusDepthUM * 1e-6
	f := &FocusSummary{DepthUM: u.s.FocusDepthUM, MeanResidenceS: core.MeanResidence(h, u.D0),
		ExpectedFrames: core.ExpectedFrames(h, u.D0, u.dt, MaxFrames)}
	res.Focus = f
	f.ReachableFrames = max(u.minFrames(), int(math.Floor(f.ExpectedFrames)))
	if frames <= f.ReachableFrames {
		return nil
	}
	res.Warnings = append(res.Warnings, fmt.Sprintf("focus: particles stay in a %.3g µm focal slab for %.3g frames on average, fewer than the %d recommended; more tracks of %d frames are suggested instead",
		f.DepthUM, f.ExpectedFrames, frames, f.ReachableFrames))
	target := u.s.TargetRelU
	gum := func(m int) float64 { return u.budget(uniform(f.ReachableFrames, m)).RelExpanded }
	if gum(MaxTracks) > target {
		return nil
	}
	first := searchInt(1, MaxTracks, func(m int) bool { return gum(m) <= target })
	m, ok, err := confirm(first, 1, MaxTracks, func(m int) (bool, error) {
		v, err := mcAt(f.ReachableFrames, m)
		return v <= target, err
	})
	if err != nil {
		return err
	}
	if ok {
		f.RecommendedTracks = &m
		f.TracksReachTarget = true
	}
	return nil
}

// minFrames is the fewest positions per track the estimator accepts.
func (u *setup) minFrames() int {
	n := MinFrames
	if u.s.Estimator == "msd" {
		n = 4
	}
	if u.s.DriftRemoved && u.s.DriftUMPerS > 0 {
		n = max(n, 4)
	}
	return n
}

// relUOf returns the relative standard uncertainty of the named source.
func relUOf(b Budget, name string) float64 {
	for _, x := range b.Sources {
		if x.Source == name {
			return x.RelU
		}
	}
	return 0
}

// searchInt returns the smallest n in [lo, hi] with ok(n), for ok monotone (false … false true … true);
// hi when none is below it.
func searchInt(lo, hi int, ok func(int) bool) int {
	for lo < hi {
		mid := lo + (hi-lo)/2
		if ok(mid) {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return lo
}

// confirm starts from a guess and finds, with an expensive monotone test, the smallest n in [lo, hi]
// with pass(n) true and pass(n−1) false (or n = lo): stepping away from the guess by doubling steps
// until the answer changes, then bisecting. ok is false when even hi fails.
func confirm(guess, lo, hi int, pass func(int) (bool, error)) (n int, ok bool, err error) {
	cache := map[int]bool{}
	test := func(n int) (bool, error) {
		if v, seen := cache[n]; seen {
			return v, nil
		}
		v, err := pass(n)
		cache[n] = v
		return v, err
	}
	g, err := test(guess)
	if err != nil {
		return 0, false, err
	}
	var a, z int // a fails (or is lo−1), z passes
	if g {
		z = guess
		step := 1
		for {
			c := max(lo-1, z-step)
			if c < lo {
				a = lo - 1
				break
			}
			v, err := test(c)
			if err != nil {
				return 0, false, err
			}
			if !v {
				a = c
				break
			}
			z = c
			step *= 2
		}
	} else {
		a = guess
		step := 1
		for {
			c := min(hi, a+step)
			v, err := test(c)
			if err != nil {
				return 0, false, err
			}
			if v {
				z = c
				break
			}
			if c == hi {
				return 0, false, nil
			}
			a = c
			step *= 2
		}
	}
	for z-a > 1 {
		mid := a + (z-a)/2
		v, err := test(mid)
		if err != nil {
			return 0, false, err
		}
		if v {
			z = mid
		} else {
			a = mid
		}
	}
	return z, true, nil
}

// curve is the analytic (GUM) relative expanded uncertainty at about 40 frame counts spaced evenly on
// a log axis from the fewest allowed to well past the scenario's frames and the recommendation.
func (u *setup) curve(rec *int) []CurvePoint {
	top := 10 * u.frames
	if rec != nil {
		top = max(top, 4**rec)
	}
	top = min(top, MaxFrames)
	lo := u.minFrames()
	set := map[int]bool{u.frames: true}
	if rec != nil {
		set[*rec] = true
	}
	const n = 40
	for i := 0; i <= n; i++ {
		f := int(math.Round(float64(lo) * math.Pow(float64(top)/float64(lo), float64(i)/n)))
		set[f] = true
	}
	var pts []CurvePoint
	for f := lo; f <= top; f++ {
		if set[f] {
			pts = append(pts, CurvePoint{Frames: f, RelExpanded: u.budget(uniform(f, u.tracks)).RelExpanded})
		}
	}
	return pts
}
