package uncertainty

import (
	"context"
	"strings"
	"testing"
)

func TestPlannerRecommendsTheSmallest(t *testing.T) {
	// The recommendation meets the target by simulation and one frame fewer does not (same seed and
	// trial count as the planner's confirmation runs).
	for _, edit := range []func(*Scenario){
		func(s *Scenario) {},
		func(s *Scenario) { s.Estimator, s.TargetRelU = "known-noise", 0.08 },
		func(s *Scenario) { s.LocalisationNM, s.Tracks, s.TargetRelU = 120, 40, 0.1 },
	} {
		s := Demo()
		edit(&s)
		res, err := Plan(context.Background(), s, PlanOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if res.RecommendedMinFrames == nil || res.TargetReachable == nil || !*res.TargetReachable {
			t.Fatalf("%s/%g: no recommendation: %s", s.Estimator, s.LocalisationNM, res.Unreachable)
		}
		n := *res.RecommendedMinFrames
		at := func(frames int) float64 {
			r, _, err := runMC(context.Background(), res.Scenario, frames, s.Tracks, plannerTrials, PlanOptions{}, &progress{})
			if err != nil {
				t.Fatal(err)
			}
			return (r.High - r.Low) / (2 * res.RadiusNM)
		}
		if v := at(n); v > s.TargetRelU {
			t.Errorf("at the recommended %d frames U/r = %.5f > target %.3g", n, v, s.TargetRelU)
		}
		if v := at(n - 1); v <= s.TargetRelU {
			t.Errorf("at %d frames, one fewer than recommended, U/r = %.5f already meets %.3g", n-1, v, s.TargetRelU)
		}
		t.Logf("%s σ=%g nm, %d tracks, target %.3g: %d frames", s.Estimator, s.LocalisationNM, s.Tracks, s.TargetRelU, n)
		// The curve is analytic, decreasing, and holds the recommendation.
		found := false
		for i, p := range res.Curve {
			if p.Frames == n {
				found = true
			}
			if i > 0 && p.RelExpanded > res.Curve[i-1].RelExpanded {
				t.Errorf("curve rises from %d to %d frames", res.Curve[i-1].Frames, p.Frames)
			}
		}
		if !found || len(res.Curve) < 20 {
			t.Errorf("curve of %d points lacks the recommendation %d", len(res.Curve), n)
		}
	}
}

func TestPlannerUnreachable(t *testing.T) {
	s := Demo()
	s.TemperatureUK, s.TargetRelU = 3, 0.05 // ±3 K rect: about 4.5 % on r, k·u > 5 % with the rest
	res, err := Plan(context.Background(), s, PlanOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if res.TargetReachable == nil || *res.TargetReachable || res.RecommendedMinFrames != nil {
		t.Fatalf("reachable = %v, frames = %v", res.TargetReachable, res.RecommendedMinFrames)
	}
	if !strings.Contains(res.Unreachable, "temperature dominates") {
		t.Errorf("reason does not name temperature: %q", res.Unreachable)
	}
	// No target: no verdict either way.
	s.TargetRelU = 0
	if res, err = Plan(context.Background(), s, PlanOptions{}); err != nil || res.TargetReachable != nil {
		t.Errorf("no target: reachable = %v, err = %v", res.TargetReachable, err)
	}
}

func TestPlannerFocusLimit(t *testing.T) {
	// A 3 µm slab holds a 50 nm bead (D ≈ 4.9 µm²/s) for h²/(12D) ≈ 0.15 s, about 5 frames at 30 /s:
	// the planner warns and asks for more tracks at the frames a particle can give.
	s := Demo()
	s.FocusDepthUM, s.TargetRelU = 3, 0.06
	res, err := Plan(context.Background(), s, PlanOptions{})
	if err != nil {
		t.Fatal(err)
	}
	f := res.Focus
	if f == nil {
		t.Fatal("no focus summary")
	}
	if *res.RecommendedMinFrames <= f.ReachableFrames {
		t.Skipf("recommendation %d within reachable %d", *res.RecommendedMinFrames, f.ReachableFrames)
	}
	if f.RecommendedTracks == nil || *f.RecommendedTracks <= s.Tracks {
		t.Errorf("tracks at %d frames: %v (scenario has %d)", f.ReachableFrames, f.RecommendedTracks, s.Tracks)
	}
	warned := false
	for _, w := range res.Warnings {
		warned = warned || strings.HasPrefix(w, "focus:")
	}
	if !warned {
		t.Error("no focus warning")
	}
	t.Logf("focus %g µm: %.3g frames expected, %d reachable, %v tracks", f.DepthUM, f.ExpectedFrames, f.ReachableFrames, *f.RecommendedTracks)
}

func TestCheckVerdicts(t *testing.T) {
	s := Demo()
	s.ReportedRadiusNM, s.ReportedK, s.ReportedUNM = 50, 2, 1
	s.TargetRelU = 0
	ach, err := Plan(context.Background(), s, PlanOptions{NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	a := ach.RelExpanded // achievable relative expanded uncertainty at 95 %
	for _, c := range []struct {
		factor float64
		want   string
	}{{0.2, VerdictBelowBound}, {1.3, VerdictConsistent}, {2.5, VerdictConservative}} {
		s.ReportedUNM = c.factor * a * 50 * 2 / 1.959964 // so that U/k·z = factor·a·r
		res, err := Check(context.Background(), s, PlanOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if res.Verdict != c.want {
			t.Errorf("reported %.2f× achievable: verdict %q, want %q (%s)", c.factor, res.Verdict, c.want, res.Explanation)
		}
		if !(res.BoundRelU <= res.AchievableRelU) {
			t.Errorf("bound %.4g above achievable %.4g", res.BoundRelU, res.AchievableRelU)
		}
	}
	// Between the bound and the achievable: optimistic. At high noise the CVE is far from the bound.
	s.LocalisationNM = 300
	s.ReportedUNM = 0
	s.ReportedRadiusNM = 50
	hi, err := Check(context.Background(), withU(s, 1), PlanOptions{})
	if err != nil {
		t.Fatal(err)
	}
	mid := (hi.BoundRelU + hi.AchievableRelU) / 2
	res, err := Check(context.Background(), withU(s, mid*50*2/1.959964), PlanOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Verdict != VerdictOptimistic {
		t.Errorf("between bound %.4g and achievable %.4g: verdict %q", res.BoundRelU, res.AchievableRelU, res.Verdict)
	}
	// Missing reported figures are field errors.
	s.ReportedRadiusNM, s.ReportedUNM = 0, 0
	if _, err := Check(context.Background(), s, PlanOptions{}); err == nil || !strings.Contains(err.Error(), "reported_radius_nm") {
		t.Errorf("missing reported radius: %v", err)
	}
}

func withU(s Scenario, u float64) Scenario { s.ReportedUNM = u; return s }
