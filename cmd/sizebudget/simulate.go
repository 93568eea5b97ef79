package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"

	"sizebudget/core"
	"sizebudget/trackfile"
	"sizebudget/uncertainty"
)

const simulateAbout = `Simulate writes a track file of INVENTED data: Brownian tracks of the scenario's particle, recorded
as the scenario says (axes, frame interval, exposure with its motion blur, localisation noise, a
constant drift of speed -drift in a random direction), so that anyone can try analyze on data whose
truth is known. The file says in its header comments that it is invented, with the seed and the
scenario.

The particle diffuses with the scenario's nominal diffusion coefficient (that of -radius at the
nominal temperature and viscosity, or -diffusion): the temperature and viscosity uncertainties of the
scenario do not enter the simulation. The tracks have -frames positions each, -tracks of them, or the
scenario's track_lengths. Each track starts at a random frame (0 to 999) and position (x and y in
5–45 µm, z in −2–2 µm). The random numbers come from -seed (the scenario's seed): the same scenario
and seed write the same file.

` + scenarioAbout + `

` + mediumHelp + `

Without -o, or with -o -, the file is written to standard output; with -o FILE a one-line summary is
printed. Positions are written in -unit (um: 5 decimals, nm: 2 decimals, both 0.01 nm).`

// simulationStream is the second word of the PCG seed of simulate, so that its random numbers differ
// from those of other uses of the same scenario seed.
const simulationStream = 0x73696d756c617465 // "simulate"

// runSimulate is the simulate subcommand.
func runSimulate(args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("simulate", "[-scenario file] [settings flags] [-o file] [-unit um|nm]", simulateAbout, stderr)
	sf := defineScenarioFlags(fs)
	out := fs.String("o", "-", "write the track file to `file` (- = standard output)")
	unit := defineChoice(fs, "unit", "um", []string{"um", "nm"}, "length `unit` of the positions in the file: um or nm")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	s, err := sf.Load(fs)
	if err != nil {
		return err
	}
	if *out == "-" {
		_, _, err := writeSimulated(stdout, s, unit.Value())
		return err
	}
	f, err := os.Create(*out)
	if err != nil {
		return err
	}
	tracks, rows, err := writeSimulated(f, s, unit.Value())
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(stdout, "wrote %d tracks, %d positions, to %s (INVENTED data, seed %d)\n", tracks, rows, *out, s.Seed)
	return err
}

// writeSimulated writes the invented track file of the validated scenario s to w, positions in unit
// ("um" or "nm"), and returns the numbers of tracks and positions written.
func writeSimulated(w io.Writer, s uncertainty.Scenario, unit string) (tracks, rows int, err error) {
	m, err := s.MediumModel()
	if err != nil {
		return 0, 0, err
	}
	T := s.TemperatureC + 273.15
	eta, err := m.Viscosity(T)
	if err != nil {
		return 0, 0, err
	}
	r := s.RadiusNM * 1e-9
	D := core.Diffusion(T, eta, r)
	if s.RadiusNM == 0 {
		D = s.DiffusionUM2PerS * 1e-12
		r = core.Radius(T, eta, D)
	}
	src := rand.NewPCG(s.Seed, simulationStream)
	rng := rand.New(src)
	rec := core.Recording{D: D, Dims: s.Dims, Interval: s.FrameIntervalS, Exposure: s.ExposureS, Sigma: s.LocalisationNM * 1e-9}
	if s.DriftUMPerS > 0 {
		// A direction uniform on the circle (sphere) of the tracked axes.
		rec.Drift = make([]float64, s.Dims)
		norm := 0.0
		for a := range rec.Drift {
			rec.Drift[a] = rng.NormFloat64()
			norm += rec.Drift[a] * rec.Drift[a]
		}
		for a := range rec.Drift {
			rec.Drift[a] *= s.DriftUMPerS * 1e-6 / math.Sqrt(norm)
		}
	}
	if s.Dims < 2 {
		return 0, 0, fmt.Errorf("simulate writes 2 or 3 axes (x, y[, z]); the scenario has dims = %d", s.Dims)
	}
	if err := rec.Validate(); err != nil {
		return 0, 0, err
	}
	groups := s.TrackLengths
	if len(groups) == 0 {
		groups = []uncertainty.LengthGroup{{Frames: s.Frames, Count: s.Tracks}}
	}
	doc, err := json.Marshal(s)
	if err != nil {
		return 0, 0, err
	}
	decimals := map[string]int{"um": 5, "nm": 2}[unit]
	tw := trackfile.NewWriter(w, unit, s.Dims, decimals)
	tw.Comment(fmt.Sprintf(`INVENTED track data written by "sizebudget simulate": simulated Brownian motion that describes no real sample, laboratory or instrument.
seed %d; true radius %s nm, true diffusion coefficient %s µm²/s (%s at %s °C, the scenario's nominal conditions)
recording: %d axes, frame interval %s s, exposure %s s, localisation precision %s nm per axis, drift %s µm/s
scenario: %s`, s.Seed, formatNumber(r*1e9), formatNumber(D*1e12), s.Medium, formatNumber(s.TemperatureC), s.Dims,
		formatNumber(s.FrameIntervalS), formatNumber(s.ExposureS), formatNumber(s.LocalisationNM), formatNumber(s.DriftUMPerS), doc)) // a write error is kept for Flush
	for _, g := range groups {
		for range g.Count {
			tr := core.Simulate(src, rec, g.Frames)
			first := int64(rng.IntN(1000))
			for a, p := range tr.Pos {
				offset := 5e-6 + 40e-6*rng.Float64()
				if a == 2 {
					offset = -2e-6 + 4e-6*rng.Float64()
				}
				for i := range p {
					p[i] += offset
				}
			}
			tracks++
			rows += g.Frames
			if err := tw.WriteTrack(fmt.Sprint(tracks), first, tr); err != nil {
				return 0, 0, err
			}
		}
	}
	return tracks, rows, tw.Flush()
}
