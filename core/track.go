package core

// Track is one recorded trajectory: Pos[axis][i] is the i-th measured position along one axis, in m,
// for points equally spaced by the frame interval. All axes have the same length.
type Track struct {
	Pos [][]float64
}

// Dims returns the number of axes.
func (t Track) Dims() int { return len(t.Pos) }

// Len returns the number of points (positions) in the track.
func (t Track) Len() int {
	if len(t.Pos) == 0 {
		return 0
	}
	return len(t.Pos[0])
}

// Displacements returns dx[axis][k] = Pos[axis][k+1] − Pos[axis][k], in m; Len()−1 per axis.
func (t Track) Displacements() [][]float64 {
	dx := make([][]float64, len(t.Pos))
	for a, p := range t.Pos {
		if len(p) < 2 {
			dx[a] = nil
			continue
		}
		d := make([]float64, len(p)-1)
		for k := range d {
			d[k] = p[k+1] - p[k]
		}
		dx[a] = d
	}
	return dx
}
