package uncertainty

import (
	"encoding/json"
	"math"
)

// Source is one line of the uncertainty budget of the radius: an input quantity, its standard
// uncertainty, the sensitivity coefficient of ln r to it, the resulting relative standard uncertainty
// of r and its share of the combined variance.
type Source struct {
	Source        string  `json:"source"`                        // tracks, temperature, viscosity, calibration, drift
	Input         string  `json:"input"`                         // what the input quantity is, with its unit
	InputU        float64 `json:"input_standard_uncertainty"`    // in the unit named by Input
	Sensitivity   float64 `json:"sensitivity"`                   // ∂ln r/∂x in 1/(unit of Input)
	RelU          float64 `json:"relative_standard_uncertainty"` // |c|·u(x), relative to r
	Share         float64 `json:"share"`                         // RelU² / u_c², 0–1
	DOF           DOF     `json:"dof"`                           // degrees of freedom of u(x); null = infinite
	ShrinksFrames bool    `json:"shrinks_with_frames"`           // falls with more frames or tracks
}

// DOF is a number of degrees of freedom; +Inf (an exactly known uncertainty) is written as null.
type DOF float64

// MarshalJSON writes an infinite DOF as null.
func (d DOF) MarshalJSON() ([]byte, error) {
	if math.IsInf(float64(d), 1) || math.IsNaN(float64(d)) {
		return []byte("null"), nil
	}
	return json.Marshal(float64(d))
}

// Budget is the GUM (JCGM 100:2008) evaluation of the radius: the law of propagation of uncertainty to
// first order in relative terms,
//
//	u_c²(r)/r² = Σ_i (c_i·u(x_i))²,   ν_eff = u_c⁴ / Σ_i (c_i u(x_i))⁴/ν_i   (Welch–Satterthwaite)
//	k = t_{(1+p)/2}(ν_eff),   U = k·u_c
//
// with the temperature entering through both T and η(T) (c_T = 1/T − d ln η/dT), so the correlation
// between temperature and viscosity is carried by the model rather than added as a covariance.
//
// References:
//   - JCGM 100:2008 (GUM), 5.1.2 (law of propagation), G.4 (Welch–Satterthwaite), G.3 (Student's t).
type Budget struct {
	Sources      []Source   `json:"sources"`
	RelU         float64    `json:"relative_standard_uncertainty"` // u_c(r)/r
	EffectiveDOF DOF        `json:"effective_dof"`
	K            float64    `json:"coverage_factor"`
	RelExpanded  float64    `json:"relative_expanded_uncertainty"` // k·u_c/r
	IntervalNM   [2]float64 `json:"interval_nm"`                   // r(1 ± k·u_c/r)
}

// budget evaluates the GUM budget for tracks grouped by length.
func (u *setup) budget(groups []LengthGroup) Budget {
	var src []Source
	tv := u.trackRelVar(groups)
	frames := 0
	for _, g := range groups {
		frames = max(frames, g.Frames)
	}
	src = append(src, Source{Source: "tracks", Input: "relative error of D̂", InputU: math.Sqrt(tv), Sensitivity: -1,
		DOF: DOF(2 / tv), ShrinksFrames: true})
	if u.uT > 0 {
		c := 1/u.T0 - u.dlnEta
		src = append(src, Source{Source: "temperature", Input: "temperature, K", InputU: u.uT, Sensitivity: c, DOF: DOF(math.Inf(1))})
	}
	if u.uEta > 0 {
		src = append(src, Source{Source: "viscosity", Input: "relative error of η", InputU: u.uEta, Sensitivity: -1, DOF: DOF(math.Inf(1))})
	}
	if u.uPix > 0 {
		src = append(src, Source{Source: "calibration", Input: "relative error of the pixel size", InputU: u.uPix, Sensitivity: -2, DOF: DOF(math.Inf(1))})
	}
	if b := u.driftRelBias(frames); b > 0 {
		// An uncorrected bias of known bound b is taken as rectangular ±b (common practice, no source).
		src = append(src, Source{Source: "drift", Input: "relative bias of D̂ from residual drift", InputU: b / math.Sqrt(3), Sensitivity: -1, DOF: DOF(math.Inf(1))})
	}
	var sum, wsInv float64
	for i := range src {
		src[i].RelU = math.Abs(src[i].Sensitivity * src[i].InputU)
		v := src[i].RelU * src[i].RelU
		sum += v
		if nu := float64(src[i].DOF); !math.IsInf(nu, 1) {
			wsInv += v * v / nu
		}
	}
	for i := range src {
		src[i].Share = src[i].RelU * src[i].RelU / sum
	}
	b := Budget{Sources: src, RelU: math.Sqrt(sum)}
	nu := math.Inf(1)
	if wsInv > 0 {
		// Below one degree of freedom Student's t has no variance and its quantiles run to infinity;
		// JCGM 100 G.4.1 truncates ν_eff to an integer, we keep at least 1 (the coverage factor is then
		// t_{0.975}(1) = 12.7 at 95 %, and the Monte Carlo interval is the one to trust).
		nu = math.Max(1, sum*sum/wsInv)
	}
	b.EffectiveDOF = DOF(nu)
	b.K = coverageFactor(u.p, nu)
	b.RelExpanded = b.K * b.RelU
	rnm := u.r0 * 1e9
	b.IntervalNM = [2]float64{rnm * (1 - b.RelExpanded), rnm * (1 + b.RelExpanded)}
	return b
}

// fixedRelVar is the part of the relative variance that does not shrink with frames or tracks.
func (b Budget) fixedRelVar() float64 {
	s := 0.0
	for _, x := range b.Sources {
		if !x.ShrinksFrames {
			s += x.RelU * x.RelU
		}
	}
	return s
}

// dominantFixed names the source that dominates the part that does not shrink with frames.
func (b Budget) dominantFixed() string {
	name, best := "", -1.0
	for _, x := range b.Sources {
		if !x.ShrinksFrames && x.RelU > best {
			name, best = x.Source, x.RelU
		}
	}
	return name
}

// coverageFactor is k_p = t_{(1+p)/2}(ν), Student's t quantile (the normal one for ν > 1e7).
func coverageFactor(p, nu float64) float64 {
	q := (1 + p) / 2
	if math.IsInf(nu, 1) || nu > 1e7 {
		return normalQuantile(q)
	}
	return studentQuantile(q, nu)
}
