package trackfile

import (
	"bytes"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// FuzzReader feeds arbitrary bytes to the reader under every order and several minimum lengths. It
// must never panic; every error must be an *Error that names a line of the input (line 0 only for a
// file without a header) and, with a column, the column's name; every track returned must have the
// file's number of axes, equal-length axes, at least the minimum number of finite positions; and at
// the end the rows must add up to the positions returned and dropped. Seeded from the hand-made edge
// cases of testdata and the corpus in testdata/fuzz/FuzzReader.
func FuzzReader(f *testing.F) {
	files, err := filepath.Glob(filepath.Join("testdata", "*.*sv"))
	if err != nil || len(files) == 0 {
		f.Fatalf("no seed files: %v", err)
	}
	for _, name := range files {
		data, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data, uint8(0), uint8(0))
		f.Add(data, uint8(1), uint8(0))
		f.Add(data, uint8(2), uint8(1))
	}
	f.Fuzz(func(t *testing.T, data []byte, order, minPos uint8) {
		opt := Options{Unit: "", PixelSize: 1e-7, Interval: 0.04, MinPositions: LeastPositions + int(minPos%4), Order: Order(order % 3)}
		if order&4 != 0 {
			opt.Unit = "um"
		}
		lines := bytes.Count(data, []byte("\n")) + 1
		checkErr := func(err error) {
			t.Helper()
			var fe *Error
			if !errors.As(err, &fe) {
				t.Fatalf("error %v (%T) is not an *Error", err, err)
			}
			if fe.Line < 0 || fe.Line > lines || (fe.Line == 0 && !errors.Is(err, ErrNoHeader)) {
				t.Fatalf("error %q names line %d of a %d-line input", err, fe.Line, lines)
			}
			if fe.Column < 0 || (fe.Column > 0 && fe.Name == "") {
				t.Fatalf("error %q: column %d without a name", err, fe.Column)
			}
		}
		r, err := NewReader(bytes.NewReader(data), opt)
		if err != nil {
			checkErr(err)
			return
		}
		dims := r.Dims()
		if dims != 2 && dims != 3 {
			t.Fatalf("%d axes", dims)
		}
		for range len(data) + 2 {
			tr, err := r.Next()
			if err == io.EOF {
				st := r.Stats()
				if st.Rows != st.Positions+st.DroppedPositions {
					t.Fatalf("stats do not add up: %+v", st)
				}
				return
			}
			if err != nil {
				checkErr(err)
				return
			}
			if tr.Dims() != dims || tr.Len() < opt.MinPositions {
				t.Fatalf("track with %d axes and %d positions (file: %d axes, minimum %d)", tr.Dims(), tr.Len(), dims, opt.MinPositions)
			}
			for _, p := range tr.Pos {
				if len(p) != tr.Len() {
					t.Fatal("ragged track")
				}
				for _, x := range p {
					if math.IsNaN(x) || math.IsInf(x, 0) {
						t.Fatalf("position %v", x)
					}
				}
			}
		}
		t.Fatal("more tracks than bytes")
	})
}
