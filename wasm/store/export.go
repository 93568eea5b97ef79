package store

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"time"

	"sizebudget/uncertainty"
)

// ExportFormat identifies the session export file this version writes:
//
//	{"format": "sizebudget/sessions/1", "exported": "<RFC 3339 time>",
//	 "sessions": [{"id", "name", "note", "created", "modified", "scenario": {scenario document},
//	               "analysis": {"file", "settings", "result", "analysed"}}]}
//
// Times are RFC 3339. The scenario is the scenario document of package uncertainty, with its own
// "format" field, so a newer engine reads the scenarios of an older file. "analysis" is optional (an
// Analysis: the summary of a track file, the settings and the result, whose own "format" is
// uncertainty.AnalysisFormat); files written before it existed have none and read as before.
const ExportFormat = "sizebudget/sessions/1"

const (
	exportPrefix      = "sizebudget/sessions/"
	maxImportBytes    = 16 << 20
	maxImportSessions = 10000
)

// exportFile is the export document. Scenario documents stay raw on reading so that ParseScenario
// (which knows their versions and validates them) reads each one.
type exportFile struct {
	Format   string          `json:"format"`
	Exported time.Time       `json:"exported"`
	Sessions []exportSession `json:"sessions"`
}

type exportSession struct {
	ID       string          `json:"id"`
	Name     string          `json:"name"`
	Note     string          `json:"note,omitempty"`
	Created  time.Time       `json:"created"`
	Modified time.Time       `json:"modified"`
	Scenario json.RawMessage `json:"scenario"`
	Analysis json.RawMessage `json:"analysis,omitempty"`
}

// Export writes the sessions with the given ids (all sessions when none is given), newest first, as
// an export file.
func (sh *Shelf) Export(ctx context.Context, ids ...string) ([]byte, error) {
	var ss []Session
	if len(ids) == 0 {
		var err error
		if ss, err = sh.List(ctx, ""); err != nil {
			return nil, err
		}
	} else {
		for _, id := range ids {
			s, err := sh.store.Get(ctx, id)
			if err != nil {
				return nil, err
			}
			ss = append(ss, s)
		}
	}
	f := exportFile{Format: ExportFormat, Exported: sh.now().UTC(), Sessions: make([]exportSession, 0, len(ss))}
	for _, s := range ss {
		doc, err := json.Marshal(s.Scenario)
		if err != nil {
			return nil, err
		}
		es := exportSession{ID: s.ID, Name: s.Name, Note: s.Note, Created: s.Created, Modified: s.Modified, Scenario: doc}
		if s.Analysis != nil {
			if es.Analysis, err = json.Marshal(s.Analysis); err != nil {
				return nil, err
			}
		}
		f.Sessions = append(f.Sessions, es)
	}
	return json.MarshalIndent(f, "", "  ")
}

// ImportReport says what Import did.
type ImportReport struct {
	Added     int      `json:"added"`     // sessions added
	Unchanged int      `json:"unchanged"` // sessions already present, identical
	Renamed   []string `json:"renamed"`   // ids of imported sessions that got a new id (theirs was taken)
}

// ImportError reports a file that Import refused. Session is the 1-based position of the offending
// session in the file (0 when the problem is the file itself) and Err the problem, e.g. the
// *uncertainty.FieldError of its scenario.
type ImportError struct {
	Session int
	Name    string
	Err     error
}

func (e *ImportError) Error() string {
	if e.Session == 0 {
		return "import: " + e.Err.Error()
	}
	name := ""
	if e.Name != "" {
		name = fmt.Sprintf(" (%q)", e.Name)
	}
	return fmt.Sprintf("import: session %d%s: %v", e.Session, name, e.Err)
}

func (e *ImportError) Unwrap() error { return e.Err }

// Import reads an export file and adds its sessions. It checks the whole file first — the format, every
// session's fields and every scenario with uncertainty.ParseScenario — and changes nothing if any of it
// is bad (the error is an *ImportError naming the session and the problem). A session whose id is
// already taken is added under a new id unless it is identical to the one stored.
func (sh *Shelf) Import(ctx context.Context, data []byte) (ImportReport, error) {
	ss, err := ReadExport(data)
	if err != nil {
		return ImportReport{}, err
	}
	var rep ImportReport
	add := make([]Session, 0, len(ss))
	for _, s := range ss {
		old, err := sh.store.Get(ctx, s.ID)
		switch {
		case errors.Is(err, ErrNotFound):
		case err != nil:
			return ImportReport{}, err
		case same(old, s):
			rep.Unchanged++
			continue
		default:
			rep.Renamed = append(rep.Renamed, s.ID)
			if s.ID, err = sh.newID(ctx); err != nil {
				return ImportReport{}, err
			}
		}
		add = append(add, s)
	}
	if err := sh.store.Put(ctx, add...); err != nil {
		return ImportReport{}, err
	}
	rep.Added = len(add)
	return rep, nil
}

// ReadExport reads and checks an export file without storing anything. It returns the sessions in
// file order, or an *ImportError.
func ReadExport(data []byte) ([]Session, error) {
	fail := func(i int, name string, err error) ([]Session, error) {
		return nil, &ImportError{Session: i, Name: name, Err: err}
	}
	if len(data) > maxImportBytes {
		return fail(0, "", fmt.Errorf("the file has %d bytes; at most %d are read", len(data), maxImportBytes))
	}
	var probe struct {
		Format *string `json:"format"`
	}
	if err := json.Unmarshal(data, &probe); err != nil {
		return fail(0, "", fmt.Errorf("not a sizebudget sessions file (not a JSON object: %v)", err))
	}
	switch {
	case probe.Format == nil:
		return fail(0, "", fmt.Errorf("not a sizebudget sessions file: field \"format\" is missing; expected %q", ExportFormat))
	case !strings.HasPrefix(*probe.Format, exportPrefix):
		return fail(0, "", fmt.Errorf("format = %q is not a sizebudget sessions file; expected %q", *probe.Format, ExportFormat))
	case *probe.Format != ExportFormat:
		return fail(0, "", fmt.Errorf("format = %q is newer than this version reads (%q); update the app", *probe.Format, ExportFormat))
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var f exportFile
	if err := dec.Decode(&f); err != nil {
		return fail(0, "", fmt.Errorf("the file does not follow %s: %v", ExportFormat, err))
	}
	if dec.More() {
		return fail(0, "", errors.New("unexpected data after the sessions document"))
	}
	if len(f.Sessions) > maxImportSessions {
		return fail(0, "", fmt.Errorf("the file has %d sessions; at most %d are read at once", len(f.Sessions), maxImportSessions))
	}
	seen := make(map[string]int, len(f.Sessions))
	out := make([]Session, 0, len(f.Sessions))
	for i, es := range f.Sessions {
		n := i + 1
		if es.ID == "" {
			return fail(n, es.Name, errors.New(`field "id" is missing or empty`))
		}
		if j, dup := seen[es.ID]; dup {
			return fail(n, es.Name, fmt.Errorf("id %q is used by session %d too", es.ID, j))
		}
		seen[es.ID] = n
		if len(es.Scenario) == 0 {
			return fail(n, es.Name, errors.New(`field "scenario" is missing`))
		}
		sc, err := uncertainty.ParseScenario(es.Scenario)
		if err != nil {
			return fail(n, es.Name, err)
		}
		name, note, err := cleanText(es.Name, es.Note, sc)
		if err != nil {
			return fail(n, es.Name, err)
		}
		if es.Created.IsZero() || es.Modified.IsZero() {
			return fail(n, es.Name, errors.New(`fields "created" and "modified" must be RFC 3339 times`))
		}
		if es.Modified.Before(es.Created) {
			return fail(n, es.Name, fmt.Errorf("modified %s is before created %s", es.Modified.Format(time.RFC3339), es.Created.Format(time.RFC3339)))
		}
		var an *Analysis
		if len(es.Analysis) > 0 && string(es.Analysis) != "null" {
			if an, err = ParseAnalysis(es.Analysis); err != nil {
				return fail(n, es.Name, err)
			}
		}
		out = append(out, Session{ID: es.ID, Name: name, Note: note, Created: es.Created.UTC(), Modified: es.Modified.UTC(), Scenario: sc, Analysis: an})
	}
	return out, nil
}

// same reports whether two sessions hold the same content (times compared as instants, the numbers
// of analysis results as values).
func same(a, b Session) bool {
	if a.ID != b.ID || a.Name != b.Name || a.Note != b.Note || !a.Created.Equal(b.Created) || !a.Modified.Equal(b.Modified) {
		return false
	}
	ja, err1 := json.Marshal(a.Scenario)
	jb, err2 := json.Marshal(b.Scenario)
	if err1 != nil || err2 != nil || !bytes.Equal(ja, jb) {
		return false
	}
	if (a.Analysis == nil) != (b.Analysis == nil) {
		return false
	}
	if a.Analysis == nil {
		return true
	}
	if !a.Analysis.Analysed.Equal(b.Analysis.Analysed) {
		return false
	}
	ca, cb := *a.Analysis, *b.Analysis
	ca.Analysed, cb.Analysed = time.Time{}, time.Time{}
	if ca.File.Modified != nil && cb.File.Modified != nil && ca.File.Modified.Equal(*cb.File.Modified) {
		ca.File.Modified = cb.File.Modified
	}
	ja, err1 = ca.canonical()
	jb, err2 = cb.canonical()
	return err1 == nil && err2 == nil && bytes.Equal(ja, jb)
}
