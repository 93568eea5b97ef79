package trackfile

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"sizebudget/core"
)

// simulated returns n tracks of 5 to 40 positions recorded as rec, from a fixed seed.
func simulated(seed uint64, rec core.Recording, n int) []core.Track {
	src := rand.NewPCG(seed, 1)
	r := rand.New(src)
	out := make([]core.Track, n)
	for i := range out {
		out[i] = core.Simulate(src, rec, 5+r.IntN(36))
		for a := range out[i].Pos {
			for k := range out[i].Pos[a] {
				out[i].Pos[a][k] += 20e-6 // a field of view away from the origin
			}
		}
	}
	return out
}

func TestWriterRoundTrip(t *testing.T) {
	// Written with the shortest exact decimals, positions read back to within the two roundings of
	// the unit conversion (m → unit on writing, unit → m on reading): 1e-15 relative.
	for _, c := range []struct {
		unit string
		dims int
	}{{"nm", 3}, {"um", 2}, {"µm", 2}, {"m", 2}} {
		rec := core.Recording{D: 4.4e-12, Dims: c.dims, Interval: 0.033, Exposure: 0.01, Sigma: 30e-9}
		tracks := simulated(7, rec, 40)
		var buf bytes.Buffer
		w := NewWriter(&buf, c.unit, c.dims, -1)
		notes := []string{"INVENTED data for a test", "second line"}
		if err := w.Comment(strings.Join(notes, "\n")); err != nil {
			t.Fatal(err)
		}
		for i, tr := range tracks {
			if err := w.WriteTrack(fmt.Sprintf("p%d", i), int64(100*i-7), tr); err != nil {
				t.Fatal(err)
			}
		}
		if err := w.Flush(); err != nil {
			t.Fatal(err)
		}
		r, err := NewReader(&buf, Options{MinPositions: LeastPositions})
		if err != nil {
			t.Fatal(err)
		}
		got, segs, err := readAll(r)
		if err != nil {
			t.Fatal(err)
		}
		if len(got) != len(tracks) || !slices.Equal(r.Stats().Notes, notes) || r.Dims() != c.dims {
			t.Fatalf("%s: %d tracks back of %d, stats %+v", c.unit, len(got), len(tracks), r.Stats())
		}
		for i, tr := range tracks {
			if segs[i].Name != fmt.Sprintf("p%d", i) || segs[i].FirstFrame != int64(100*i-7) || got[i].Len() != tr.Len() {
				t.Fatalf("%s: track %d came back as %+v with %d positions", c.unit, i, segs[i], got[i].Len())
			}
			for a := range tr.Pos {
				for k, x := range tr.Pos[a] {
					if y := got[i].Pos[a][k]; math.Abs(y-x) > 1e-15*math.Abs(x) {
						t.Fatalf("%s: track %d axis %d point %d: %.17g m back as %.17g", c.unit, i, a, k, x, y)
					}
				}
			}
		}
	}
}

func TestWriterDecimals(t *testing.T) {
	// With 3 decimals in µm, a position comes back within half a unit of the last decimal, 0.5 nm.
	rec := core.Recording{D: 4.4e-12, Dims: 2, Interval: 0.033, Sigma: 30e-9}
	tracks := simulated(8, rec, 5)
	var buf bytes.Buffer
	w := NewWriter(&buf, "um", 2, 3)
	for i, tr := range tracks {
		if err := w.WriteTrack(fmt.Sprint(i), 0, tr); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Flush(); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(buf.String(), "track,frame,x_um,y_um\n0,0,") {
		t.Fatalf("file starts %.40q", buf.String())
	}
	r, _ := NewReader(&buf, Options{})
	got, _, err := readAll(r)
	if err != nil {
		t.Fatal(err)
	}
	for i, tr := range tracks {
		for a := range tr.Pos {
			for k, x := range tr.Pos[a] {
				if d := math.Abs(got[i].Pos[a][k] - x); d > 0.5e-9*(1+1e-9) {
					t.Fatalf("track %d: %.17g back as %.17g", i, x, got[i].Pos[a][k])
				}
			}
		}
	}
}

func TestWriterEmpty(t *testing.T) {
	var buf bytes.Buffer
	w := NewWriter(&buf, "nm", 3, 2)
	if err := w.Flush(); err != nil || buf.String() != "track,frame,x_nm,y_nm,z_nm\n" {
		t.Fatalf("%q, %v", buf.String(), err)
	}
	r, err := NewReader(&buf, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := r.Next(); err != io.EOF {
		t.Errorf("Next: %v, want io.EOF", err)
	}
}

func TestWriterRefuses(t *testing.T) {
	good := core.Track{Pos: [][]float64{{0, 1, 2}, {0, 1, 2}}}
	cases := []struct {
		name string
		tr   core.Track
	}{
		{"", good}, {"#1", good}, {"a,b", good}, {"a\tb", good}, {`"a"`, good}, {"a\nb", good}, {" a", good},
		{"ok3", core.Track{Pos: [][]float64{{0, 1}, {0, 1}, {0, 1}}}},
		{"ragged", core.Track{Pos: [][]float64{{0, 1, 2}, {0, 1}}}},
		{"nan", core.Track{Pos: [][]float64{{0, math.NaN(), 2}, {0, 1, 2}}}},
		{"inf", core.Track{Pos: [][]float64{{0, 1, 2}, {0, math.Inf(-1), 2}}}},
	}
	var buf bytes.Buffer
	w := NewWriter(&buf, "nm", 2, -1)
	for _, c := range cases {
		if err := w.WriteTrack(c.name, 0, c.tr); err == nil {
			t.Errorf("track %q accepted", c.name)
		}
	}
	if err := w.WriteTrack("a", 0, good); err != nil {
		t.Fatal(err)
	}
	if err := w.WriteTrack("a", 10, good); err == nil {
		t.Error("a name written twice was accepted")
	}
	if err := w.WriteTrack("far", math.MaxInt64-1, good); err == nil {
		t.Error("frames beyond 2⁵³ accepted")
	}
	defer func() {
		if recover() == nil {
			t.Error("NewWriter with unit px did not panic")
		}
	}()
	NewWriter(&buf, "px", 2, 0)
}

// failing is a writer that fails after n bytes.
type failing struct{ n int }

var errFull = errors.New("disk full")

func (f *failing) Write(p []byte) (int, error) {
	if len(p) > f.n {
		return 0, errFull
	}
	f.n -= len(p)
	return len(p), nil
}

func TestWriterWriteError(t *testing.T) {
	rec := core.Recording{D: 4.4e-12, Dims: 2, Interval: 0.033, Sigma: 30e-9}
	w := NewWriter(&failing{n: 5000}, "um", 2, -1)
	var err error
	for i, tr := range simulated(9, rec, 200) {
		if err = w.WriteTrack(fmt.Sprint(i), 0, tr); err != nil {
			break
		}
	}
	if err == nil {
		err = w.Flush()
	}
	if !errors.Is(err, errFull) || !errors.Is(w.Flush(), errFull) || !errors.Is(w.Comment("x"), errFull) {
		t.Errorf("write error %v not kept", err)
	}
}
