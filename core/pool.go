package core

import (
	"errors"
	"fmt"
	"math"
)

// Estimate is a diffusion coefficient estimated from one or more tracks.
type Estimate struct {
	D             float64 // diffusion coefficient, m²/s
	S2            float64 // localisation variance σ² per axis, m²; NaN if the estimator does not estimate it
	Displacements int     // displacements per axis, summed over the tracks
	Tracks        int     // number of tracks pooled
}

// Errors for sets of tracks that an estimator cannot use.
var (
	ErrNoTracks   = errors.New("core: no tracks")
	ErrDimsDiffer = errors.New("core: tracks differ in their number of axes")
	ErrRagged     = errors.New("core: axes of a track differ in length")
	ErrNonFinite  = errors.New("core: track positions are not finite")
)

// trackStat is an estimator applied to one axis of one track: it returns the per-axis estimates.
type trackStat func(pos []float64) (D, s2 float64)

// pool applies stat to every axis of every track and pools the estimates: each track's estimate is the
// mean over its axes, and the pooled estimate is the mean of the track estimates weighted by their
// numbers of displacements N_i:
//
//	D̂ = Σ N_i D̂_i / Σ N_i
//
// Any weighted mean of unbiased per-track estimates is unbiased; weighting by N_i is the natural choice
// for estimators whose variance falls like 1/N_i, and for the σ-known estimator without drift removal it
// equals the estimate from the pooled sum of squares. Tracks with fewer than minPoints points are an
// error (a *RangeError wrapped with the track index), as are empty input, differing numbers of axes,
// ragged tracks and non-finite results.
func pool(tracks []Track, minPoints int, need string, stat trackStat) (Estimate, error) {
	if len(tracks) == 0 {
		return Estimate{}, ErrNoTracks
	}
	dims := tracks[0].Dims()
	if dims == 0 {
		return Estimate{}, fmt.Errorf("core: track 0: %w", &RangeError{Field: "dims", Value: 0, Min: 1, Max: 3})
	}
	var sumD, sumS2 float64
	var n int
	for i, tr := range tracks {
		if err := checkTrack(i, tr, dims, minPoints, need); err != nil {
			return Estimate{}, err
		}
		pts := tr.Len()
		var dTr, s2Tr float64
		for _, p := range tr.Pos {
			d, s2 := stat(p)
			dTr += d
			s2Tr += s2
		}
		if math.IsNaN(dTr) || math.IsInf(dTr, 0) {
			return Estimate{}, fmt.Errorf("%w: track %d", ErrNonFinite, i)
		}
		w := float64(pts - 1)
		sumD += w * dTr / float64(dims)
		sumS2 += w * s2Tr / float64(dims)
		n += pts - 1
	}
	return Estimate{D: sumD / float64(n), S2: sumS2 / float64(n), Displacements: n, Tracks: len(tracks)}, nil
}

// checkTrack returns an error when track i does not have dims axes of equal length (ErrDimsDiffer,
// ErrRagged) or has fewer than minPoints points (a *RangeError on "points" saying need).
func checkTrack(i int, tr Track, dims, minPoints int, need string) error {
	if tr.Dims() != dims {
		return fmt.Errorf("%w: track %d has %d, track 0 has %d", ErrDimsDiffer, i, tr.Dims(), dims)
	}
	pts := tr.Len()
	for a, p := range tr.Pos {
		if len(p) != pts {
			return fmt.Errorf("%w: track %d axis %d has %d points, axis 0 has %d", ErrRagged, i, a, len(p), pts)
		}
	}
	if pts < minPoints {
		return fmt.Errorf("core: track %d: %w", i,
			&RangeError{Field: "points", Value: float64(pts), Min: float64(minPoints), Max: math.Inf(1), Why: need})
	}
	return nil
}

// checkEstimatorArgs returns a *RangeError for a frame interval that is not positive and finite or a
// blur coefficient outside [0, 1/4].
func checkEstimatorArgs(interval, blur float64) error {
	if err := recPositive("frame_interval_s", interval); err != nil {
		return err
	}
	return checkRange("blur", blur, 0, 0.25, "motion-blur coefficient R")
}

// laggedSums returns, for the displacements of pos about the offset m (dx_k − m, k = 1..N),
// S0 = Σ (dx_k − m)² and S1 = Σ_{k<N} (dx_k − m)(dx_{k+1} − m). One pass, no allocation.
func laggedSums(pos []float64, m float64) (s0, s1 float64) {
	prev := pos[1] - pos[0] - m
	s0 = prev * prev
	for k := 2; k < len(pos); k++ {
		d := pos[k] - pos[k-1] - m
		s0 += d * d
		s1 += d * prev
		prev = d
	}
	return s0, s1
}

// meanStep is the mean displacement (x_N − x_0)/N of a track axis: the per-track drift estimate.
func meanStep(pos []float64) float64 {
	return (pos[len(pos)-1] - pos[0]) / float64(len(pos)-1)
}
