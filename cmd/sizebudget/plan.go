package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"sizebudget/figures"
	"sizebudget/uncertainty"
)

const planAbout = `Plan answers, before an acquisition: with these settings, what coverage interval will the
hydrodynamic radius get, which source of uncertainty dominates it, and how many frames per track
reach the target relative expanded uncertainty U/r (-target)?

The interval comes from a Monte Carlo propagation (JCGM 101): each trial simulates the whole
measurement (the true temperature and viscosity drawn from their distributions, the tracks with
localisation noise, blur and drift, the chosen estimator of D, the conversion to a radius with the
nominal temperature and viscosity). Its probabilistically symmetric interval is the one to report;
the shortest interval is printed too. The GUM budget (JCGM 100) gives each source's relative standard
uncertainty and share of the variance, and it is validated against the Monte Carlo (JCGM 101
clause 8). The planner searches the smallest number of positions per track at the given -tracks on
the GUM model and confirms it by simulation; when the sources that do not shrink with frames
(temperature, viscosity, calibration, drift) already exceed the target it says so and names the one
that dominates. With -focus-depth it also reports how long particles stay in focus and, when they
leave it sooner, the tracks needed at the frames they can give.

` + scenarioAbout + `

` + mediumHelp + `

Without -json the result is a short report. With -json it is one JSON object (format
"` + uncertainty.PlanFormat + `") with the keys format, scenario (the effective scenario document),
radius_nm, diffusion_um2_per_s, viscosity_mPa_s, temperature_K, coverage, interval_nm [lo, hi],
shortest_interval_nm, relative_expanded_uncertainty ((hi − lo)/(2·radius) of interval_nm),
reduced_localisation_error, blur_coefficient, gum {relative_standard_uncertainty, coverage_factor,
effective_dof, interval_nm, relative_expanded_uncertainty, validated, d_low_nm, d_high_nm,
tolerance_nm}, budget [{source, input, input_standard_uncertainty, sensitivity,
relative_standard_uncertainty, share, dof, shrinks_with_frames}], monte_carlo {trials, seed, engine,
adaptive, converged, runs, mean_nm, standard_uncertainty_nm, n_dig, nonpositive_fraction},
target_relative_expanded_uncertainty, recommended_min_frames (null when unreachable or no target),
target_reachable (null without a target), unreachable_reason, dominant_source, focus (with
-focus-depth), warnings, curve [{frames, relative_expanded_uncertainty}] (analytic) and histogram
{edges_nm, counts} of the Monte Carlo radius values.

-svg FILE writes that histogram with the interval marked, -curve-svg FILE the relative expanded
uncertainty against frames per track with the target and the recommendation, as SVG. Ctrl-C stops
a long Monte Carlo.`

// engineFlags are the flags that choose how the Monte Carlo runs, not what it computes: -engine and
// -workers.
type engineFlags struct {
	engine  *choice
	workers *int
}

// defineEngineFlags defines -engine and -workers on fs.
func defineEngineFlags(fs *flag.FlagSet) *engineFlags {
	return &engineFlags{
		engine: defineChoice(fs, "engine", "", []string{uncertainty.EngineDirect, uncertainty.EngineSpectral},
			"Monte Carlo `engine` of the track statistics: direct (simulate every track) or spectral (exact, faster; cve and known-noise without drift removal); default: the fastest exact one"),
		workers: fs.Int("workers", 0, "goroutines of the Monte Carlo; 0 = one per processor (the result does not depend on it)"),
	}
}

// Options returns the plan options of the command line parsed by fs.
func (e *engineFlags) Options(fs *flag.FlagSet) (uncertainty.PlanOptions, error) {
	if *e.workers < 0 {
		return uncertainty.PlanOptions{}, usagef(fs, "-workers %d: want 0 (one per processor) or more", *e.workers)
	}
	return uncertainty.PlanOptions{Engine: e.engine.Value(), Workers: *e.workers}, nil
}

// planCommand runs the plan subcommand under ctx (see interruptible).
func planCommand(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("plan", "[-scenario file] [settings flags] [-json] [-svg file] [-curve-svg file]", planAbout, stderr)
	sf := defineScenarioFlags(fs)
	ef := defineEngineFlags(fs)
	asJSON := fs.Bool("json", false, "print one JSON object instead of the report")
	svg := fs.String("svg", "", "write the histogram of the Monte Carlo radius values to `file` (SVG)")
	curveSVG := fs.String("curve-svg", "", "write the curve of U/r against frames per track to `file` (SVG)")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if *svg != "" && *svg == *curveSVG {
		return usagef(fs, "-svg and -curve-svg name the same file %q", *svg)
	}
	s, err := sf.Load(fs)
	if err != nil {
		return err
	}
	opt, err := ef.Options(fs)
	if err != nil {
		return err
	}
	res, err := uncertainty.Plan(ctx, s, opt)
	if err != nil {
		return sf.explain(fs, interrupted(err))
	}
	charts := map[string]func(*uncertainty.PlanResult) (string, error){}
	if *svg != "" {
		charts[*svg] = figures.PlanHistogram
	}
	if *curveSVG != "" {
		charts[*curveSVG] = figures.PlanCurve
	}
	if err := writeCharts(res, charts); err != nil {
		return err
	}
	if *asJSON {
		return writeJSON(stdout, res)
	}
	return writePlanReport(stdout, res)
}

// interrupted turns the cancellation of the context into a message for the user.
func interrupted(err error) error {
	if errors.Is(err, context.Canceled) {
		return errors.New("interrupted: the Monte Carlo was stopped before it finished; nothing was written")
	}
	return err
}

// writeCharts draws every chart first, then writes the files, so that a chart that cannot be drawn
// leaves no file behind.
func writeCharts(res *uncertainty.PlanResult, charts map[string]func(*uncertainty.PlanResult) (string, error)) error {
	docs := map[string]string{}
	for path, draw := range charts {
		doc, err := draw(res)
		if err != nil {
			return fmt.Errorf("chart %s: %w", path, err)
		}
		docs[path] = doc
	}
	for path, doc := range docs {
		if err := os.WriteFile(path, []byte(doc), 0o644); err != nil {
			return err
		}
	}
	return nil
}

// tracksText writes the tracks of s as tracks × positions, or as the groups of its track lengths.
func tracksText(s uncertainty.Scenario) string {
	if len(s.TrackLengths) == 0 {
		return fmt.Sprintf("%d × %d", s.Tracks, s.Frames)
	}
	groups := make([]string, len(s.TrackLengths))
	for i, g := range s.TrackLengths {
		groups[i] = fmt.Sprintf("%d × %d", g.Count, g.Frames)
	}
	return strings.Join(groups, " + ")
}

// settingsText summarises the acquisition and analysis settings of s on one line.
func settingsText(s uncertainty.Scenario) string {
	return fmt.Sprintf("%d-D, Δt %s ms, exposure %s ms, σ %s nm, %s estimator", s.Dims,
		short(Duration.In(s.FrameIntervalS, "ms")), short(Duration.In(s.ExposureS, "ms")), short(s.LocalisationNM), s.Estimator)
}

// short writes x to 4 significant digits, for the figures of a report that are not its result.
func short(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// percent writes a fraction as a percentage to 3 significant digits.
func percent(x float64) string { return fmt.Sprintf("%.3g %%", 100*x) }

// interval writes [lo, hi] as "lo – hi".
func interval(v [2]float64) string { return formatNumber(v[0]) + " – " + formatNumber(v[1]) }

// yesNo writes a truth value as a reader wants it.
func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

// writePlanReport writes the readable report of a plan: the result, the budget and the warnings.
func writePlanReport(w io.Writer, res *uncertainty.PlanResult) error {
	if err := writeTitle(w, res.Scenario); err != nil {
		return err
	}
	if err := planTable(res).write(w); err != nil {
		return err
	}
	if _, err := fmt.Fprintln(w); err != nil {
		return err
	}
	if err := budgetTable(res.Budget).write(w); err != nil {
		return err
	}
	return writeWarnings(w, res.Warnings)
}

// writeTitle writes the name of the scenario, if it has one, on a line of its own.
func writeTitle(w io.Writer, s uncertainty.Scenario) error {
	if s.Name == "" {
		return nil
	}
	_, err := fmt.Fprintf(w, "scenario: %s\n\n", oneLine(s.Name))
	return err
}

// planTable returns the rows of the report of a plan.
func planTable(res *uncertainty.PlanResult) *table {
	s := res.Scenario
	t := &table{}
	given := map[bool]string{true: "(given)", false: "(computed)"}
	t.add("radius", res.RadiusNM, "nm "+given[s.RadiusNM != 0])
	t.add("diffusion coefficient", res.DiffusionUM2PerS, "µm²/s "+given[s.RadiusNM == 0])
	t.add("viscosity", res.ViscosityMPaS, fmt.Sprintf("mPa·s (%s at %s K)", s.Medium, formatNumber(res.TemperatureK)))
	t.addText("tracks × positions", tracksText(s), settingsText(s))
	pct := formatNumber(100*res.Coverage) + " %"
	t.addText("coverage interval", interval(res.IntervalNM), "nm ("+pct+", Monte Carlo, probabilistically symmetric)")
	t.addText("shortest interval", interval(res.ShortestIntervalNM), "nm")
	t.addText("relative expanded uncertainty", percent(res.RelExpanded), "U/r, half-width of the interval over the radius")
	g := res.GUM
	dof := "∞"
	if float64(g.EffectiveDOF) < 1e300 {
		dof = short(float64(g.EffectiveDOF))
	}
	t.addText("GUM interval", interval(g.IntervalNM), fmt.Sprintf("nm (U/r %s: u_c/r %s, k %s, ν_eff %s)", percent(g.RelExpanded), percent(g.RelU), short(g.K), dof))
	t.addText("GUM validated", yesNo(g.Validated), fmt.Sprintf("by the Monte Carlo: d_low %s nm, d_high %s nm, tolerance %s nm (JCGM 101 clause 8)",
		short(g.DLowNM), short(g.DHighNM), short(g.ToleranceNM)))
	mc := res.MonteCarlo
	how := "fixed"
	if mc.Adaptive {
		how = fmt.Sprintf("adaptive, %d runs", mc.Runs)
		if !mc.Converged {
			how += ", not converged"
		}
	}
	t.addText("Monte Carlo", fmt.Sprintf("%d trials", mc.Trials), fmt.Sprintf("(%s; seed %d; engine %s)", how, mc.Seed, mc.Engine))
	t.addText("dominant source", res.DominantSource, "")
	switch {
	case res.TargetReachable == nil:
		t.addText("target", "none", "(no planning; give -target)")
	case *res.TargetReachable:
		t.addText("target", percent(res.TargetRelU), "")
		t.addText("recommended frames", fmt.Sprint(*res.RecommendedMinFrames), fmt.Sprintf("positions per track with %d tracks (smallest to reach the target; confirmed by simulation)", s.Tracks))
	default:
		t.addText("target", percent(res.TargetRelU), "")
		t.addText("recommended frames", "none", "unreachable: "+res.Unreachable)
	}
	if f := res.Focus; f != nil {
		t.add("focal depth", f.DepthUM, "µm")
		t.add("mean residence in focus", f.MeanResidenceS, "s")
		t.add("frames in focus", f.ExpectedFrames, "positions per track on average")
		if f.RecommendedTracks != nil {
			t.addText("tracks at those frames", fmt.Sprint(*f.RecommendedTracks), fmt.Sprintf("tracks of %d positions to reach the target", f.ReachableFrames))
		}
	}
	return t
}

// budgetTable returns the uncertainty budget as a table: each source's relative standard uncertainty
// and share of the variance.
func budgetTable(budget []uncertainty.Source) *table {
	t := &table{}
	t.addText("budget", "relative u", "share of the variance")
	for _, b := range budget {
		t.addText("  "+b.Source, percent(b.RelU), percent(b.Share))
	}
	return t
}

// writeWarnings writes the warnings, one per line, after a blank line; nothing if there are none.
func writeWarnings(w io.Writer, warnings []string) error {
	if len(warnings) == 0 {
		return nil
	}
	var b strings.Builder
	b.WriteString("\nwarnings:\n")
	for _, x := range warnings {
		b.WriteString("  - " + oneLine(x) + "\n")
	}
	_, err := io.WriteString(w, b.String())
	return err
}
