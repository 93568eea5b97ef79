package trackfile

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"sizebudget/core"
)

// Writer writes tracks as a comma-separated track file that Reader reads back: comment lines, then
// the header "track,frame,x_<unit>,y_<unit>[,z_<unit>]", then one row per position, the rows of each
// track together in frame order. Use NewWriter, Comment, WriteTrack, and Flush at the end.
type Writer struct {
	w        *bufio.Writer
	unit     string
	scale    float64 // m per unit
	dims     int
	decimals int
	header   bool // written
	names    map[string]bool
	buf      []byte
	err      error
}

// NewWriter returns a Writer of tracks with dims axes (2 or 3) whose positions are written in unit
// ("nm", "um", "µm", "μm", "mm" or "m") with decimals digits after the decimal point, or, for
// decimals < 0, in the shortest form that reads back as the same float64 in that unit. It panics if
// dims or unit is not one of those (a programming error).
func NewWriter(w io.Writer, unit string, dims, decimals int) *Writer {
	scale, ok := lengthUnits[unit]
	if !ok || dims < 2 || dims > 3 {
		panic(fmt.Sprintf("trackfile: NewWriter with unit %q and %d axes", unit, dims))
	}
	return &Writer{w: bufio.NewWriter(w), unit: unit, scale: scale, dims: dims, decimals: decimals, names: map[string]bool{}}
}

// Comment writes text as comment lines ("# " and one line of text each). Comments written before the
// first track come before the header. A write error is returned (and kept for Flush).
func (w *Writer) Comment(text string) error {
	if w.err != nil {
		return w.err
	}
	for line := range strings.SplitSeq(strings.ReplaceAll(text, "\r\n", "\n"), "\n") {
		_, w.err = w.w.WriteString(strings.TrimRight("# "+strings.ReplaceAll(line, "\r", " "), " ") + "\n")
	}
	return w.err
}

// writeHeader writes the header line once.
func (w *Writer) writeHeader() {
	if w.header || w.err != nil {
		return
	}
	w.header = true
	h := "track,frame,x_" + w.unit + ",y_" + w.unit
	if w.dims == 3 {
		h += ",z_" + w.unit
	}
	_, w.err = w.w.WriteString(h + "\n")
}

// WriteTrack writes the positions of tr (in m) as the rows of the track called name, frames
// firstFrame, firstFrame+1, …. It returns an error for a name that cannot be read back (empty,
// starting with '#', with a comma, tab, quote, line break or surrounding spaces) or was used before,
// a track whose number of axes is not the writer's or whose axes differ in length, a position that is
// not finite, and write errors.
func (w *Writer) WriteTrack(name string, firstFrame int64, tr core.Track) error {
	if w.err != nil {
		return w.err
	}
	switch {
	case name == "" || name[0] == '#' || strings.ContainsAny(name, ",\t\"\r\n") || strings.TrimSpace(name) != name:
		return fmt.Errorf("trackfile: track name %q cannot be written (empty, starting with #, with a comma, tab, quote, line break or surrounding spaces)", name)
	case w.names[name]:
		return fmt.Errorf("trackfile: track name %q written twice", name)
	case tr.Dims() != w.dims:
		return fmt.Errorf("trackfile: track %q has %d axes, the file %d", name, tr.Dims(), w.dims)
	}
	n := tr.Len()
	for _, p := range tr.Pos {
		if len(p) != n {
			return fmt.Errorf("trackfile: track %q: %w", name, core.ErrRagged)
		}
		for _, x := range p {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return fmt.Errorf("trackfile: track %q: %w", name, core.ErrNonFinite)
			}
		}
	}
	if firstFrame < -maxFrame || firstFrame > maxFrame-int64(n) {
		return fmt.Errorf("trackfile: track %q: frame numbers beyond ±2⁵³", name)
	}
	w.names[name] = true
	w.writeHeader()
	for i := range n {
		b := append(w.buf[:0], name...)
		b = append(b, ',')
		b = strconv.AppendInt(b, firstFrame+int64(i), 10)
		for a := range w.dims {
			b = append(b, ',')
			b = strconv.AppendFloat(b, tr.Pos[a][i]/w.scale, 'f', w.decimals, 64)
		}
		b = append(b, '\n')
		w.buf = b
		if _, err := w.w.Write(b); err != nil {
			w.err = err
			return err
		}
	}
	return nil
}

// Flush writes the header if no track was written, and any buffered data. It returns the first write
// error.
func (w *Writer) Flush() error {
	w.writeHeader()
	if w.err != nil {
		return w.err
	}
	if err := w.w.Flush(); err != nil {
		w.err = err
	}
	return w.err
}
