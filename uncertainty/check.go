package uncertainty

import (
	"context"
	"fmt"
	"math"
)

// CheckFormat identifies the JSON of a CheckResult.
const CheckFormat = "sizebudget/check/1"

// Verdicts of the review check.
const (
	VerdictBelowBound   = "below-bound"  // smaller than any unbiased estimator can reach
	VerdictOptimistic   = "optimistic"   // above the bound, below what the stated estimator achieves
	VerdictConsistent   = "consistent"   // between what is achievable and twice that
	VerdictConservative = "conservative" // more than twice what is achievable
)

// CheckResult is the review verdict on a reported radius ± expanded uncertainty. Relative expanded
// uncertainties are all at the scenario's coverage probability.
type CheckResult struct {
	Format         string      `json:"format"`
	Verdict        string      `json:"verdict"`
	Coverage       float64     `json:"coverage"`
	ReportedRadius float64     `json:"reported_radius_nm"`
	ReportedU      float64     `json:"reported_u_nm"`
	ReportedK      float64     `json:"reported_k"`
	ReportedRelU   float64     `json:"reported_relative_expanded_uncertainty"`
	AchievableRelU float64     `json:"achievable_relative_expanded_uncertainty"`
	BoundRelU      float64     `json:"bound_relative_expanded_uncertainty"`
	FixedRelU      float64     `json:"fixed_relative_expanded_uncertainty"` // temperature, viscosity, calibration, drift alone
	Explanation    string      `json:"explanation"`
	Plan           *PlanResult `json:"plan"`
}

// Check reviews a reported result: is U/r as stated achievable with the stated settings? The reported
// expanded uncertainty U with coverage factor k (or coverage probability p_rep, converted with the
// normal quantile) is brought to the scenario's coverage p as U·z_{(1+p)/2}/k. It is compared with
//
//   - the achievable: the Monte Carlo relative expanded uncertainty of the stated estimator (Plan);
//   - the bound: the achievable scaled by √((CRB(D)/D² + u_fixed²)/(Var(D̂)/D² + u_fixed²)), i.e. the
//     same interval had the track term been the Cramér–Rao bound on D from the same frames and tracks
//     (Michalet & Berglund 2012) instead of the estimator's variance; the sources that do not shrink
//     with frames are kept. Scaling the Monte Carlo figure, rather than taking z_p·√(CRB + u_fixed²)
//     alone, keeps both figures on the same (Monte Carlo) footing, so bound ≤ achievable always.
//
// Verdict: below-bound if reported < bound; optimistic if below achievable; consistent up to twice the
// achievable; conservative above.
func Check(ctx context.Context, s Scenario, opt PlanOptions) (*CheckResult, error) {
	s = s.Defaults()
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if s.ReportedRadiusNM == 0 {
		return nil, &FieldError{Field: "reported_radius_nm", Value: 0, Allowed: fmt.Sprintf("(0, %g]", maxRadiusNM), Why: "the check needs the reported radius"}
	}
	if s.ReportedUNM == 0 {
		return nil, &FieldError{Field: "reported_u_nm", Value: 0, Allowed: fmt.Sprintf("(0, %g]", maxRadiusNM), Why: "the check needs the reported expanded uncertainty"}
	}
	// The settings are evaluated at the reported radius.
	s.RadiusNM, s.DiffusionUM2PerS = s.ReportedRadiusNM, 0
	opt.NoPlanner = true
	pr, err := Plan(ctx, s, opt)
	if err != nil {
		return nil, err
	}
	u, err := newSetup(s)
	if err != nil {
		return nil, err
	}
	k := s.ReportedK
	if k == 0 {
		p := s.ReportedCoverage
		if p == 0 {
			p = 0.95
		}
		k = normalQuantile((1 + p) / 2)
	}
	zp := normalQuantile((1 + s.Coverage) / 2)
	b := u.budget(u.groups)
	fixed := b.fixedRelVar()
	c := &CheckResult{Format: CheckFormat, Coverage: s.Coverage, ReportedRadius: s.ReportedRadiusNM, ReportedU: s.ReportedUNM, ReportedK: k,
		ReportedRelU:   s.ReportedUNM / k * zp / s.ReportedRadiusNM,
		AchievableRelU: pr.RelExpanded,
		BoundRelU:      pr.RelExpanded * math.Sqrt((u.boundRelVar(u.groups)+fixed)/(u.trackRelVar(u.groups)+fixed)),
		FixedRelU:      zp * math.Sqrt(fixed),
		Plan:           pr}
	pct := func(x float64) string { return fmt.Sprintf("%.3g %%", 100*x) }
	shape := fmt.Sprintf("%d tracks of %d frames", s.Tracks, s.Frames)
	if len(s.TrackLengths) > 0 {
		shape = fmt.Sprintf("%d tracks of up to %d frames", s.Tracks, s.Frames)
	}
	settings := shape + " with the " + s.Estimator + " estimator"
	switch {
	case c.ReportedRelU < c.BoundRelU:
		c.Verdict = VerdictBelowBound
		c.Explanation = fmt.Sprintf("The reported %s (at %g %% coverage) is below %s, the least any unbiased estimator can reach from %s (Cramér–Rao bound on D plus temperature, viscosity and calibration). It is not achievable as stated.",
			pct(c.ReportedRelU), 100*s.Coverage, pct(c.BoundRelU), shape)
	case c.ReportedRelU < c.AchievableRelU:
		c.Verdict = VerdictOptimistic
		c.Explanation = fmt.Sprintf("The reported %s is above the bound %s but below the %s that %s achieves (Monte Carlo); it is optimistic unless a better estimator was used.",
			pct(c.ReportedRelU), pct(c.BoundRelU), pct(c.AchievableRelU), settings)
	case c.ReportedRelU <= 2*c.AchievableRelU:
		c.Verdict = VerdictConsistent
		c.Explanation = fmt.Sprintf("The reported %s is consistent with the %s that %s achieves (bound %s).",
			pct(c.ReportedRelU), pct(c.AchievableRelU), settings, pct(c.BoundRelU))
	default:
		c.Verdict = VerdictConservative
		c.Explanation = fmt.Sprintf("The reported %s is more than twice the %s that %s achieves; it is conservative (other sources may have been included).",
			pct(c.ReportedRelU), pct(c.AchievableRelU), settings)
	}
	return c, nil
}
