package core

import (
	"math"
	"math/rand/v2"
	"strconv"
)

// Recording describes how a freely diffusing particle is recorded by a camera: the physics (D, drift)
// and the acquisition (dimensions tracked, frame interval, exposure, localisation precision).
// Illumination is continuous during the exposure, which opens at the start of each frame.
type Recording struct {
	D        float64   // diffusion coefficient, m²/s; > 0
	Dims     int       // number of tracked axes, 1..3
	Interval float64   // frame interval Δt, s; > 0
	Exposure float64   // exposure time t_E, s; 0 ≤ t_E ≤ Δt, 0 = instantaneous
	Sigma    float64   // localisation precision σ per axis, m; ≥ 0
	Drift    []float64 // constant drift velocity per axis, m/s; nil (or empty) = none, else Dims values
}

// Validate reports the first field of r that is outside its allowed range, as a *RangeError naming the
// field: "dims", "frame_interval_s", "exposure_s", "sigma_m", "diffusion_m2_per_s", "drift_axes" (the
// number of drift components, which must be 0 or Dims) and "drift_m_per_s" (each component finite).
func (r Recording) Validate() error {
	if r.Dims < 1 || r.Dims > 3 {
		return &RangeError{Field: "dims", Value: float64(r.Dims), Min: 1, Max: 3}
	}
	if err := recPositive("diffusion_m2_per_s", r.D); err != nil {
		return err
	}
	if err := recPositive("frame_interval_s", r.Interval); err != nil {
		return err
	}
	if err := checkRange("exposure_s", r.Exposure, 0, r.Interval, "the exposure fits within one frame interval"); err != nil {
		return err
	}
	if err := checkRange("sigma_m", r.Sigma, 0, math.MaxFloat64, "localisation precision is non-negative and finite"); err != nil {
		return err
	}
	if n := len(r.Drift); n != 0 && n != r.Dims {
		return &RangeError{Field: "drift_axes", Value: float64(n), Min: float64(r.Dims), Max: float64(r.Dims),
			Why: "give no drift or one velocity per axis (dims = " + strconv.Itoa(r.Dims) + ")"}
	}
	for _, v := range r.Drift {
		if err := checkRange("drift_m_per_s", v, -math.MaxFloat64, math.MaxFloat64, "finite"); err != nil {
			return err
		}
	}
	return nil
}

// recPositive returns a *RangeError unless x is positive and finite.
func recPositive(field string, x float64) error {
	if !(x > 0) || math.IsInf(x, 1) {
		return &RangeError{Field: field, Value: x, Min: 0, Max: math.Inf(1), Why: "must be positive and finite"}
	}
	return nil
}

// Simulate returns a track of points positions recorded as described by rec, with the localisation
// noise of standard deviation rec.Sigma on every point and axis. See SimulateNoise for the model and
// the sampling method.
//
// Simulate panics if rec is invalid or points < 1: callers validate user input with rec.Validate first.
func Simulate(src rand.Source, rec Recording, points int) Track {
	mustSimulable("Simulate", rec, points)
	return simulate(rand.New(src), rec, points, nil)
}

// SimulateNoise is like Simulate with a localisation precision of its own for each point: sigmas[i] is
// the standard deviation (m, per axis) of the noise on point i, and len(sigmas) is the number of
// points; rec.Sigma is not used.
//
// Model, per axis: the particle's true position X(t) is a Brownian motion with diffusion coefficient D
// (Var[X(t+τ) − X(t)] = 2Dτ) plus the drift v·t. Frame i opens at t_i = iΔt and the camera records the
// exposure average plus independent Gaussian localisation noise:
//
//	x_i = (1/t_E) ∫_{t_i}^{t_i+t_E} X(t) dt + σ_i ξ_i,   ξ_i ~ N(0, 1)
//
// (x_i = X(t_i) + σ_i ξ_i when t_E = 0); X(0) = 0. With W_i = X(t_{i+1}) − X(t_i) − vΔt and A_i the
// exposure average of the Brownian increment over [t_i, t_i+t_E],
//
//	Var W_i = 2DΔt,   Var A_i = 2D·t_E/3,   Cov(A_i, W_i) = D·t_E,
//
// and (A_i, W_i) are independent of everything before t_i. Each frame therefore draws exactly
//
//	W_i = √(2DΔt)·z_1
//	x_i = X(t_i) + v·t_E/2 + (t_E/(2Δt))·W_i + √(D·t_E(2/3 − t_E/(2Δt)) + σ_i²)·z_2
//	X(t_{i+1}) = X(t_i) + W_i + vΔt
//
// with z_1, z_2 independent standard normals (the residual of A_i given W_i and the noise are
// independent and merged into one draw). The sampling is exact in distribution: no sub-steps are
// taken, so the R(1 − 1/n²) reduction of the blur coefficient that an n-sub-sample exposure suffers
// does not arise. The displacements dx_i = x_{i+1} − x_i have, with R = t_E/(6Δt) and σ constant,
//
//	⟨dx_i⟩ = vΔt,   Var dx_i = 2DΔt(1 − 2R) + 2σ²,   Cov(dx_i, dx_{i+1}) = −(σ² − 2RDΔt),
//
// and vanishing covariance at lags ≥ 2. Axes are independent. Cost: one pass, two normal variates per
// frame and axis (one when t_E = 0 and σ_i = 0), one allocation for all positions.
//
// SimulateNoise panics if rec is invalid, if sigmas is empty or if any sigmas[i] is negative or not
// finite: callers validate first.
//
// References:
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
func SimulateNoise(src rand.Source, rec Recording, sigmas []float64) Track {
	mustSimulable("SimulateNoise", rec, len(sigmas))
	for _, s := range sigmas {
		if !(s >= 0) || math.IsInf(s, 1) {
			panic("core: SimulateNoise: sigmas must be non-negative and finite")
		}
	}
	return simulate(rand.New(src), rec, len(sigmas), sigmas)
}

func mustSimulable(fn string, rec Recording, points int) {
	if err := rec.Validate(); err != nil {
		panic("core: " + fn + ": invalid recording: " + err.Error())
	}
	if points < 1 {
		panic("core: " + fn + ": need at least one point")
	}
}

// simulate implements SimulateNoise; sigmas == nil means rec.Sigma on every point.
func simulate(rnd *rand.Rand, rec Recording, points int, sigmas []float64) Track {
	dt, te, D := rec.Interval, rec.Exposure, rec.D
	sw := math.Sqrt(2 * D * dt)    // sd of the Brownian increment over a frame
	cw := te / (2 * dt)            // regression of the exposure average on that increment
	res := D * te * (2.0/3.0 - cw) // residual variance of the exposure average given the increment
	sx := math.Sqrt(res + rec.Sigma*rec.Sigma)
	buf := make([]float64, rec.Dims*points)
	tr := Track{Pos: make([][]float64, rec.Dims)}
	for a := range tr.Pos {
		pos := buf[a*points : (a+1)*points : (a+1)*points]
		tr.Pos[a] = pos
		var v float64
		if len(rec.Drift) > 0 {
			v = rec.Drift[a]
		}
		off, step := v*te/2, v*dt
		x := 0.0 // true position at the start of the frame, drift included
		switch {
		case sigmas != nil:
			for i := range pos {
				w := sw * rnd.NormFloat64()
				s := math.Sqrt(res + sigmas[i]*sigmas[i])
				pos[i] = x + off + cw*w + s*rnd.NormFloat64()
				x += w + step
			}
		case sx == 0: // instantaneous and noise-free: the recorded positions are the true ones
			for i := range pos {
				pos[i] = x
				x += sw*rnd.NormFloat64() + step
			}
		default:
			for i := range pos {
				w := sw * rnd.NormFloat64()
				pos[i] = x + off + cw*w + sx*rnd.NormFloat64()
				x += w + step
			}
		}
	}
	return tr
}
