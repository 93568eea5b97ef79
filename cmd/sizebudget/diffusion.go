package main

import (
	"fmt"
	"io"
	"math"

	"sizebudget/core"
)

// Ranges accepted by the diffusion subcommand (the practical range of this tool, not limits of
// Stokes–Einstein itself): from a small molecule to a large colloid, and the diffusion coefficients
// such particles can have in the media of core (water's self-diffusion is about 2.3e-9 m²/s; a
// 100 µm sphere in glycerol near 0 °C is about 1.8e-19 m²/s, below which nothing moves visibly).
const (
	minRadius    = 1e-10 // m (0.1 nm)
	maxRadius    = 1e-4  // m (100 µm)
	minDiffusion = 1e-20 // m²/s (1e-8 µm²/s)
	maxDiffusion = 1e-6  // m²/s (1e6 µm²/s)
	// maxWallDistance bounds the centre-to-wall distance (m): the hindrance 1 − F∥ ≈ (9/16)·r/z is
	// below 1e-4 there even for a 100 µm sphere.
	maxWallDistance = 1
)

const diffusionAbout = `Diffusion applies Stokes–Einstein, D = k_B·T/(6π·η·r), in either direction: give -radius to get
the diffusion coefficient D, or -diffusion to get the hydrodynamic radius r (exactly one of the two).
η is the viscosity of the medium at -temp. The friction f = 6π·η·r and the mobility b = 1/f are
printed too.

-wall-distance z (the distance from the particle's centre to a plane wall) adds the hindered
coefficients near the wall: D∥ = D·F∥ by Faxén's series (valid for z ≥ 1.5 r) and D⊥ = D·F⊥ by
Brenner's exact series. With -diffusion and -wall-distance the given coefficient is taken as the
measured parallel one, D∥: the radius is solved by bisection on r of D(r)·F∥(r/z) = D∥, and
diffusion_um2_per_s reports the free (bulk) coefficient of that radius. It is an error when no
radius within Faxén's range gives so small a D∥.

` + mediumHelp + `

With -json the result is one JSON object with the keys medium, input ("radius" or "diffusion"),
temperature_K, temperature_C, viscosity_mPa_s, radius_nm, diffusion_um2_per_s, friction_kg_per_s and
mobility_s_per_kg, the parameters of the medium, and with -wall-distance an object "wall" with
distance_nm, distance_radii, parallel_factor, perpendicular_factor, diffusion_parallel_um2_per_s and
diffusion_perpendicular_um2_per_s.`

// diffusionReport is the result of the diffusion subcommand, as written with -json.
type diffusionReport struct {
	mediumFields
	Input         string      `json:"input"`
	TemperatureK  float64     `json:"temperature_K"`
	TemperatureC  float64     `json:"temperature_C"`
	ViscosityMPaS float64     `json:"viscosity_mPa_s"`
	RadiusNM      float64     `json:"radius_nm"`
	DiffusionUM2S float64     `json:"diffusion_um2_per_s"`
	FrictionKgS   float64     `json:"friction_kg_per_s"`
	MobilitySKg   float64     `json:"mobility_s_per_kg"`
	Wall          *wallReport `json:"wall,omitempty"`
}

// wallReport is the hindered diffusion of the particle near a plane wall.
type wallReport struct {
	DistanceNM             float64 `json:"distance_nm"`
	DistanceRadii          float64 `json:"distance_radii"`
	ParallelFactor         float64 `json:"parallel_factor"`
	PerpendicularFactor    float64 `json:"perpendicular_factor"`
	DiffusionParallelUM2S  float64 `json:"diffusion_parallel_um2_per_s"`
	DiffusionPerpendicular float64 `json:"diffusion_perpendicular_um2_per_s"`
}

// runDiffusion is the diffusion subcommand.
func runDiffusion(args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("diffusion", "(-radius r | -diffusion D) -temp T [-wall-distance z] [-medium …] [-json]", diffusionAbout, stderr)
	radius := defineQuantity(fs, "radius", Length, "", "hydrodynamic `radius`, e.g. 50nm")
	diff := defineQuantity(fs, "diffusion", DiffusionCoefficient, "", "measured diffusion `coefficient`, e.g. 4.9um2/s (D∥ when -wall-distance is given)")
	temp := defineQuantity(fs, "temp", Temperature, "", "`temperature` of the medium, e.g. 25C or 298.15K (required)")
	wall := defineQuantity(fs, "wall-distance", Length, "", "centre-to-wall `distance`, e.g. 200nm (optional)")
	media := defineMediumFlags(fs)
	asJSON := fs.Bool("json", false, "print one JSON object instead of a table")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if radius.IsSet() == diff.IsSet() {
		return usagef(fs, "give exactly one of -radius (to get D) and -diffusion (to get the radius)")
	}
	if !temp.IsSet() {
		return usagef(fs, "missing -temp, the temperature (e.g. 25C or 298.15K)")
	}
	m, err := media.Medium(fs)
	if err != nil {
		return err
	}
	q := stokesQuery{T: temp.SI(), medium: m, fromRadius: radius.IsSet(), radius: radius.SI(),
		diffusion: diff.SI(), nearWall: wall.IsSet(), wall: wall.SI()}
	rep, err := q.solve()
	if err != nil {
		return err
	}
	if *asJSON {
		return writeJSON(stdout, rep)
	}
	return rep.table().write(stdout)
}

// stokesQuery is one question to the diffusion subcommand: the diffusion coefficient of a sphere of
// radius (m) when fromRadius, else the radius of a sphere whose diffusion coefficient is diffusion
// (m²/s); when nearWall, also the hindrance by a plane wall at centre-to-wall distance wall (m).
type stokesQuery struct {
	T                 float64 // K
	medium            core.Medium
	fromRadius        bool
	radius, diffusion float64
	nearWall          bool
	wall              float64
}

// solve answers q. Every error is a *core.RangeError naming the field, the value and its range.
func (q stokesQuery) solve() (diffusionReport, error) {
	eta, err := q.medium.Viscosity(q.T)
	if err != nil {
		return diffusionReport{}, err
	}
	if err := checkFinite(map[string]float64{"viscosity": eta}); err != nil || !(eta > 0 && q.T > 0) {
		return diffusionReport{}, fmt.Errorf("internal error: medium %s gives η = %g Pa·s at %g K", q.medium.Name(), eta, q.T)
	}
	rep := diffusionReport{
		mediumFields:  describeMedium(q.medium),
		TemperatureK:  q.T,
		TemperatureC:  Temperature.In(q.T, "C"),
		ViscosityMPaS: Viscosity.In(eta, "mPa·s"),
	}
	var r, D float64 // radius and free (bulk) diffusion coefficient
	if q.fromRadius {
		rep.Input = "radius"
		r = q.radius
		if err := checkRadius(r, "hydrodynamic radius accepted by sizebudget, 0.1 nm to 100 µm"); err != nil {
			return diffusionReport{}, err
		}
		D = core.Diffusion(q.T, eta, r)
	} else {
		rep.Input = "diffusion"
		if err := checkDiffusion(q.diffusion); err != nil {
			return diffusionReport{}, err
		}
		if q.nearWall {
			r, err = radiusNearWall(q.T, eta, q.diffusion, q.wall)
			if err != nil {
				return diffusionReport{}, err
			}
		} else {
			r = core.Radius(q.T, eta, q.diffusion)
		}
		if err := checkRadius(r, "radius implied by the diffusion coefficient; sizebudget accepts 0.1 nm to 100 µm"); err != nil {
			return diffusionReport{}, err
		}
		D = q.diffusion
		if q.nearWall {
			D = core.Diffusion(q.T, eta, r)
		}
	}
	rep.RadiusNM = Length.In(r, "nm")
	rep.DiffusionUM2S = DiffusionCoefficient.In(D, "um2/s")
	rep.FrictionKgS = core.Friction(eta, r)
	rep.MobilitySKg = core.Mobility(eta, r)
	if q.nearWall {
		w, err := hinderedNearWall(r, q.wall, D)
		if err != nil {
			return diffusionReport{}, err
		}
		rep.Wall = &w
	}
	return rep, nil
}

// checkRadius returns a *core.RangeError on "radius_nm" when r (m) is outside [minRadius, maxRadius].
func checkRadius(r float64, why string) error {
	if !(r >= minRadius && r <= maxRadius) {
		return &core.RangeError{Field: "radius_nm", Value: Length.In(r, "nm"),
			Min: Length.In(minRadius, "nm"), Max: Length.In(maxRadius, "nm"), Why: why}
	}
	return nil
}

// checkDiffusion returns a *core.RangeError on "diffusion_um2_per_s" when D (m²/s) is outside
// [minDiffusion, maxDiffusion].
func checkDiffusion(D float64) error {
	if !(D >= minDiffusion && D <= maxDiffusion) {
		return &core.RangeError{Field: "diffusion_um2_per_s", Value: DiffusionCoefficient.In(D, "um2/s"),
			Min: DiffusionCoefficient.In(minDiffusion, "um2/s"), Max: DiffusionCoefficient.In(maxDiffusion, "um2/s"),
			Why: "diffusion coefficients accepted by sizebudget"}
	}
	return nil
}

// checkWall returns a *core.RangeError on "wall_distance_nm" unless the centre-to-wall distance z is
// at least core.FaxenMinDistance radii r and at most maxWallDistance (both in m).
func checkWall(r, z float64) error {
	if !(z >= core.FaxenMinDistance*r && z <= maxWallDistance) {
		return &core.RangeError{Field: "wall_distance_nm", Value: Length.In(z, "nm"),
			Min: Length.In(core.FaxenMinDistance*r, "nm"), Max: Length.In(maxWallDistance, "nm"),
			Why: fmt.Sprintf("Faxén's series for D∥ needs the centre at least %g radii from the wall; farther than 1 m a wall changes nothing visible", core.FaxenMinDistance)}
	}
	return nil
}

// hinderedNearWall returns the wall report of a sphere of radius r (m) whose centre is z (m) from a
// plane wall and whose free diffusion coefficient is D (m²/s).
func hinderedNearWall(r, z, D float64) (wallReport, error) {
	if err := checkWall(r, z); err != nil {
		return wallReport{}, err
	}
	par, err := core.FaxenParallel(r, z)
	if err != nil {
		return wallReport{}, err
	}
	perp, err := core.BrennerPerpendicular(r, z)
	if err != nil {
		return wallReport{}, err
	}
	return wallReport{
		DistanceNM:             Length.In(z, "nm"),
		DistanceRadii:          z / r,
		ParallelFactor:         par,
		PerpendicularFactor:    perp,
		DiffusionParallelUM2S:  DiffusionCoefficient.In(D*par, "um2/s"),
		DiffusionPerpendicular: DiffusionCoefficient.In(D*perp, "um2/s"),
	}, nil
}

// radiusNearWall returns the radius r (m) of the sphere whose diffusion parallel to a plane wall at
// centre-to-wall distance z (m) is Dpar (m²/s) at temperature T (K) in viscosity eta (Pa·s):
//
//	D₀(r)·F∥(r/z) = Dpar,  D₀(r) = k_B·T/(6π·η·r)
//
// with F∥ Faxén's series (core.FaxenParallel). The left side falls strictly with r, so the root is
// found by bisection on r in [r₀·F∥(r_hi/z), r_hi], where r₀ = k_B·T/(6π·η·Dpar) is the free
// radius (F∥ < 1, so the root is below it) and r_hi = min(r₀, z/1.5), down to adjacent floats. When
// even the largest sphere Faxén's series accepts at z (r = z/1.5) diffuses faster than Dpar, there is
// no solution and a *core.RangeError on "diffusion_um2_per_s" gives the smallest reachable value.
//
// References:
//   - Faxén H. (1923) Ark. Mat. Astron. Fys. 17(27), via core.FaxenParallel.
func radiusNearWall(T, eta, Dpar, z float64) (float64, error) {
	if err := checkWall(minRadius, z); err != nil {
		return 0, err
	}
	rmax := z / core.FaxenMinDistance
	for z/rmax < core.FaxenMinDistance {
		rmax = math.Nextafter(rmax, 0)
	}
	dpar := func(r float64) float64 {
		f, err := core.FaxenParallel(r, z)
		if err != nil { // not reached: r ≤ rmax throughout
			return math.NaN()
		}
		return core.Diffusion(T, eta, r) * f
	}
	r0 := core.Radius(T, eta, Dpar)
	hi := math.Min(r0, rmax)
	if dmin := dpar(rmax); r0 > rmax && dmin > Dpar {
		return 0, &core.RangeError{Field: "diffusion_um2_per_s", Value: DiffusionCoefficient.In(Dpar, "um2/s"),
			Min: DiffusionCoefficient.In(dmin, "um2/s"), Max: math.Inf(1),
			Why: fmt.Sprintf("no radius fits: at %s nm from the wall even the largest sphere of Faxén's range (radius %s nm) diffuses faster",
				formatNumber(Length.In(z, "nm")), formatNumber(Length.In(rmax, "nm")))}
	}
	f, _ := core.FaxenParallel(hi, z)
	lo := r0 * f
	if dpar(hi) == Dpar {
		return hi, nil
	}
	for range 200 { // each step halves the bracket: about 53 steps reach adjacent floats
		mid := lo + (hi-lo)/2
		if mid <= lo || mid >= hi {
			break
		}
		if dpar(mid) > Dpar {
			lo = mid
		} else {
			hi = mid
		}
	}
	if math.Abs(dpar(lo)-Dpar) < math.Abs(dpar(hi)-Dpar) {
		return lo, nil
	}
	return hi, nil
}

// table returns the readable form of the report.
func (rep diffusionReport) table() *table {
	t := &table{}
	rep.addRows(t)
	t.add("temperature", rep.TemperatureK, "K")
	t.add("", rep.TemperatureC, "°C")
	t.add("viscosity", rep.ViscosityMPaS, "mPa·s")
	given := map[bool]string{true: "(given)", false: "(computed)"}
	t.add("radius", rep.RadiusNM, "nm "+given[rep.Input == "radius"])
	dnote := given[rep.Input == "diffusion"]
	if rep.Wall != nil {
		dnote = "(free, far from walls)"
	}
	t.add("diffusion coefficient", rep.DiffusionUM2S, "µm²/s "+dnote)
	t.add("friction", rep.FrictionKgS, "kg/s")
	t.add("mobility", rep.MobilitySKg, "s/kg")
	if w := rep.Wall; w != nil {
		t.add("wall distance", w.DistanceNM, "nm (centre to wall)")
		t.add("", w.DistanceRadii, "radii")
		t.add("parallel factor D∥/D", w.ParallelFactor, "(Faxén)")
		t.add("perpendicular factor D⊥/D", w.PerpendicularFactor, "(Brenner)")
		pnote := ""
		if rep.Input == "diffusion" {
			pnote = " (given)"
		}
		t.add("diffusion parallel", w.DiffusionParallelUM2S, "µm²/s"+pnote)
		t.add("diffusion perpendicular", w.DiffusionPerpendicular, "µm²/s")
	}
	return t
}
