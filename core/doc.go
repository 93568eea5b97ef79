// Package core holds the physics and statistics of camera-recorded Brownian tracks: Stokes–Einstein,
// media viscosities, wall and focus corrections, track simulation, estimators of the diffusion
// coefficient and their variances. SI units throughout; no I/O, no global random state.
package core
