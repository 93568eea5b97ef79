package main

import (
	"errors"
	"flag"
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"sizebudget/core"
)

// diffusionKeys are the keys of every diffusion report in water.
var diffusionKeys = []string{"medium", "pressure_MPa", "input", "temperature_K", "temperature_C", "viscosity_mPa_s",
	"radius_nm", "diffusion_um2_per_s", "friction_kg_per_s", "mobility_s_per_kg"}

// wallKeys are the keys of the "wall" object.
var wallKeys = []string{"distance_nm", "distance_radii", "parallel_factor", "perpendicular_factor",
	"diffusion_parallel_um2_per_s", "diffusion_perpendicular_um2_per_s"}

// waterAt25 returns the viscosity (Pa·s) of core.Water at 298.15 K (25 °C by the definition of the
// Celsius scale).
func waterAt25(t *testing.T) float64 {
	t.Helper()
	eta, err := core.Water{}.Viscosity(298.15)
	if err != nil {
		t.Fatal(err)
	}
	return eta
}

// diffusionJSON runs the diffusion subcommand with -json and returns the decoded object.
func diffusionJSON(t *testing.T, golden string, args ...string) map[string]any {
	t.Helper()
	stdout, stderr, err := runArgs(append([]string{"diffusion", "-json"}, args...)...)
	if err != nil || stderr != "" {
		t.Fatalf("%v: err %v, stderr %q", args, err, stderr)
	}
	if golden != "" {
		checkGolden(t, golden, stdout)
	}
	return decodeObject(t, stdout)
}

func TestDiffusionFromRadius(t *testing.T) {
	const T, r = 298.15, 50e-9 // 25 °C; 50 nm
	eta := waterAt25(t)
	obj := diffusionJSON(t, "diffusion_radius.json", "-radius", "50nm", "-temp", "25C")
	checkKeys(t, obj, diffusionKeys...)
	if obj["input"] != "radius" || obj["medium"] != "water" {
		t.Errorf("input %v, medium %v", obj["input"], obj["medium"])
	}
	checkNumbers(t, obj, map[string]float64{
		"temperature_K": T, "temperature_C": 25, "viscosity_mPa_s": eta * 1e3, "radius_nm": 50,
		"diffusion_um2_per_s": core.Diffusion(T, eta, r) * 1e12, "friction_kg_per_s": core.Friction(eta, r),
		"mobility_s_per_kg": core.Mobility(eta, r), "pressure_MPa": core.AmbientPressureMPa,
	})
}

func TestDiffusionFromCoefficient(t *testing.T) {
	const T, D = 298.15, 4.9e-12 // 25 °C; 4.9 µm²/s
	eta := waterAt25(t)
	obj := diffusionJSON(t, "diffusion_coefficient.json", "-diffusion", "4.9µm²/s", "-temp", "25C")
	checkKeys(t, obj, diffusionKeys...)
	r := core.Radius(T, eta, D)
	if obj["input"] != "diffusion" {
		t.Errorf("input %v", obj["input"])
	}
	checkNumbers(t, obj, map[string]float64{
		"radius_nm": r * 1e9, "diffusion_um2_per_s": 4.9, "viscosity_mPa_s": eta * 1e3,
		"friction_kg_per_s": core.Friction(eta, r), "mobility_s_per_kg": core.Mobility(eta, r),
	})
}

func TestDiffusionInGlycerol(t *testing.T) {
	m := core.GlycerolWater{MassFraction: 0.6}
	eta, err := m.Viscosity(293.15)
	if err != nil {
		t.Fatal(err)
	}
	obj := diffusionJSON(t, "", "-radius", "0.1um", "-temp", "20C", "-medium", "glycerol", "-glycerol", "0.6")
	checkNumbers(t, obj, map[string]float64{
		"glycerol_mass_fraction": 0.6, "viscosity_mPa_s": eta * 1e3, "diffusion_um2_per_s": core.Diffusion(293.15, eta, 1e-7) * 1e12,
	})
}

func TestDiffusionNearWall(t *testing.T) {
	const T, r, z = 298.15, 50e-9, 200e-9
	eta := waterAt25(t)
	obj := diffusionJSON(t, "diffusion_wall.json", "-radius", "50nm", "-temp", "25C", "-wall-distance", "0.2um")
	checkKeys(t, obj, append(slices.Clone(diffusionKeys), "wall")...)
	wall, ok := obj["wall"].(map[string]any)
	if !ok {
		t.Fatalf("wall is %T", obj["wall"])
	}
	checkKeys(t, wall, wallKeys...)
	par, err1 := core.FaxenParallel(r, z)
	perp, err2 := core.BrennerPerpendicular(r, z)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	D := core.Diffusion(T, eta, r)
	checkNumbers(t, obj, map[string]float64{"radius_nm": 50, "diffusion_um2_per_s": D * 1e12})
	checkNumbers(t, wall, map[string]float64{
		"distance_nm": 200, "distance_radii": 4, "parallel_factor": par, "perpendicular_factor": perp,
		"diffusion_parallel_um2_per_s": D * par * 1e12, "diffusion_perpendicular_um2_per_s": D * perp * 1e12,
	})
}

// TestDiffusionRadiusNearWall checks the inversion: the radius printed for a measured parallel
// coefficient must reproduce it through D₀(r)·F∥(r/z) (core.Diffusion and core.FaxenParallel), and
// the inversion of the parallel coefficient computed from a radius must give that radius back.
func TestDiffusionRadiusNearWall(t *testing.T) {
	const T, z, Dpar = 298.15, 200e-9, 4.9e-12
	eta := waterAt25(t)
	obj := diffusionJSON(t, "diffusion_wall_solve.json", "-diffusion", "4.9um2/s", "-temp", "25C", "-wall-distance", "200nm")
	r := obj["radius_nm"].(float64) * 1e-9
	par, err := core.FaxenParallel(r, z)
	if err != nil {
		t.Fatal(err)
	}
	if got := core.Diffusion(T, eta, r) * par; !closeTo(got, Dpar) {
		t.Errorf("D₀(r)·F∥(r/z) = %.17g at r = %g, want %g", got, r, Dpar)
	}
	if free := core.Radius(T, eta, Dpar); !(r < free) {
		t.Errorf("radius near the wall %g is not below the free radius %g", r, free)
	}
	wall := obj["wall"].(map[string]any)
	checkNumbers(t, obj, map[string]float64{"diffusion_um2_per_s": core.Diffusion(T, eta, r) * 1e12})
	checkNumbers(t, wall, map[string]float64{"diffusion_parallel_um2_per_s": 4.9, "parallel_factor": par, "distance_radii": z / r})

	// Round trip through the command line: radius → D∥ → radius.
	for _, radius := range []string{"20nm", "50nm", "133nm", "1um"} {
		zText := "200nm"
		if radius == "1um" {
			zText = "1.5um" // at Faxén's limit, z = 1.5 r
		}
		fwd := diffusionJSON(t, "", "-radius", radius, "-temp", "25C", "-wall-distance", zText)
		dpar := fwd["wall"].(map[string]any)["diffusion_parallel_um2_per_s"].(float64)
		back := diffusionJSON(t, "", "-diffusion", strconv.FormatFloat(dpar, 'g', -1, 64)+"um2/s", "-temp", "25C", "-wall-distance", zText)
		if got, want := back["radius_nm"].(float64), fwd["radius_nm"].(float64); !closeTo(got, want) {
			t.Errorf("radius %s → D∥ %g µm²/s → radius %.17g nm", radius, dpar, got)
		}
	}
}

// TestRadiusNearWallLimit checks the edge of solvability: the D∥ of the largest sphere Faxén's series
// accepts at z (r = z/1.5) is solvable, a slightly smaller one is a range error naming it.
func TestRadiusNearWallLimit(t *testing.T) {
	const T, z = 298.15, 200e-9
	eta := waterAt25(t)
	rmax := z / core.FaxenMinDistance
	f, err := core.FaxenParallel(rmax, z)
	if err != nil {
		t.Fatal(err)
	}
	dmin := core.Diffusion(T, eta, rmax) * f
	r, err := radiusNearWall(T, eta, dmin, z)
	if err != nil || !closeTo(r, rmax) {
		t.Errorf("radiusNearWall at the limit: %g, %v; want %g", r, err, rmax)
	}
	_, err = radiusNearWall(T, eta, dmin*(1-1e-9), z)
	checkRangeReport(t, err, "diffusion_um2_per_s", dmin*(1-1e-9)*1e12, dmin*1e12, math.Inf(1))
	// Far from the wall only Faxén's first-order term matters: r = r₀·F∥ ≈ r₀·(1 − (9/16)·r/z) solves
	// to r = r₀/(1 + (9/16)·r₀/z) exactly; the (r/z)³ terms, 1.25e-13 at z = 1e4 r₀, are below the
	// 1e-12 tolerance.
	r0 := core.Radius(T, eta, 4.9e-12)
	zFar := 1e4 * r0
	r, err = radiusNearWall(T, eta, 4.9e-12, zFar)
	if want := r0 / (1 + 9.0/16*r0/zFar); err != nil || !closeTo(r, want) {
		t.Errorf("far from the wall: r = %.15g, want %.15g", r, want)
	}
}

func TestDiffusionTable(t *testing.T) {
	stdout, stderr, err := runArgs("diffusion", "-radius", "50nm", "-temp", "25C", "-wall-distance", "200nm")
	if err != nil || stderr != "" {
		t.Fatalf("err %v, stderr %q", err, stderr)
	}
	checkGolden(t, "diffusion_wall.txt", stdout)
	D := core.Diffusion(298.15, waterAt25(t), 50e-9)
	checkRows(t, stdout, "radius 50 nm (given)", "diffusion coefficient "+formatNumber(D*1e12)+" µm²/s (free, far from walls)",
		"wall distance 200 nm (centre to wall)", "4 radii")

	stdout, _, err = runArgs("diffusion", "-diffusion", "4.9um2/s", "-temp", "25C")
	if err != nil {
		t.Fatal(err)
	}
	checkGolden(t, "diffusion_coefficient.txt", stdout)
	checkRows(t, stdout, "diffusion coefficient 4.9 µm²/s (given)")
}

func TestDiffusionHelp(t *testing.T) {
	stdout, stderr, err := runArgs("diffusion", "-h")
	if !errors.Is(err, flag.ErrHelp) || stdout != "" {
		t.Fatalf("err %v, stdout %q", err, stdout)
	}
	for _, want := range []string{"-radius radius", "-diffusion coefficient", "-wall-distance distance", "-temp temperature",
		"exactly one of the two", "bisection", "measured parallel one", "-medium liquid", "(default 25C)", Length.Accepted,
		DiffusionCoefficient.Accepted} {
		if !strings.Contains(stderr, want) {
			t.Errorf("diffusion -h lacks %q", want)
		}
	}
}

func TestDiffusionUsageErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		text string
	}{
		{[]string{"-temp", "25C"}, "give exactly one of -radius (to get D) and -diffusion (to get the radius)"},
		{[]string{"-temp", "25C", "-radius", "50nm", "-diffusion", "4.9um2/s"}, "give exactly one of -radius"},
		{[]string{"-radius", "50nm"}, "missing -temp"},
		{[]string{"-temp", "25C", "-radius", "50"}, `"50" has no unit: a length needs one: ` + Length.Accepted},
		{[]string{"-temp", "25C", "-radius", "2px"}, `unknown unit "px"`},
		{[]string{"-temp", "25C", "-diffusion", "4.9um/s"}, `unknown unit "um/s" for a diffusion coefficient`},
		{[]string{"-temp", "25C", "-radius", "50nm", "-wall-distance", "200"}, "flag -wall-distance"},
		{[]string{"-temp", "25C", "-radius", "50nm", "-medium", "custom"}, "-medium custom needs -visc"},
		{[]string{"-temp", "25C", "-radius", "50nm", "-glycerol", "10%"}, "-glycerol applies only"},
		{[]string{"-temp", "25C", "-radius", "Infnm"}, "not a finite number"},
	} {
		_, _, err := runArgs(append([]string{"diffusion"}, c.args...)...)
		checkUsageReport(t, err, "sizebudget diffusion", c.text)
	}
}

func TestDiffusionRangeErrors(t *testing.T) {
	_, tmax, err := core.Water{}.TemperatureRange()
	if err != nil {
		t.Fatal(err)
	}
	// The radius implied by 1e-7 µm²/s in water at 25 °C, from core.Radius.
	rHuge := core.Radius(298.15, waterAt25(t), 1e-19) * 1e9
	for _, c := range []struct {
		args            []string
		field           string
		value, min, max float64
	}{
		// The tool's own ranges: 0.1 nm to 100 µm, 1e-8 to 1e6 µm²/s (see diffusion.go).
		{[]string{"-radius", "50m"}, "radius_nm", 5e10, 0.1, 1e5},
		{[]string{"-radius", "0nm"}, "radius_nm", 0, 0.1, 1e5},
		{[]string{"-radius", "-50nm"}, "radius_nm", -50, 0.1, 1e5},
		{[]string{"-diffusion", "0um2/s"}, "diffusion_um2_per_s", 0, 1e-8, 1e6},
		{[]string{"-diffusion", "1m2/s"}, "diffusion_um2_per_s", 1e12, 1e-8, 1e6},
		{[]string{"-diffusion", "1e-7um2/s"}, "radius_nm", rHuge, 0.1, 1e5},
		// Faxén's series needs z ≥ 1.5 r (core.FaxenMinDistance): 75 nm for 50 nm; at most 1 m (1e9 nm).
		{[]string{"-radius", "50nm", "-wall-distance", "60nm"}, "wall_distance_nm", 60, 75, 1e9},
		{[]string{"-radius", "50nm", "-wall-distance", "0nm"}, "wall_distance_nm", 0, 75, 1e9},
		{[]string{"-radius", "50nm", "-wall-distance", "2m"}, "wall_distance_nm", 2e9, 75, 1e9},
		{[]string{"-diffusion", "4.9um2/s", "-wall-distance", "-1nm"}, "wall_distance_nm", -1, 0.15, 1e9},
		{[]string{"-diffusion", "1e6um2/s", "-wall-distance", "1e308m"}, "wall_distance_nm", math.Inf(1), 0.15, 1e9},
		// The medium's range (core.Water).
		{[]string{"-radius", "50nm", "-temp", "400K"}, "temperature_K", 400, 273.15, tmax},
	} {
		args := c.args
		if !slices.Contains(args, "-temp") {
			args = append(args, "-temp", "25C")
		}
		stdout, _, err := runArgs(append([]string{"diffusion", "-json"}, args...)...)
		if stdout != "" {
			t.Errorf("%v: wrote %q on failure", c.args, stdout)
		}
		checkRangeReport(t, err, c.field, c.value, c.min, c.max)
	}
}

// FuzzDiffusionArgs runs the diffusion subcommand on command lines made of fuzzed flag values (an
// empty value leaves the flag out) and fuzzed extra arguments; see checkOutcome for the rules.
func FuzzDiffusionArgs(f *testing.F) {
	f.Add("50nm", "", "25C", "", "water", "", true)
	f.Add("", "4.9um2/s", "25C", "200nm", "water", "", true)
	f.Add("50nm", "", "25C", "60nm", "water", "-json=false", false)
	f.Add("", "0.5um2/s", "25C", "200nm", "", "", false)
	f.Add("0.1um", "", "20C", "", "glycerol", "-glycerol 60%", true)
	f.Add("", "1e-20m2/s", "30C", "1e308m", "custom", "-visc 1.2mPas -visc-tref 20C", true)
	f.Add("50nm", "4.9um2/s", "", "", "oil", "-h", false)
	for _, c := range readUnitCases(f) {
		f.Add(c.input, "", "25C", c.input, "water", "", true)
		f.Add("", c.input, c.input, "1um", "", "", false)
	}
	f.Fuzz(func(t *testing.T, radius, diff, temp, wall, medium, extra string, asJSON bool) {
		var args []string
		for _, fv := range [][2]string{{"radius", radius}, {"diffusion", diff}, {"temp", temp}, {"wall-distance", wall}, {"medium", medium}} {
			if fv[1] != "" {
				args = append(args, "-"+fv[0], fv[1])
			}
		}
		if asJSON {
			args = append(args, "-json")
		}
		args = append(args, strings.Fields(extra)...)
		checkOutcome(t, "diffusion", args)
	})
}
