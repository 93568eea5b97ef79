package trackfile

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"sizebudget/core"
)

// part is what the tests expect of one track returned by Next.
type part struct {
	name       string
	part       int
	firstFrame int64
	positions  int
}

// readAll reads every track of r; it returns the tracks and their segments, and the error that ended
// the reading (nil at io.EOF).
func readAll(r *Reader) ([]core.Track, []Segment, error) {
	var tracks []core.Track
	var segs []Segment
	for {
		tr, err := r.Next()
		if err == io.EOF {
			return tracks, segs, nil
		}
		if err != nil {
			return tracks, segs, err
		}
		tracks = append(tracks, tr)
		segs = append(segs, r.Segment())
	}
}

func openTestdata(t *testing.T, name string) *os.File {
	t.Helper()
	f, err := os.Open(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	return f
}

// TestReaderTestdata reads the hand-made edge cases of testdata: the expected tracks, counts and
// errors below are read off the files themselves (each file says what it exercises).
func TestReaderTestdata(t *testing.T) {
	cases := []struct {
		file  string
		opt   Options
		parts []part
		// counts after the whole file
		rows, dropped, droppedPos, gaps, dims, maxBuffered int
		unit                                               string
	}{
		{file: "basic.csv", parts: []part{{"a", 1, 0, 6}, {"b", 1, 10, 5}}, rows: 11, dims: 2, maxBuffered: 6, unit: "um"},
		{file: "basic.csv", opt: Options{Unit: "µm"}, parts: []part{{"a", 1, 0, 6}, {"b", 1, 10, 5}}, rows: 11, dims: 2, maxBuffered: 6, unit: "um"},
		{file: "gaps.csv", parts: []part{{"1", 1, 0, 6}, {"1", 2, 8, 6}, {"2", 1, 0, 5}},
			rows: 19, dropped: 1, droppedPos: 2, gaps: 2, dims: 2, maxBuffered: 12, unit: "nm"},
		{file: "gaps.csv", opt: Options{MinPositions: 7}, rows: 19, dropped: 4, droppedPos: 19, gaps: 2, dims: 2, maxBuffered: 12, unit: "nm"},
		{file: "unsorted.csv", parts: []part{{"7", 1, 0, 6}, {"8", 1, 5, 5}}, rows: 11, dims: 2, maxBuffered: 6, unit: "um"},
		{file: "one_frame.csv", parts: []part{{"long", 1, 0, 5}}, rows: 10, dropped: 5, droppedPos: 5, dims: 2, maxBuffered: 5, unit: "um"},
		{file: "crlf.csv", parts: []part{{"c", 1, 0, 5}}, rows: 5, dims: 2, maxBuffered: 5, unit: "um"},
		{file: "bom.csv", parts: []part{{"b", 1, 0, 5}}, rows: 5, dims: 2, maxBuffered: 5, unit: "um"},
		{file: "pixels.tsv", opt: Options{PixelSize: 100e-9}, parts: []part{{"9", 1, 0, 5}}, rows: 5, dims: 3, maxBuffered: 5, unit: "px"},
		{file: "bare.csv", opt: Options{Unit: "nm"}, parts: []part{{"1", 1, 0, 5}}, rows: 5, dims: 2, maxBuffered: 5, unit: "nm"},
		{file: "times.csv", opt: Options{Interval: 0.04}, parts: []part{{"u", 1, 0, 6}}, rows: 6, dims: 2, maxBuffered: 6, unit: "nm"},
		{file: "header_only.csv", dims: 2, unit: "um"},
		// Sorted by frame: b misses frame 3, so its frames 0–2 are finished when frame 4 starts.
		{file: "by_frame.csv", opt: Options{Order: ByFrame, MinPositions: 3},
			parts: []part{{"b", 1, 0, 3}, {"a", 1, 0, 8}, {"b", 2, 4, 4}}, rows: 15, gaps: 1, dims: 2, maxBuffered: 12, unit: "um"},
		{file: "by_frame.csv", opt: Options{Order: ByFrame}, parts: []part{{"a", 1, 0, 8}},
			rows: 15, dropped: 2, droppedPos: 7, gaps: 1, dims: 2, maxBuffered: 12, unit: "um"},
		{file: "by_frame.csv", opt: Options{Order: AnyOrder, MinPositions: 3},
			parts: []part{{"a", 1, 0, 8}, {"b", 1, 0, 3}, {"b", 2, 4, 4}}, rows: 15, gaps: 1, dims: 2, maxBuffered: 15, unit: "um"},
		{file: "gaps.csv", opt: Options{Order: AnyOrder}, parts: []part{{"1", 1, 0, 6}, {"1", 2, 8, 6}, {"2", 1, 0, 5}},
			rows: 19, dropped: 1, droppedPos: 2, gaps: 2, dims: 2, maxBuffered: 19, unit: "nm"},
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("%s %+v", c.file, c.opt), func(t *testing.T) {
			r, err := NewReader(openTestdata(t, c.file), c.opt)
			if err != nil {
				t.Fatal(err)
			}
			tracks, segs, err := readAll(r)
			if err != nil {
				t.Fatal(err)
			}
			var got []part
			for i, s := range segs {
				got = append(got, part{s.Name, s.Part, s.FirstFrame, tracks[i].Len()})
				if tracks[i].Dims() != c.dims {
					t.Errorf("track %d has %d axes, want %d", i, tracks[i].Dims(), c.dims)
				}
			}
			if !slices.Equal(got, c.parts) {
				t.Errorf("tracks %v, want %v", got, c.parts)
			}
			st := r.Stats()
			if st.Rows != c.rows || st.Dropped != c.dropped || st.DroppedPositions != c.droppedPos || st.Gaps != c.gaps ||
				st.Dims != c.dims || st.Unit != c.unit || st.MaxBuffered != c.maxBuffered {
				t.Errorf("stats %+v, want rows %d, dropped %d (%d positions), gaps %d, dims %d, unit %s, max buffered %d",
					st, c.rows, c.dropped, c.droppedPos, c.gaps, c.dims, c.unit, c.maxBuffered)
			}
			if st.Rows != st.Positions+st.DroppedPositions || st.Tracks != len(tracks) {
				t.Errorf("stats %+v do not add up to the %d tracks returned", st, len(tracks))
			}
			if _, err := r.Next(); err != io.EOF {
				t.Errorf("Next after the end: %v, want io.EOF", err)
			}
		})
	}
}

// TestReaderValues checks positions after unit conversion and sorting against the numbers typed in
// the files: x = x₀ + 0.1·frame and y = y₀ − 0.05·frame in the file's unit (exact decimal values
// printed with three decimals; the conversion to m is one multiplication, 1e-15 relative).
func TestReaderValues(t *testing.T) {
	cases := []struct {
		file   string
		opt    Options
		scale  float64
		x0, y0 float64
	}{
		{"unsorted.csv", Options{}, 1e-6, 1, 2},
		{"gaps.csv", Options{}, 1e-9, 100, 200},
		{"pixels.tsv", Options{PixelSize: 100e-9}, 100e-9, 10, 20},
		{"bare.csv", Options{Unit: "nm"}, 1e-9, 100, 200},
	}
	for _, c := range cases {
		r, err := NewReader(openTestdata(t, c.file), c.opt)
		if err != nil {
			t.Fatal(err)
		}
		tracks, segs, err := readAll(r)
		if err != nil || len(tracks) == 0 {
			t.Fatalf("%s: %d tracks, %v", c.file, len(tracks), err)
		}
		tr, seg := tracks[0], segs[0]
		for i := range tr.Len() {
			f := float64(seg.FirstFrame) + float64(i)
			want := [2]float64{(c.x0 + 0.1*f) * c.scale, (c.y0 - 0.05*f) * c.scale}
			for a := range 2 {
				if got := tr.Pos[a][i]; math.Abs(got-want[a]) > 1e-12*math.Abs(want[a]) {
					t.Errorf("%s: position %d axis %d = %.17g m, want %.17g", c.file, i, a, got, want[a])
				}
			}
		}
	}
	// times.csv: the first row (0.499 s) is frame 0, so Segment.Line is the first data row, line 3.
	r, err := NewReader(openTestdata(t, "times.csv"), Options{Interval: 0.04})
	if err != nil {
		t.Fatal(err)
	}
	tracks, segs, err := readAll(r)
	x5 := 50.0 // the x of the last row, in nm
	if err != nil || len(tracks) != 1 || segs[0].Line != 3 || tracks[0].Pos[0][5] != x5*1e-9 {
		t.Errorf("times.csv: %v %v %v", tracks, segs, err)
	}
	// unsorted.csv: frame 0 of track 7 is on line 4.
	r, _ = NewReader(openTestdata(t, "unsorted.csv"), Options{})
	_, segs, _ = readAll(r)
	if segs[0].Line != 4 {
		t.Errorf("unsorted.csv: first position of track 7 on line %d, want 4", segs[0].Line)
	}
}

func TestReaderStatsOfBasic(t *testing.T) {
	r, err := NewReader(openTestdata(t, "basic.csv"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := readAll(r); err != nil {
		t.Fatal(err)
	}
	st := r.Stats()
	wantNotes := []string{"hand-made edge case: two tracks, comments and a blank line", "unit from the header"}
	if st.Lines != 16 || st.Comments != 3 || st.Names != 2 || st.Delimiter != "," || !slices.Equal(st.Notes, wantNotes) || len(st.Ignored) != 0 {
		t.Errorf("stats %+v", st)
	}
	r, _ = NewReader(openTestdata(t, "pixels.tsv"), Options{PixelSize: 1e-7})
	if st := r.Stats(); st.Delimiter != "\t" || !slices.Equal(st.Ignored, []string{"intensity"}) {
		t.Errorf("pixels.tsv: stats %+v", st)
	}
}

// TestReaderErrors checks that each malformed file is refused with an *Error naming the right line
// and column, found by reading the files.
func TestReaderErrors(t *testing.T) {
	cases := []struct {
		file     string
		opt      Options
		line     int
		column   int
		name     string
		contains string
	}{
		{"missing_column.csv", Options{}, 2, 0, "", `no "y" column (it has: track, frame, x_um)`},
		{"bad_number.csv", Options{}, 5, 3, "x_um", `"1.2.3" is not a number`},
		{"empty.csv", Options{}, 0, 0, "", "no header line"},
		{"comments_only.csv", Options{}, 4, 0, "", "no header line"},
		{"duplicate_frame.csv", Options{}, 6, 2, "frame", `track "1" has frame 2 twice (also on line 5)`},
		{"duplicate_frame.csv", Options{Order: ByFrame}, 6, 2, "frame", `track "1" has frame 2 twice (also on line 5)`},
		{"duplicate_frame.csv", Options{Order: AnyOrder}, 6, 2, "frame", `track "1" has frame 2 twice (also on line 5)`},
		{"by_frame.csv", Options{}, 5, 1, "track", `track "a" appears again after its rows ended on line 3`},
		{"gaps.csv", Options{Order: ByFrame}, 15, 2, "frame", "frame 0 comes after frame 13"},
		{"semicolon.csv", Options{}, 1, 0, "", "not semicolons"},
		{"short_row.csv", Options{}, 4, 0, "", "3 fields where the header (line 1) has 4"},
		{"nan.csv", Options{}, 2, 3, "x_um", `"NaN" is not a finite number`},
		{"bare.csv", Options{}, 2, 3, "x", "carry no unit"},
		{"basic.csv", Options{Unit: "nm"}, 3, 3, "x_um", "differ: the header gives um, the options nm"},
		{"pixels.tsv", Options{}, 2, 3, "x_px", "pixel size"},
		{"pixels.tsv", Options{Unit: "um", PixelSize: 1e-7}, 2, 3, "x_px", "differ: the header gives px, the options um"},
		{"times.csv", Options{}, 2, 2, "t_s", "frame interval"},
		{"times.csv", Options{Interval: 0.05}, 5, 2, "t_s", "0.40 of a frame off the grid of Δt = 0.05 s that starts at 0.499 s"},
	}
	for _, c := range cases {
		t.Run(fmt.Sprintf("%s %+v", c.file, c.opt), func(t *testing.T) {
			r, err := NewReader(openTestdata(t, c.file), c.opt)
			if err == nil {
				_, _, err = readAll(r)
				if err2 := func() error { _, e := r.Next(); return e }(); err2 != err {
					t.Errorf("Next after an error returned %v, want the same error again", err2)
				}
			}
			var fe *Error
			if !errors.As(err, &fe) {
				t.Fatalf("error %v (%T), want an *Error", err, err)
			}
			if fe.Line != c.line || fe.Column != c.column || fe.Name != c.name || !strings.Contains(err.Error(), c.contains) {
				t.Errorf("error %q (line %d, column %d, name %q), want line %d, column %d, name %q, containing %q",
					err, fe.Line, fe.Column, fe.Name, c.line, c.column, c.name, c.contains)
			}
			want := fmt.Sprintf("trackfile: line %d", c.line)
			if c.column > 0 {
				want += fmt.Sprintf(", column %d (%s)", c.column, c.name)
			}
			if c.line > 0 && !strings.HasPrefix(err.Error(), want+": ") {
				t.Errorf("message %q does not start with %q", err, want)
			}
		})
	}
	if _, err := NewReader(openTestdata(t, "empty.csv"), Options{}); !errors.Is(err, ErrNoHeader) {
		t.Errorf("empty file: %v, want ErrNoHeader", err)
	}
}

func TestReaderOptions(t *testing.T) {
	bad := []Options{
		{MinPositions: 2}, {MinPositions: -1}, {Unit: "inch"}, {PixelSize: -1}, {PixelSize: math.NaN()},
		{Interval: math.Inf(1)}, {Interval: -0.1}, {Order: 7},
	}
	for _, o := range bad {
		if _, err := NewReader(strings.NewReader("track,frame,x_um,y_um\n"), o); err == nil {
			t.Errorf("options %+v accepted", o)
		}
	}
	for _, s := range []string{"track", "frame", "any"} {
		o, err := ParseOrder(s)
		if err != nil || o.String() != s {
			t.Errorf("ParseOrder(%q) = %v, %v", s, o, err)
		}
	}
	if _, err := ParseOrder("rows"); err == nil {
		t.Error(`ParseOrder("rows") accepted`)
	}
}

func TestReaderLongLine(t *testing.T) {
	long := "track,frame,x_um,y_um\n1,0,1," + strings.Repeat("1", MaxLineBytes) + "\n"
	r, err := NewReader(strings.NewReader(long), Options{})
	if err != nil {
		t.Fatal(err)
	}
	_, err = r.Next()
	var fe *Error
	if !errors.As(err, &fe) || fe.Line != 2 || !strings.Contains(err.Error(), "longer than") {
		t.Errorf("long line: %v", err)
	}
}

func TestReaderHeaderErrors(t *testing.T) {
	cases := []struct{ header, contains string }{
		{"track,frame,x_um,y_um,x_nm", `column "x_nm" appears twice`},
		{"track,frame,x_um,y_nm", "must share one unit"},
		{"track,frame,x_um,y", "must share one unit"},
		{"track,x_um,y_um", `no "frame" (or "t_s") column`},
		{"frame,x_um,y_um", `no "track" column`},
		{"track,frame,y_um", `no "x" column`},
		{"track,Track,frame,x_um,y_um", `column "Track" appears twice (also column 1)`},
	}
	for _, c := range cases {
		_, err := NewReader(strings.NewReader("# c\n"+c.header+"\n"), Options{Unit: "um"})
		var fe *Error
		if !errors.As(err, &fe) || fe.Line != 2 || !strings.Contains(err.Error(), c.contains) {
			t.Errorf("header %q: %v, want line 2 and %q", c.header, err, c.contains)
		}
	}
	// frame and t_s both: frame is used, t_s ignored.
	r, err := NewReader(strings.NewReader("track,t_s,frame,x_um,y_um\n"), Options{})
	if err != nil || !slices.Equal(r.Stats().Ignored, []string{"t_s"}) {
		t.Errorf("frame and t_s: %v, %+v", err, r.Stats())
	}
}

// TestReaderWholeFrames accepts frame numbers written as decimals with no fraction and refuses others.
func TestReaderWholeFrames(t *testing.T) {
	in := "track,frame,x_um,y_um\n1,0.0,0,0\n1,1.0,0,0\n1,2e0,0,0\n"
	r, _ := NewReader(strings.NewReader(in), Options{MinPositions: 3})
	tracks, _, err := readAll(r)
	if err != nil || len(tracks) != 1 || tracks[0].Len() != 3 {
		t.Errorf("decimal frames: %d tracks, %v", len(tracks), err)
	}
	for _, f := range []string{"1.5", "x", "", "1e300", "9007199254740993"} {
		r, _ := NewReader(strings.NewReader("track,frame,x_um,y_um\n1,"+f+",0,0\n"), Options{})
		_, err := r.Next()
		var fe *Error
		if !errors.As(err, &fe) || fe.Line != 2 || fe.Column != 2 {
			t.Errorf("frame %q: %v", f, err)
		}
	}
}

// TestReaderMillionRowsBoundedMemory streams a generated file of a million rows, grouped by track,
// through the reader without holding the file: the reader must never hold more rows than the
// longest track (Stats.MaxBuffered), and must return every position.
func TestReaderMillionRowsBoundedMemory(t *testing.T) {
	if testing.Short() {
		t.Skip("a million rows")
	}
	const tracks, length = 20000, 50
	r, err := NewReader(newGenerated(tracks, length, false), Options{})
	if err != nil {
		t.Fatal(err)
	}
	n, rows := 0, 0
	for {
		tr, err := r.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		n++
		rows += tr.Len()
	}
	st := r.Stats()
	if n != tracks || rows != tracks*length || st.Rows != tracks*length || st.MaxBuffered != length {
		t.Errorf("%d tracks, %d rows, stats %+v; want %d tracks of %d and at most %d rows held", n, rows, st, tracks, length, length)
	}
}

// generated is an io.Reader that produces a track file line by line, without holding it: tracks of
// length rows each, grouped by track or (byFrame) sorted by frame.
type generated struct {
	tracks, length int
	byFrame        bool
	i              int // row index
	buf            bytes.Buffer
	header         bool
}

func newGenerated(tracks, length int, byFrame bool) *generated {
	return &generated{tracks: tracks, length: length, byFrame: byFrame}
}

func (g *generated) Read(p []byte) (int, error) {
	for g.buf.Len() < len(p) {
		if !g.header {
			g.buf.WriteString("# generated for a test\ntrack,frame,x_um,y_um\n")
			g.header = true
			continue
		}
		if g.i == g.tracks*g.length {
			break
		}
		tr, f := g.i/g.length, g.i%g.length
		if g.byFrame {
			tr, f = g.i%g.tracks, g.i/g.tracks
		}
		fmt.Fprintf(&g.buf, "%d,%d,%.4f,%.4f\n", tr, f, 12.3456+0.0173*float64(f), 45.6789-0.0311*float64(f))
		g.i++
	}
	if g.buf.Len() == 0 {
		return 0, io.EOF
	}
	return g.buf.Read(p)
}

func TestReaderByFrameGenerated(t *testing.T) {
	// Rows sorted by frame, 300 tracks interleaved: the reader holds all tracks open at once but never
	// more rows than the file has, and returns each track whole.
	const tracks, length = 300, 20
	r, err := NewReader(newGenerated(tracks, length, true), Options{Order: ByFrame})
	if err != nil {
		t.Fatal(err)
	}
	got, segs, err := readAll(r)
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != tracks || r.Stats().Gaps != 0 {
		t.Fatalf("%d tracks, stats %+v", len(got), r.Stats())
	}
	for i, tr := range got {
		if tr.Len() != length || segs[i].Name != fmt.Sprint(i) {
			t.Errorf("track %d: %s with %d positions", i, segs[i].Name, tr.Len())
		}
	}
}

// BenchmarkReader reads generated files of a ladder of sizes and reports the throughput in rows per
// second (compare runs with benchstat).
func BenchmarkReader(b *testing.B) {
	for _, rows := range []int{1_000, 100_000, 1_000_000} {
		length := 50
		var file bytes.Buffer
		if _, err := io.Copy(&file, newGenerated(rows/length, length, false)); err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("rows=%d", rows), func(b *testing.B) {
			b.SetBytes(int64(file.Len()))
			for b.Loop() {
				r, err := NewReader(bytes.NewReader(file.Bytes()), Options{})
				if err != nil {
					b.Fatal(err)
				}
				for {
					if _, err := r.Next(); err == io.EOF {
						break
					} else if err != nil {
						b.Fatal(err)
					}
				}
			}
			b.ReportMetric(float64(rows)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}
