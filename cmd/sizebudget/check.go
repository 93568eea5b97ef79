package main

import (
	"context"
	"fmt"
	"io"

	"sizebudget/uncertainty"
)

const checkAbout = `Check reviews a reported result: is the radius ± expanded uncertainty as reported
(-reported-radius, -reported-u with its coverage factor -reported-k or its coverage probability
-reported-coverage; neither means 95 %) achievable with the reported settings? The settings are
evaluated at the reported radius. The verdict is one of
  below-bound   smaller than any unbiased estimator can reach from those frames and tracks (the
                Cramér–Rao bound on D plus the sources that do not shrink with frames)
  optimistic    above the bound but below what the stated estimator achieves (Monte Carlo)
  consistent    between what is achievable and twice that
  conservative  more than twice what is achievable
All relative expanded uncertainties are brought to the scenario's -coverage.

` + scenarioAbout + `

` + mediumHelp + `

Without -json the result is a short report. With -json it is one JSON object (format
"` + uncertainty.CheckFormat + `") with the keys format, verdict, coverage, reported_radius_nm,
reported_u_nm, reported_k, reported_relative_expanded_uncertainty,
achievable_relative_expanded_uncertainty, bound_relative_expanded_uncertainty,
fixed_relative_expanded_uncertainty (temperature, viscosity, calibration and drift alone),
explanation, and plan (the plan of the settings at the reported radius, as sizebudget plan -json
writes it, without the planner). Ctrl-C stops a long Monte Carlo.`

// checkCommand runs the check subcommand under ctx (see interruptible).
func checkCommand(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("check", "-reported-radius r -reported-u U [-reported-k k | -reported-coverage p] [-scenario file] [settings flags] [-json]", checkAbout, stderr)
	sf := defineScenarioFlags(fs)
	sf.defineReviewFlags(fs)
	ef := defineEngineFlags(fs)
	asJSON := fs.Bool("json", false, "print one JSON object instead of the report")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	s, err := sf.Build(fs)
	if err != nil {
		return err
	}
	switch {
	case s.ReportedRadiusNM == 0:
		return usagef(fs, "missing -reported-radius, the reported radius (e.g. 82nm)")
	case s.ReportedUNM == 0:
		return usagef(fs, "missing -reported-u, the reported expanded uncertainty (e.g. 1nm)")
	}
	if err := sf.Validate(fs, s); err != nil {
		return err
	}
	opt, err := ef.Options(fs)
	if err != nil {
		return err
	}
	res, err := uncertainty.Check(ctx, s, opt)
	if err != nil {
		return sf.explain(fs, interrupted(err))
	}
	if *asJSON {
		return writeJSON(stdout, res)
	}
	return writeCheckReport(stdout, res)
}

// writeCheckReport writes the readable report of a check: the verdict and the figures behind it, the
// explanation, the budget of the settings and the warnings of their plan.
func writeCheckReport(w io.Writer, c *uncertainty.CheckResult) error {
	pct := formatNumber(100*c.Coverage) + " %"
	if c.Plan != nil {
		if err := writeTitle(w, c.Plan.Scenario); err != nil {
			return err
		}
	}
	t := &table{}
	t.addText("verdict", c.Verdict, "")
	t.addText("reported", formatNumber(c.ReportedRadius)+" ± "+formatNumber(c.ReportedU), fmt.Sprintf("nm (k = %s)", formatNumber(c.ReportedK)))
	t.addText("reported U/r", percent(c.ReportedRelU), "at "+pct+" coverage")
	t.addText("achievable U/r", percent(c.AchievableRelU), "the stated estimator, Monte Carlo")
	t.addText("bound U/r", percent(c.BoundRelU), "Cramér–Rao bound on D plus the sources that do not shrink")
	t.addText("fixed sources U/r", percent(c.FixedRelU), "temperature, viscosity, calibration and drift alone")
	if p := c.Plan; p != nil {
		s := p.Scenario
		t.addText("tracks × positions", tracksText(s), settingsText(s))
		t.addText("Monte Carlo", fmt.Sprintf("%d trials", p.MonteCarlo.Trials), fmt.Sprintf("(seed %d; engine %s)", p.MonteCarlo.Seed, p.MonteCarlo.Engine))
	}
	if err := t.write(w); err != nil {
		return err
	}
	if _, err := fmt.Fprintf(w, "\n%s\n\n", oneLine(c.Explanation)); err != nil {
		return err
	}
	if c.Plan == nil {
		return nil
	}
	if err := budgetTable(c.Plan.Budget).write(w); err != nil {
		return err
	}
	return writeWarnings(w, c.Plan.Warnings)
}
