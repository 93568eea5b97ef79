package trackfile

import (
	"bufio"
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"sizebudget/core"
)

// DefaultMinPositions is the number of positions below which a track is dropped when
// Options.MinPositions is 0. Five positions are four displacements per axis: the covariance-based
// estimator needs three positions, but a track that short has a per-track estimate that is mostly
// noise, and very short tracks are where linking mistakes of a tracker concentrate (common practice,
// no source). Dropping short tracks is not free: the fastest (smallest) particles leave the focus
// soonest, so a high minimum biases a sample towards large particles; Stats.Dropped lets a user see
// how much was left out.
const DefaultMinPositions = 5

// LeastPositions is the smallest Options.MinPositions allowed: the covariance-based estimator needs a
// pair of neighbouring displacements, that is three positions.
const LeastPositions = 3

// MaxLineBytes is the longest line the reader accepts, 1 MiB; a longer line is an error.
const MaxLineBytes = 1 << 20

// ErrNoHeader is wrapped by the *Error of a file that holds no header: it is empty or has only
// comments and blank lines.
var ErrNoHeader = errors.New("no header line: the file is empty or holds only comments and blank lines")

// Errors of a header whose columns cannot be read with the options given, wrapped by an *Error, so
// that a caller can say which of its settings is missing.
var (
	ErrNoUnit       = errors.New("the position columns carry no unit and none was given (Options.Unit): name them x_nm, x_um or x_px, or give the unit")
	ErrUnitConflict = errors.New("two length units (Options.Unit and the header) differ")
	ErrNoPixelSize  = errors.New("positions in pixels need the pixel size (Options.PixelSize)")
	ErrNoInterval   = errors.New("times in s need the frame interval to become frame numbers (Options.Interval)")
)

// Order says how the rows of a file are arranged; see the package documentation for what each
// order costs in memory.
type Order int

const (
	ByTrack  Order = iota // the rows of each track together, frames in any order within a track
	ByFrame               // rows sorted by frame, tracks interleaved
	AnyOrder              // rows in any order; the whole file is held
)

// orderNames are the names of the orders, as String writes them and ParseOrder reads them.
var orderNames = []string{"track", "frame", "any"}

// String returns "track", "frame" or "any".
func (o Order) String() string {
	if o < 0 || int(o) >= len(orderNames) {
		return fmt.Sprintf("Order(%d)", int(o))
	}
	return orderNames[o]
}

// ParseOrder returns the Order named "track", "frame" or "any".
func ParseOrder(s string) (Order, error) {
	if i := slices.Index(orderNames, s); i >= 0 {
		return Order(i), nil
	}
	return 0, fmt.Errorf("trackfile: unknown order %q: want track, frame or any", s)
}

// Options control a Reader. The zero value reads a file whose header carries the length unit, with
// the rows of each track together, and drops tracks shorter than DefaultMinPositions.
type Options struct {
	// Unit is the length unit of position columns without a unit suffix (x, y, z): "nm", "um" (or
	// "µm", "μm"), "mm", "m" or "px". "" means the header must carry the unit. When the header
	// carries one too, the two must agree.
	Unit string
	// PixelSize is the length of one pixel in m, for positions in px; 0 = not given.
	PixelSize float64
	// Interval is the frame interval in s, for files that give times (t_s) instead of frames.
	Interval float64
	// MinPositions is the fewest positions a track needs to be kept; 0 means DefaultMinPositions,
	// and at least LeastPositions is required.
	MinPositions int
	// Order is how the rows are arranged.
	Order Order
}

// lengthUnits are the accepted length units and their size in m.
var lengthUnits = map[string]float64{"nm": 1e-9, "um": 1e-6, "µm": 1e-6, "μm": 1e-6, "mm": 1e-3, "m": 1}

// unitScale returns the size in m of one unit (px: the pixel size).
func (o Options) unitScale(unit string) (float64, bool) {
	if unit == "px" {
		return o.PixelSize, o.PixelSize > 0
	}
	s, ok := lengthUnits[unit]
	return s, ok
}

// check returns an error for options out of range; it fills the default of MinPositions.
func (o *Options) check() error {
	if o.MinPositions == 0 {
		o.MinPositions = DefaultMinPositions
	}
	switch {
	case o.MinPositions < LeastPositions:
		return fmt.Errorf("trackfile: minimum track length %d positions: at least %d are needed (the covariance estimator needs two displacements)", o.MinPositions, LeastPositions)
	case o.Unit != "" && o.Unit != "px" && lengthUnits[o.Unit] == 0:
		return fmt.Errorf("trackfile: unknown length unit %q: use nm, um, µm, mm, m or px", o.Unit)
	case !(o.PixelSize >= 0) || math.IsInf(o.PixelSize, 0):
		return fmt.Errorf("trackfile: pixel size %g m is not a positive length", o.PixelSize)
	case !(o.Interval >= 0) || math.IsInf(o.Interval, 0):
		return fmt.Errorf("trackfile: frame interval %g s is not a positive time", o.Interval)
	case o.Order < ByTrack || o.Order > AnyOrder:
		return fmt.Errorf("trackfile: unknown order %d", int(o.Order))
	}
	return nil
}

// Error is an error in the content of a track file. It names the line (1-based, every line of the
// file counted) and, when the error is in one field, the column (1-based) and its header name.
type Error struct {
	Line   int    // 0 only for a file without a header (ErrNoHeader)
	Column int    // 0 when the error concerns the whole line
	Name   string // the column's name in the header, "" when Column is 0
	Err    error
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString("trackfile: ")
	if e.Line > 0 {
		fmt.Fprintf(&b, "line %d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ", column %d", e.Column)
			if e.Name != "" {
				fmt.Fprintf(&b, " (%s)", e.Name)
			}
		}
		b.WriteString(": ")
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *Error) Unwrap() error { return e.Err }

// Stats describe what a Reader has read so far; after Next has returned io.EOF they describe the
// whole file, and Rows = Positions + DroppedPositions.
type Stats struct {
	Lines            int      // lines read, comments and blank lines included
	Comments         int      // comment lines
	Rows             int      // data rows
	Names            int      // distinct track names
	Tracks           int      // tracks returned by Next
	Positions        int      // positions in the tracks returned
	Dropped          int      // tracks dropped as shorter than MinPositions
	DroppedPositions int      // positions in the dropped tracks
	Gaps             int      // splits of a track at a gap in its frame numbers
	MaxBuffered      int      // the most rows held in memory at once
	Dims             int      // axes: 2 (x, y) or 3 (x, y, z)
	Unit             string   // length unit of the positions in the file
	Delimiter        string   // "," or "\t"
	Ignored          []string // header columns that are not used
	Notes            []string // comment lines before the header, without the '#' (at most maxNotes)
}

// maxNotes bounds the comment lines kept in Stats.Notes.
const maxNotes = 32

// Segment names a track returned by Next: its name in the file and which part of it it is.
type Segment struct {
	Name       string // the track's name (the track column)
	Part       int    // 1 for the first part of the name; the count goes up at every gap (dropped parts included)
	FirstFrame int64  // frame number of its first position
	Line       int    // line of its first position
}

// Reader reads tracks from a track file, one at a time, in one pass. Use NewReader, then call Next
// until it returns io.EOF.
type Reader struct {
	sc     *bufio.Scanner
	opt    Options
	line   int
	delim  byte
	header []string // column names as written
	cols   columns
	scale  float64 // m per unit of the positions
	hline  int     // line of the header

	fields [][]byte

	// Times (t_s) instead of frames.
	haveT0 bool
	t0     float64

	// Tracks being read.
	cur       *track            // ByTrack: the current track
	open      map[string]*track // ByFrame, AnyOrder
	names     map[string]*nameState
	spare     []row // recycled row storage (ByTrack)
	held      int   // rows held
	lastFrame int64 // frame of the previous row
	anyRow    bool  // a row has been read
	byFrame   bool  // every row so far has a frame ≥ the previous row's (for the hints of errors)

	ready []ready // tracks ready to return
	head  int
	last  Segment
	stats Stats
	err   error
	done  bool
}

// columns are the indices of the used columns in a row, −1 when absent.
type columns struct {
	track, frame, t int
	pos             [3]int
}

// row is one data row: frame number, line and position in m.
type row struct {
	frame int64
	line  int
	pos   [3]float64
}

// track holds the rows of one track name while it is read.
type track struct {
	name      string
	rows      []row
	sorted    bool
	firstLine int
}

// nameState is what the reader remembers of a track name.
type nameState struct {
	parts   int // parts made so far
	endLine int // ByTrack: the last line of the finished track; 0 while it is being read
}

// ready is a track ready to be returned by Next.
type ready struct {
	seg Segment
	tr  core.Track
}

// NewReader reads the comments before the header and the header of the file src and returns a
// Reader positioned at the first data row. It returns an error for options out of range, and an
// *Error for a file without a header (wrapping ErrNoHeader), a header that lacks a required column,
// has one twice, mixes length units or gives a unit that cannot be converted (px without a pixel
// size, bare x without Options.Unit, t_s without Options.Interval).
func NewReader(src io.Reader, opt Options) (*Reader, error) {
	if err := opt.check(); err != nil {
		return nil, err
	}
	sc := bufio.NewScanner(src)
	sc.Buffer(make([]byte, 0, 64*1024), MaxLineBytes)
	r := &Reader{sc: sc, opt: opt, names: map[string]*nameState{}, byFrame: true}
	if opt.Order != ByTrack {
		r.open = map[string]*track{}
	}
	for {
		text, ok, err := r.scan()
		if err != nil {
			return nil, err
		}
		if !ok {
			return nil, &Error{Line: r.line, Err: ErrNoHeader}
		}
		if kind := lineKind(text); kind == blankLine {
			continue
		} else if kind == commentLine {
			r.stats.Comments++
			if len(r.stats.Notes) < maxNotes {
				note := strings.TrimSpace(string(bytes.TrimPrefix(bytes.TrimSpace(text), []byte("#"))))
				r.stats.Notes = append(r.stats.Notes, note)
			}
			continue
		}
		if err := r.parseHeader(text); err != nil {
			return nil, err
		}
		return r, nil
	}
}

// scan reads the next line; ok is false at the end of the file. The byte-order mark of the first
// line is removed (CR before LF is removed by bufio.ScanLines).
func (r *Reader) scan() (text []byte, ok bool, err error) {
	if !r.sc.Scan() {
		if err := r.sc.Err(); err != nil {
			if errors.Is(err, bufio.ErrTooLong) {
				return nil, false, &Error{Line: r.line + 1, Err: fmt.Errorf("line longer than %d bytes", MaxLineBytes)}
			}
			return nil, false, &Error{Line: r.line + 1, Err: err}
		}
		return nil, false, nil
	}
	r.line++
	r.stats.Lines++
	text = r.sc.Bytes()
	if r.line == 1 {
		text = bytes.TrimPrefix(text, []byte("\uFEFF"))
	}
	return text, true, nil
}

const (
	dataLine = iota
	blankLine
	commentLine
)

// lineKind tells blank lines and comments (first non-blank character '#') from data.
func lineKind(text []byte) int {
	t := bytes.TrimLeft(text, " \t")
	switch {
	case len(bytes.TrimRight(t, " \t")) == 0:
		return blankLine
	case t[0] == '#':
		return commentLine
	}
	return dataLine
}

// split cuts a line into its fields, trimmed of spaces and of one pair of surrounding double quotes,
// reusing r.fields.
func (r *Reader) split(text []byte) [][]byte {
	f := r.fields[:0]
	for {
		i := bytes.IndexByte(text, r.delim)
		if i < 0 {
			f = append(f, trimField(text))
			break
		}
		f = append(f, trimField(text[:i]))
		text = text[i+1:]
	}
	r.fields = f
	return f
}

func trimField(b []byte) []byte {
	b = bytes.Trim(b, " \t")
	if len(b) >= 2 && b[0] == '"' && b[len(b)-1] == '"' {
		b = bytes.Trim(b[1:len(b)-1], " \t")
	}
	return b
}

// parseHeader reads the header line: delimiter, columns and the unit of the positions.
func (r *Reader) parseHeader(text []byte) error {
	r.hline = r.line
	r.delim = ','
	if bytes.IndexByte(text, '\t') >= 0 {
		r.delim = '\t'
	}
	r.stats.Delimiter = string(r.delim)
	fields := r.split(text)
	r.header = make([]string, len(fields))
	r.cols = columns{track: -1, frame: -1, t: -1, pos: [3]int{-1, -1, -1}}
	unit, unitCol := "", -1
	for i, f := range fields {
		name := string(f)
		r.header[i] = name
		key := strings.ToLower(name)
		var slot *int
		switch key {
		case "track":
			slot = &r.cols.track
		case "frame":
			slot = &r.cols.frame
		case "t_s":
			slot = &r.cols.t
		default:
			axis, u, ok := positionColumn(key)
			if !ok {
				r.stats.Ignored = append(r.stats.Ignored, name)
				continue
			}
			slot = &r.cols.pos[axis]
			if *slot < 0 && unitCol >= 0 && u != unit {
				return &Error{Line: r.line, Column: i + 1, Name: name,
					Err: fmt.Errorf("the position columns must share one unit: %q is in %s, %q in %s", name, orBare(u), r.header[unitCol], orBare(unit))}
			}
			unit, unitCol = u, i
		}
		if *slot >= 0 {
			return &Error{Line: r.line, Column: i + 1, Name: name, Err: fmt.Errorf("column %q appears twice (also column %d)", name, *slot+1)}
		}
		*slot = i
	}
	missing := func(what string) error {
		hint := ""
		if r.delim == ',' && bytes.IndexByte(text, ';') >= 0 {
			hint = "; columns are separated by commas or tabs, not semicolons"
		}
		return &Error{Line: r.line, Err: fmt.Errorf("the header has no %s column (it has: %s)%s", what, strings.Join(r.header, ", "), hint)}
	}
	switch {
	case r.cols.track < 0:
		return missing(`"track"`)
	case r.cols.frame < 0 && r.cols.t < 0:
		return missing(`"frame" (or "t_s")`)
	case r.cols.pos[0] < 0:
		return missing(`"x"`)
	case r.cols.pos[1] < 0:
		return missing(`"y"`)
	}
	r.stats.Dims = 2
	if r.cols.pos[2] >= 0 {
		r.stats.Dims = 3
	}
	if r.cols.frame >= 0 && r.cols.t >= 0 {
		r.stats.Ignored = append(r.stats.Ignored, r.header[r.cols.t])
		r.cols.t = -1
	}
	if r.cols.frame < 0 && !(r.opt.Interval > 0) {
		return &Error{Line: r.line, Column: r.cols.t + 1, Name: r.header[r.cols.t],
			Err: ErrNoInterval}
	}
	ucol := r.cols.pos[0]
	switch {
	case unit == "" && r.opt.Unit == "":
		return &Error{Line: r.line, Column: ucol + 1, Name: r.header[ucol],
			Err: ErrNoUnit}
	case unit == "":
		unit = r.opt.Unit
	case r.opt.Unit != "" && (lengthUnits[unit] != lengthUnits[r.opt.Unit] || (r.opt.Unit == "px") != (unit == "px")):
		return &Error{Line: r.line, Column: ucol + 1, Name: r.header[ucol],
			Err: fmt.Errorf("%w: the header gives %s, the options %s", ErrUnitConflict, unit, r.opt.Unit)}
	}
	scale, ok := r.opt.unitScale(unit)
	if !ok {
		return &Error{Line: r.line, Column: ucol + 1, Name: r.header[ucol],
			Err: ErrNoPixelSize}
	}
	r.scale, r.stats.Unit = scale, unit
	return nil
}

// orBare names a unit, or says there is none.
func orBare(u string) string {
	if u == "" {
		return "no unit"
	}
	return u
}

// positionColumn recognises x, y, z with an optional unit suffix (x_nm, y_um, z_px…) and returns the
// axis and the unit ("" for none).
func positionColumn(key string) (axis int, unit string, ok bool) {
	if key == "" {
		return 0, "", false
	}
	axis = strings.IndexByte("xyz", key[0])
	if axis < 0 {
		return 0, "", false
	}
	switch rest := key[1:]; {
	case rest == "":
		return axis, "", true
	case rest[0] == '_':
		unit = rest[1:]
		if _, known := lengthUnits[unit]; known || unit == "px" {
			return axis, unit, true
		}
	}
	return 0, "", false
}

// Dims returns the number of axes of the positions, 2 or 3.
func (r *Reader) Dims() int { return r.stats.Dims }

// Stats returns what the reader has read so far.
func (r *Reader) Stats() Stats { return r.stats }

// Dropped returns the number of tracks dropped so far as shorter than the minimum length.
func (r *Reader) Dropped() int { return r.stats.Dropped }

// Segment returns the name and part of the track last returned by Next.
func (r *Reader) Segment() Segment { return r.last }

// Next returns the next track, with positions in m, or io.EOF after the last one. Errors in the file
// are returned as an *Error; after an error Next keeps returning it. Tracks are returned when they
// are complete: in ByTrack order when the next name starts, in ByFrame order when a frame passes
// without them, in AnyOrder at the end of the file.
func (r *Reader) Next() (core.Track, error) {
	for r.head == len(r.ready) {
		r.ready, r.head = r.ready[:0], 0
		if r.err != nil {
			return core.Track{}, r.err
		}
		if r.done {
			return core.Track{}, io.EOF
		}
		if err := r.readRow(); err != nil {
			r.err = err
		}
	}
	t := r.ready[r.head]
	r.ready[r.head] = ready{}
	r.head++
	r.last = t.seg
	r.stats.Tracks++
	r.stats.Positions += t.tr.Len()
	return t.tr, nil
}

// readRow reads lines up to and including the next data row and files it; at the end of the file it
// finishes the tracks still open.
func (r *Reader) readRow() error {
	for {
		text, ok, err := r.scan()
		if err != nil {
			return err
		}
		if !ok {
			r.done = true
			return r.finishAll()
		}
		switch lineKind(text) {
		case blankLine:
			continue
		case commentLine:
			r.stats.Comments++
			continue
		}
		return r.addRow(text)
	}
}

// addRow parses one data row and files it under its track.
func (r *Reader) addRow(text []byte) error {
	fields := r.split(text)
	if len(fields) != len(r.header) {
		return &Error{Line: r.line, Err: fmt.Errorf("%d fields where the header (line %d) has %d", len(fields), r.hline, len(r.header))}
	}
	r.stats.Rows++
	name := fields[r.cols.track]
	if len(name) == 0 {
		return r.fieldError(r.cols.track, errors.New("empty track name"))
	}
	var rw row
	rw.line = r.line
	var err error
	if r.cols.frame >= 0 {
		rw.frame, err = parseFrame(fields[r.cols.frame])
		if err != nil {
			return r.fieldError(r.cols.frame, err)
		}
	} else if rw.frame, err = r.frameOfTime(fields[r.cols.t]); err != nil {
		return r.fieldError(r.cols.t, err)
	}
	for a := range r.stats.Dims {
		c := r.cols.pos[a]
		v, err := parseNumber(fields[c])
		if err != nil {
			return r.fieldError(c, err)
		}
		rw.pos[a] = v * r.scale
		if math.IsInf(rw.pos[a], 0) {
			return r.fieldError(c, fmt.Errorf("%q is too large a position", fields[c]))
		}
	}
	if r.anyRow && rw.frame < r.lastFrame {
		r.byFrame = false
	}
	switch r.opt.Order {
	case ByTrack:
		err = r.addByTrack(name, rw)
	case ByFrame:
		err = r.addByFrame(name, rw)
	default:
		err = r.addAny(name, rw)
	}
	r.lastFrame, r.anyRow = rw.frame, true
	return err
}

func (r *Reader) fieldError(col int, err error) error {
	return &Error{Line: r.line, Column: col + 1, Name: r.header[col], Err: err}
}

// addByTrack files a row when the rows of each track are together.
func (r *Reader) addByTrack(name []byte, rw row) error {
	if r.cur != nil && string(name) == r.cur.name {
		r.push(r.cur, rw)
		return nil
	}
	if r.cur != nil {
		// Rows are pushed in file order, so the last one is the track's last line.
		r.names[r.cur.name].endLine = r.cur.rows[len(r.cur.rows)-1].line
		if err := r.finish(r.cur); err != nil {
			return err
		}
		r.spare = r.cur.rows[:0]
		r.cur = nil
	}
	if st, seen := r.names[string(name)]; seen {
		hint := `read it with order "frame" (rows sorted by frame) or "any"`
		if r.byFrame && rw.frame >= r.lastFrame {
			hint = `the rows look sorted by frame: read the file with order "frame"`
		}
		return &Error{Line: r.line, Column: r.cols.track + 1, Name: r.header[r.cols.track],
			Err: fmt.Errorf("track %q appears again after its rows ended on line %d; with order \"track\" the rows of a track must be together: %s", name, st.endLine, hint)}
	}
	s := string(name)
	r.names[s] = &nameState{}
	r.stats.Names++
	r.cur = &track{name: s, rows: r.spare, sorted: true, firstLine: r.line}
	r.spare = nil
	r.push(r.cur, rw)
	return nil
}

// addByFrame files a row when the rows are sorted by frame: when the frame advances, the tracks that
// missed the previous frame are finished first.
func (r *Reader) addByFrame(name []byte, rw row) error {
	if r.anyRow && rw.frame < r.lastFrame {
		return &Error{Line: r.line, Column: r.frameColumn() + 1, Name: r.header[r.frameColumn()],
			Err: fmt.Errorf("frame %d comes after frame %d: with order \"frame\" the rows must be sorted by frame; read the file with order \"track\" (rows of a track together) or \"any\"", rw.frame, r.lastFrame)}
	}
	if r.anyRow && rw.frame > r.lastFrame {
		var closing []*track
		for _, t := range r.open {
			if t.rows[len(t.rows)-1].frame < rw.frame-1 {
				closing = append(closing, t)
			}
		}
		if err := r.finishSet(closing); err != nil {
			return err
		}
	}
	t := r.open[string(name)]
	if t == nil {
		s := string(name)
		if _, seen := r.names[s]; !seen {
			r.names[s] = &nameState{}
			r.stats.Names++
		} else {
			r.stats.Gaps++ // the name comes back after it missed a frame
		}
		t = &track{name: s, sorted: true, firstLine: r.line}
		r.open[s] = t
	} else if prev := t.rows[len(t.rows)-1]; prev.frame == rw.frame {
		return &Error{Line: r.line, Column: r.frameColumn() + 1, Name: r.header[r.frameColumn()],
			Err: fmt.Errorf("track %q has frame %d twice (also on line %d)", name, rw.frame, prev.line)}
	}
	r.push(t, rw)
	return nil
}

// addAny files a row when the rows may be in any order.
func (r *Reader) addAny(name []byte, rw row) error {
	t := r.open[string(name)]
	if t == nil {
		s := string(name)
		r.names[s] = &nameState{}
		r.stats.Names++
		t = &track{name: s, sorted: true, firstLine: r.line}
		r.open[s] = t
	}
	r.push(t, rw)
	return nil
}

// push appends a row to a track.
func (r *Reader) push(t *track, rw row) {
	if n := len(t.rows); n > 0 && rw.frame < t.rows[n-1].frame {
		t.sorted = false
	}
	t.rows = append(t.rows, rw)
	r.held++
	r.stats.MaxBuffered = max(r.stats.MaxBuffered, r.held)
}

// frameColumn is the column the frame numbers come from.
func (r *Reader) frameColumn() int {
	if r.cols.frame >= 0 {
		return r.cols.frame
	}
	return r.cols.t
}

// finishAll finishes the tracks still open at the end of the file, in the order of their first row.
func (r *Reader) finishAll() error {
	if r.cur != nil {
		t := r.cur
		r.cur = nil
		return r.finish(t)
	}
	set := make([]*track, 0, len(r.open))
	for _, t := range r.open {
		set = append(set, t)
	}
	return r.finishSet(set)
}

// finishSet finishes the tracks of set in the order of their first row (map order is random).
func (r *Reader) finishSet(set []*track) error {
	slices.SortFunc(set, func(a, b *track) int { return cmp.Compare(a.firstLine, b.firstLine) })
	for _, t := range set {
		delete(r.open, t.name)
		if err := r.finish(t); err != nil {
			return err
		}
	}
	return nil
}

// finish sorts a track's rows by frame, refuses a repeated frame, splits the track at gaps and
// queues the parts that are long enough.
func (r *Reader) finish(t *track) error {
	rows := t.rows
	r.held -= len(rows)
	if !t.sorted {
		slices.SortStableFunc(rows, func(a, b row) int { return cmp.Compare(a.frame, b.frame) })
	}
	st := r.names[t.name]
	start := 0
	for i := 1; i <= len(rows); i++ {
		if i < len(rows) {
			if rows[i].frame == rows[i-1].frame {
				a, b := rows[i-1].line, rows[i].line
				return &Error{Line: max(a, b), Column: r.frameColumn() + 1, Name: r.header[r.frameColumn()],
					Err: fmt.Errorf("track %q has frame %d twice (also on line %d)", t.name, rows[i].frame, min(a, b))}
			}
			if rows[i].frame == rows[i-1].frame+1 {
				continue
			}
			r.stats.Gaps++
		}
		r.emit(t.name, st, rows[start:i])
		start = i
	}
	return nil
}

// emit queues one gap-free part of a track, or drops it when it is too short.
func (r *Reader) emit(name string, st *nameState, rows []row) {
	st.parts++
	if len(rows) < r.opt.MinPositions {
		r.stats.Dropped++
		r.stats.DroppedPositions += len(rows)
		return
	}
	d := r.stats.Dims
	buf := make([]float64, d*len(rows))
	pos := make([][]float64, d)
	for a := range pos {
		pos[a] = buf[a*len(rows) : (a+1)*len(rows) : (a+1)*len(rows)]
		for i, x := range rows {
			pos[a][i] = x.pos[a]
		}
	}
	r.ready = append(r.ready, ready{
		seg: Segment{Name: name, Part: st.parts, FirstFrame: rows[0].frame, Line: rows[0].line},
		tr:  core.Track{Pos: pos},
	})
}

// parseFrame reads a frame number: a whole number, also written as a decimal with a zero fraction
// (12.0), within ±2⁵³.
func parseFrame(b []byte) (int64, error) {
	if len(b) == 0 {
		return 0, errors.New("empty frame number")
	}
	if n, err := strconv.ParseInt(string(b), 10, 64); err == nil {
		if n > maxFrame || n < -maxFrame {
			return 0, fmt.Errorf("frame number %d is too large (beyond ±2⁵³)", n)
		}
		return n, nil
	}
	v, err := strconv.ParseFloat(string(b), 64)
	if err != nil || v != math.Trunc(v) || math.Abs(v) > maxFrame {
		return 0, fmt.Errorf("%q is not a whole frame number", b)
	}
	return int64(v), nil
}

// maxFrame bounds frame numbers, so that they and their differences are exact in a float64.
const maxFrame = 1 << 53

// gridTolerance is how far, in frames, a time (t_s) may be from the frame grid.
const gridTolerance = 0.25

// frameOfTime turns a time in s into a frame number: round((t − t₀)/Δt), t₀ the first time of the
// file.
func (r *Reader) frameOfTime(b []byte) (int64, error) {
	t, err := parseNumber(b)
	if err != nil {
		return 0, err
	}
	if !r.haveT0 {
		r.t0, r.haveT0 = t, true
	}
	f := (t - r.t0) / r.opt.Interval
	if math.IsInf(f, 0) || math.Abs(f) > maxFrame {
		return 0, fmt.Errorf("time %s s is too far from the first time of the file (%g s)", b, r.t0)
	}
	n := math.Round(f)
	if d := math.Abs(f - n); d > gridTolerance {
		return 0, fmt.Errorf("time %s s is %.2f of a frame off the grid of Δt = %g s that starts at %g s", b, d, r.opt.Interval, r.t0)
	}
	return int64(n), nil
}

// parseNumber reads a finite decimal number.
func parseNumber(b []byte) (float64, error) {
	if len(b) == 0 {
		return 0, errors.New("empty field, a number is needed")
	}
	v, err := strconv.ParseFloat(string(b), 64)
	switch {
	case errors.Is(err, strconv.ErrRange):
		return 0, fmt.Errorf("%q is out of the range of numbers", b)
	case err != nil:
		return 0, fmt.Errorf("%q is not a number", b)
	case math.IsNaN(v) || math.IsInf(v, 0):
		return 0, fmt.Errorf("%q is not a finite number", b)
	}
	return v, nil
}
