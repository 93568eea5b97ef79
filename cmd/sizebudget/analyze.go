package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"regexp"
	"slices"
	"strings"

	"sizebudget/figures"
	"sizebudget/trackfile"
	"sizebudget/uncertainty"
)

const analyzeAbout = `Analyze reads recorded trajectories from a track file and gives the hydrodynamic radius with an
honest coverage interval, the estimates it rests on, and checks that the data behave like free
diffusion.

The track file (CSV or TSV) has a header naming the columns track, frame (or t_s, the time in s),
x, y and optionally z; the length unit is a suffix of the position columns (x_nm, x_um, x_px) or
-unit; positions in px need -pixel. Lines starting with # are comments. A gap in a track's frame
numbers splits the track; tracks with fewer than -min-positions positions are dropped and counted.
With -order track (the default) the rows of each track must be together and the file is read in
memory proportional to its longest track; -order frame reads files sorted by frame (tracks
interleaved), -order any holds the whole file.

Per track, the covariance-based estimator gives D̂ and σ̂²; they are pooled with weights equal to
the tracks' numbers of displacements. The common drift (mean velocity) is estimated with its
standard error; when it is significant and biases D̂ by more than a tenth of its track-statistics
uncertainty, D̂ is corrected and a warning says so. Displacements 2 and 3 frames apart must be
uncorrelated for free diffusion with white noise; a correlation beyond 4 standard errors is named in
a warning. The radius and its interval come from the same engine as plan: a Monte Carlo over the
recorded track lengths at the data's own D̂ and σ̂, with the temperature, viscosity and length
calibration as you state them.

Settings: -scenario FILE reads a scenario document (as for plan) for the conditions of the
recording; flags given change it. Without -scenario, -temp, -interval (or -fps) and -exposure are
required, the medium is water unless -medium says otherwise, and an uncertainty not given
(-temp-u, -pixel-u) is taken as zero, with a warning: state yours. Only these fields count:
the medium and its flags, -temp, -temp-u, -temp-dist, -visc-u, -interval/-fps, -exposure, -pixel-u
(relative standard uncertainty of the length calibration), -density, -coverage, -trials, -seed.
The particle, the tracks, σ, the axes and the estimator come from the data: plan's -radius,
-diffusion, -frames, -sigma, -dims, -drift, -drift-removed, -focus-depth, -estimator and -target are
refused (and -tracks names the track file).

` + mediumHelp + `

Without -json the result is a short report. With -json it is one JSON object (format
"` + uncertainty.AnalysisFormat + `") with the keys radius_nm, interval_nm, shortest_interval_nm,
coverage, relative_expanded_uncertainty, diffusion_um2_per_s, diffusion_uncorrected_um2_per_s,
localisation_nm, localisation_variance_nm2, localisation_variance_standard_error_nm2, dims, tracks_used, tracks_dropped, displacements,
positions_per_track {min, mean, max}, drift_um_per_s, drift {velocity_um_per_s,
standard_error_um_per_s, chi_square, p_value, relative_bias, track_relative_u, matters, corrected},
free_diffusion [{lag, pairs, correlation, standard_error, z}], track_radii {edges_nm, counts, below,
above, nonpositive, monodisperse_counts, monodisperse_below, monodisperse_above,
monodisperse_nonpositive, simulated_tracks}, plan (the engine's full result for the scenario built
from the data, as plan -json writes it), warnings, and tracks_file {path, lines, rows, names, gaps,
dropped, unit, delimiter, order, min_positions, ignored_columns, notes}.

-svg FILE writes the histogram of the per-track radii with, overlaid, the spread a perfectly
monodisperse sample of the pooled radius would show with the same track lengths and noise, so that
real polydispersity can be told from the broadening of short tracks. Ctrl-C stops a long Monte Carlo.`

// analyzeReport is the result of the analyze subcommand, as written with -json.
type analyzeReport struct {
	*uncertainty.Analysis
	File trackFileReport `json:"tracks_file"`
}

// trackFileReport summarises the track file as it was read.
type trackFileReport struct {
	Path         string   `json:"path"`
	Lines        int      `json:"lines"`
	Rows         int      `json:"rows"`
	Names        int      `json:"names"`
	Gaps         int      `json:"gaps"`
	Dropped      int      `json:"dropped"`
	Unit         string   `json:"unit"`
	Delimiter    string   `json:"delimiter"`
	Order        string   `json:"order"`
	MinPositions int      `json:"min_positions"`
	Ignored      []string `json:"ignored_columns"`
	Notes        []string `json:"notes"`
}

// notForAnalysis are the scenario flags that the data determine, with what replaces them.
var notForAnalysis = []struct{ flag, why string }{
	{"radius", "the radius comes from the tracks"},
	{"diffusion", "the diffusion coefficient comes from the tracks"},
	{"frames", "the track lengths come from the file"},
	{"sigma", "the localisation precision is estimated from the tracks"},
	{"dims", "the axes come from the file's columns"},
	{"drift", "the drift is estimated from the tracks"},
	{"drift-removed", "the drift is estimated from the tracks"},
	{"focus-depth", "the recorded track lengths already show how long particles stayed in focus"},
	{"estimator", "the analysis uses the covariance-based estimator"},
	{"target", "there is nothing to plan in recorded data"},
}

// analyzeCommand runs the analyze subcommand under ctx (see interruptible).
func analyzeCommand(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("analyze", "-tracks file (-scenario file | -temp T -interval Δt -exposure t) [settings flags] [-json] [-svg file]", analyzeAbout, stderr)
	path := fs.String("tracks", "", "the track `file` to analyse, CSV or TSV (- = standard input); required")
	sf := defineAnalysisFlags(fs)
	ef := defineEngineFlags(fs)
	unit := defineChoice(fs, "unit", "", []string{"nm", "um", "µm", "μm", "mm", "m", "px"}, "length `unit` of position columns without a suffix (x, y, z): nm, um, mm, m or px")
	pixel := defineQuantity(fs, "pixel", Length, "", "pixel `size`, for positions in px, e.g. 107nm")
	order := defineChoice(fs, "order", "track", []string{"track", "frame", "any"}, "how the rows are `arranged`: track (rows of a track together), frame (sorted by frame), any")
	minPos := fs.Int("min-positions", trackfile.DefaultMinPositions, fmt.Sprintf("fewest `positions` a track needs to be kept (at least %d)", trackfile.LeastPositions))
	asJSON := fs.Bool("json", false, "print one JSON object instead of the report")
	svg := fs.String("svg", "", "write the histogram of the per-track radii with the monodisperse reference to `file` (SVG)")
	for _, arg := range args {
		name, _, _ := strings.Cut(strings.TrimLeft(arg, "-"), "=")
		if arg == "--" {
			break
		}
		for _, n := range notForAnalysis {
			if strings.HasPrefix(arg, "-") && name == n.flag {
				return usagef(fs, "-%s does not apply to analyze: %s", n.flag, n.why)
			}
		}
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if *path == "" {
		return usagef(fs, "missing -tracks, the track file to analyse")
	}
	if *minPos < trackfile.LeastPositions {
		return usagef(fs, "-min-positions %d: at least %d positions are needed (the covariance estimator needs two displacements)", *minPos, trackfile.LeastPositions)
	}
	settings, warnings, err := analysisSettings(fs, sf)
	if err != nil {
		return err
	}
	opt, err := ef.Options(fs)
	if err != nil {
		return err
	}
	ord, _ := trackfile.ParseOrder(order.Value()) // the choice allows only valid names
	ro := trackfile.Options{Unit: unit.Value(), PixelSize: pixel.SI(), Interval: settings.FrameIntervalS, MinPositions: *minPos, Order: ord}

	var in io.Reader = os.Stdin
	if *path != "-" {
		f, err := os.Open(*path)
		if err != nil {
			return err
		}
		defer f.Close()
		in = f
	}
	r, err := trackfile.NewReader(in, ro)
	if err != nil {
		for _, hint := range []struct {
			err  error
			note string
		}{
			{trackfile.ErrNoUnit, "give -unit"}, {trackfile.ErrUnitConflict, "-unit differs from the header"},
			{trackfile.ErrNoPixelSize, "give -pixel"}, {trackfile.ErrNoInterval, "give -interval or -fps"},
		} {
			if errors.Is(err, hint.err) {
				err = &notedError{err: err, note: hint.note}
			}
		}
		return fmt.Errorf("%s: %w", *path, err)
	}
	a, err := uncertainty.Analyze(ctx, r, settings, opt)
	var fe *trackfile.Error
	switch {
	case errors.As(err, &fe):
		return fmt.Errorf("%s: %w", *path, err)
	case err != nil:
		return interrupted(err)
	}
	a.Warnings = append(warnings, a.Warnings...)
	st := r.Stats()
	rep := analyzeReport{Analysis: a, File: trackFileReport{Path: *path, Lines: st.Lines, Rows: st.Rows, Names: st.Names,
		Gaps: st.Gaps, Dropped: st.Dropped, Unit: st.Unit, Delimiter: st.Delimiter, Order: ord.String(), MinPositions: *minPos,
		Ignored: nonNil(st.Ignored), Notes: nonNil(st.Notes)}}
	if *svg != "" {
		doc, err := figures.Radii(a)
		if err != nil {
			return fmt.Errorf("chart %s: %w", *svg, err)
		}
		if err := os.WriteFile(*svg, []byte(doc), 0o644); err != nil {
			return err
		}
	}
	if *asJSON {
		return writeJSON(stdout, rep)
	}
	return writeAnalysisReport(stdout, rep)
}

// demoNote matches the "(demo …)" notes of the scenario flags' usage, which do not apply to analyze.
var demoNote = regexp.MustCompile(` ?\(demo [^)]*\)`)

// defineAnalysisFlags defines on fs the scenario flags of defineScenarioFlags that apply to recorded
// data, that is all but those of notForAnalysis and -tracks (which names the track file here), and
// returns them. The flags not defined on fs are never set, so Apply leaves their fields alone (it
// reads -tracks as given, which only clears fields that Analyze does not read).
func defineAnalysisFlags(fs *flag.FlagSet) *scenarioFlags {
	all := flag.NewFlagSet(fs.Name(), flag.ContinueOnError)
	sf := defineScenarioFlags(all)
	all.VisitAll(func(f *flag.Flag) {
		if f.Name == "tracks" || slices.ContainsFunc(notForAnalysis, func(n struct{ flag, why string }) bool { return n.flag == f.Name }) {
			return
		}
		fs.Var(f.Value, f.Name, demoNote.ReplaceAllString(f.Usage, ""))
		fs.Lookup(f.Name).DefValue = f.DefValue
	})
	return sf
}

// nonNil returns s, or an empty slice for nil (so that JSON has [] rather than null).
func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

// analysisSettings returns the settings of the recording: the -scenario file changed by the flags
// given, or, without a file, the flags alone, which must then give -temp, -interval (or -fps) and
// -exposure. It also returns the warnings for uncertainties that were not stated.
func analysisSettings(fs *flag.FlagSet, sf *scenarioFlags) (uncertainty.Scenario, []string, error) {
	given := givenFlags(fs)
	var warnings []string
	var base uncertainty.Scenario
	if *sf.file != "" {
		data, err := os.ReadFile(*sf.file)
		if err != nil {
			return base, nil, fmt.Errorf("reading the scenario: %w", err)
		}
		if base, err = uncertainty.ParseScenario(data); err != nil {
			return base, nil, fmt.Errorf("%s: %w", *sf.file, err)
		}
	} else {
		var missing []string
		for _, f := range [][2]string{{"temp", "temp"}, {"interval", "fps"}, {"exposure", "exposure"}} {
			if !given[f[0]] && !given[f[1]] {
				missing = append(missing, "-"+f[0])
			}
		}
		if len(missing) > 0 {
			return base, nil, usagef(fs, "missing %s: without -scenario, analyze needs the temperature (-temp), the frame interval (-interval or -fps) and the exposure (-exposure, 0 for stroboscopic)",
				strings.Join(missing, ", "))
		}
		// Placeholders for the particle and the tracks, which the analysis replaces by the data's.
		base = uncertainty.Scenario{Format: uncertainty.Format, Medium: "water", RadiusNM: 1, Frames: uncertainty.MinFrames, Tracks: 1, Seed: 1}
		if !given["temp-u"] {
			warnings = append(warnings, "temperature: no uncertainty given (-temp-u); the interval takes the temperature as exactly known")
		}
		if !given["pixel-u"] {
			warnings = append(warnings, "calibration: no uncertainty of the length scale given (-pixel-u); the interval takes the pixel size as exactly known")
		}
	}
	s, err := sf.Apply(fs, base)
	return s, warnings, err
}

// writeAnalysisReport writes the readable report of an analysis: the result, the checks, the budget
// and the warnings.
func writeAnalysisReport(w io.Writer, rep analyzeReport) error {
	a, f := rep.Analysis, rep.File
	if _, err := fmt.Fprintf(w, "tracks: %s (%d rows, %d track names, %d gaps; positions in %s)\n", f.Path, f.Rows, f.Names, f.Gaps, f.Unit); err != nil {
		return err
	}
	for _, n := range f.Notes[:min(len(f.Notes), 2)] {
		if _, err := fmt.Fprintf(w, "  # %s\n", oneLine(n)); err != nil {
			return err
		}
	}
	if _, err := fmt.Fprintln(w); err != nil {
		return err
	}
	pr := a.Plan
	s := pr.Scenario
	t := &table{}
	t.add("radius", a.RadiusNM, fmt.Sprintf("nm (Stokes–Einstein of D̂ in %s at %s K, %s mPa·s)", s.Medium, formatNumber(pr.TemperatureK), short(pr.ViscosityMPaS)))
	pct := formatNumber(100*a.Coverage) + " %"
	t.addText("coverage interval", interval(a.IntervalNM), "nm ("+pct+", Monte Carlo, probabilistically symmetric)")
	t.addText("shortest interval", interval(a.ShortestIntervalNM), "nm")
	t.addText("relative expanded uncertainty", percent(a.RelExpanded), "U/r, half-width of the interval over the radius")
	how := "pooled covariance-based estimate"
	if a.Drift.Corrected {
		how += fmt.Sprintf(", corrected for drift (uncorrected %s)", short(a.DiffusionRawUM2PerS))
	}
	t.add("diffusion coefficient", a.DiffusionUM2PerS, "µm²/s ("+how+")")
	t.add("localisation precision", a.LocalisationNM, fmt.Sprintf("nm per axis (√σ̂², σ̂² = %s ± %s nm²)", short(a.LocalisationVarNM2), short(a.LocalisationVarSENM2)))
	t.addText("tracks used", fmt.Sprint(a.TracksUsed), fmt.Sprintf("%d-D; %d to %d positions, mean %s", a.Dims, a.Positions.Min, a.Positions.Max, short(a.Positions.Mean)))
	t.addText("tracks dropped", fmt.Sprint(a.TracksDropped), fmt.Sprintf("fewer than %d positions", f.MinPositions))
	t.addText("displacements", fmt.Sprint(a.Displacements), "per axis")
	dr := a.Drift
	vel := make([]string, len(dr.VelocityUMPerS))
	for i, v := range dr.VelocityUMPerS {
		vel[i] = short(v) + " ± " + short(dr.StdErrUMPerS[i])
	}
	matters := "does not matter"
	if dr.Matters {
		matters = "matters: corrected"
	}
	t.add("drift", a.DriftUMPerS, fmt.Sprintf("µm/s (velocity %s µm/s; p = %s; bias of D̂ %s; %s)", strings.Join(vel, ", "), short(dr.PValue), percent(dr.RelBias), matters))
	for _, c := range a.FreeDiffusion {
		verdict := "consistent with free diffusion"
		if c.Z > uncertainty.FreeDiffusionZ || c.Z < -uncertainty.FreeDiffusionZ {
			verdict = "NOT consistent with free diffusion"
		}
		t.addText(fmt.Sprintf("correlation at lag %d", c.Lag), short(c.Correlation)+" ± "+short(c.StdErr), fmt.Sprintf("(z = %.2f; %s)", c.Z, verdict))
	}
	mc := pr.MonteCarlo
	mode := "fixed"
	if mc.Adaptive {
		mode = fmt.Sprintf("adaptive, %d runs", mc.Runs)
	}
	t.addText("Monte Carlo", fmt.Sprintf("%d trials", mc.Trials), fmt.Sprintf("(%s; seed %d; engine %s)", mode, mc.Seed, mc.Engine))
	t.addText("dominant source", pr.DominantSource, "")
	if err := t.write(w); err != nil {
		return err
	}
	if _, err := fmt.Fprintln(w); err != nil {
		return err
	}
	if err := budgetTable(pr.Budget).write(w); err != nil {
		return err
	}
	return writeWarnings(w, a.Warnings)
}
