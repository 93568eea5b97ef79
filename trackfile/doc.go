// Package trackfile reads and writes recorded trajectories in sizebudget's own plain text shape:
// one row per position, comma- or tab-separated, with a header that names the columns.
//
//	# lines starting with # are comments, anywhere in the file; blank lines are skipped
//	track,frame,x_um,y_um
//	1,0,10.0213,4.5518
//	1,1,10.1107,4.4962
//	2,7,31.882,12.004
//
// The header is the first line that is neither blank nor a comment. Its columns, in any order and
// any letter case:
//
//	track           the name of the track (any text without the delimiter); required
//	frame           the frame number, a whole number; or
//	t_s             the time in seconds, turned into frame numbers with the frame interval
//	                (Options.Interval): frame = round((t − t_first)/Δt), t_first the first time in
//	                the file; a time more than a quarter of a frame off that grid is an error
//	x, y            positions along two axes; required
//	z               a third axis; optional
//
// A file with both frame and t_s uses frame. Other columns are ignored (Stats.Ignored lists them).
// The delimiter is a tab if the header contains one, a comma otherwise. A field may be wrapped in
// one pair of double quotes, which are removed; quoting does not allow a delimiter inside a field.
// A UTF-8 byte-order mark at the start and CR before LF (CRLF line ends) are accepted.
//
// Lengths carry their unit as a suffix of the position columns, the same for all of them: x_nm,
// x_um (or x_µm, x_μm), x_m or x_px. Bare x, y, z take the unit of Options.Unit. Pixels (px) are
// converted with Options.PixelSize. Positions are returned in metres.
//
// Tracks. A track is the set of rows with the same name. Its rows are sorted by frame (any order is
// accepted within a track) and a frame that appears twice is an error. A gap in the frame numbers —
// consecutive frames that differ by more than one — splits the track into separate tracks, since the
// estimators need equally spaced positions (Stats.Gaps counts the splits; the parts are named by
// Reader.Segment). Tracks with fewer than Options.MinPositions positions (default 5) are dropped
// and counted (Stats.Dropped); see DefaultMinPositions for why 5.
//
// Order of the rows and memory. The reader makes one pass over the file; Options.Order says how the
// rows are arranged, and so what it has to hold:
//
//	ByTrack (default)  the rows of each track are together (in any frame order): one track is held
//	                   at a time, so a file of any size is read in memory proportional to its
//	                   longest track. A track name that comes back after other tracks is an error.
//	ByFrame            rows sorted by frame, the tracks interleaved (as a frame-by-frame tracker
//	                   writes them): the tracks present in the current frame are held; a track
//	                   that misses a frame is finished (a gap would split it anyway).
//	AnyOrder           no order: every row is held until the end of the file, then the tracks are
//	                   returned in the order of their first row. Memory is proportional to the file.
//
// Besides the rows it holds, the reader keeps one small record per track name (to detect names
// that come back). Stats.MaxBuffered reports the most rows held at once.
//
// Errors name the line (1-based, counting every line of the file) and, where it applies, the column
// (1-based) and its header name; see Error.
package trackfile
