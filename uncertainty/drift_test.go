package uncertainty

import (
	"context"
	"math"
	"testing"
)

func TestDriftShiftsTheInterval(t *testing.T) {
	// A residual drift of speed s ~ U(0, v) that is not removed inflates the CVE by 1.5·s²Δt per axis
	// (core.Spectral's exact mean), i.e. by 1.5·s²Δt/d on the axis average; E[s²] = v²/3. The true
	// radius given the estimate is then larger on average: E[y] = r₀·(1 + 0.5·v²Δt/(d·D₀)), checked
	// within 4 standard errors of the Monte Carlo mean. With drift removed the shift disappears.
	zero := 0.0
	s := Demo()
	s.TargetRelU, s.TemperatureUK, s.PixelRelU, s.ViscosityRelU = 0, 0, 0, &zero
	s.DriftUMPerS, s.Frames, s.Tracks, s.Trials = 3, 30, 20, 20000
	res, err := Plan(context.Background(), s, PlanOptions{NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	v := s.DriftUMPerS * 1e-6
	D0 := res.DiffusionUM2PerS * 1e-12
	want := s.RadiusNM * (1 + 0.5*v*v*s.FrameIntervalS/(float64(s.Dims)*D0))
	se := res.MonteCarlo.StdUncNM / math.Sqrt(float64(res.MonteCarlo.Trials))
	if got := res.MonteCarlo.MeanNM; math.Abs(got-want) > 4*se {
		t.Errorf("drift not removed: mean %.4f nm, want %.4f (4 SE %.4f)", got, want, 4*se)
	}
	hasDrift := false
	for _, b := range res.Budget {
		hasDrift = hasDrift || b.Source == "drift"
	}
	if !hasDrift {
		t.Error("budget has no drift line")
	}
	s.DriftRemoved = true
	s.Trials = 4000
	res, err = Plan(context.Background(), s, PlanOptions{NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	se = res.MonteCarlo.StdUncNM / math.Sqrt(float64(res.MonteCarlo.Trials))
	if got := res.MonteCarlo.MeanNM; math.Abs(got-s.RadiusNM) > 4*se || res.MonteCarlo.Engine != EngineDirect {
		t.Errorf("drift removed: mean %.4f nm (4 SE %.4f), engine %s", got, 4*se, res.MonteCarlo.Engine)
	}
	for _, b := range res.Budget {
		if b.Source == "drift" {
			t.Error("drift removed but still in the budget")
		}
	}
}
