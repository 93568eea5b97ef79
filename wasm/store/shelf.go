package store

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"
	"sync"
	"time"
	"unicode/utf8"

	"sizebudget/uncertainty"
)

// Limits of the text a user gives a session.
const (
	MaxNameLen = 200  // characters
	MaxNoteLen = 4000 // characters
)

// Shelf is the user's collection of sessions on top of a Store: it names and dates sessions, gives
// them ids, lists them newest first with a search, duplicates, renames, and removes them in a way
// that can be undone (Remove returns the session, Restore puts it back as it was).
type Shelf struct {
	store Store
	now   func() time.Time

	mu  sync.Mutex
	seq uint64
}

// NewShelf returns a Shelf on s. now is the clock used for the created and modified times and for
// new ids (time.Now in the browser, a fixed clock in tests). It panics if s or now is nil.
func NewShelf(s Store, now func() time.Time) *Shelf {
	if s == nil || now == nil {
		panic("store: NewShelf needs a Store and a clock")
	}
	return &Shelf{store: s, now: now}
}

// Store returns the Store under the shelf.
func (sh *Shelf) Store() Store { return sh.store }

// Save validates the scenario and saves it as a new session with the given name and note; it
// returns the new session. An empty name is replaced by the scenario's own name, or "Untitled".
func (sh *Shelf) Save(ctx context.Context, sc uncertainty.Scenario, name, note string) (Session, error) {
	return sh.SaveWith(ctx, sc, nil, name, note)
}

// SaveWith is Save for a session that also keeps the analysis an (nil: none), which it validates.
func (sh *Shelf) SaveWith(ctx context.Context, sc uncertainty.Scenario, an *Analysis, name, note string) (Session, error) {
	sc = sc.Defaults()
	if err := sc.Validate(); err != nil {
		return Session{}, err
	}
	if an != nil {
		if err := an.Validate(); err != nil {
			return Session{}, fmt.Errorf("analysis: %w", err)
		}
	}
	name, note, err := cleanText(name, note, sc)
	if err != nil {
		return Session{}, err
	}
	id, err := sh.newID(ctx)
	if err != nil {
		return Session{}, err
	}
	t := sh.now().UTC()
	s := Session{ID: id, Name: name, Note: note, Created: t, Modified: t, Scenario: sc, Analysis: an}
	if err := sh.store.Put(ctx, s); err != nil {
		return Session{}, err
	}
	return s, nil
}

// Update replaces the scenario of an existing session (name, note and analysis are kept) and marks
// it modified.
func (sh *Shelf) Update(ctx context.Context, id string, sc uncertainty.Scenario) (Session, error) {
	return sh.update(ctx, id, sc, nil, false)
}

// UpdateWith replaces the scenario and the analysis of an existing session (nil removes the
// analysis; name and note are kept) and marks it modified.
func (sh *Shelf) UpdateWith(ctx context.Context, id string, sc uncertainty.Scenario, an *Analysis) (Session, error) {
	return sh.update(ctx, id, sc, an, true)
}

func (sh *Shelf) update(ctx context.Context, id string, sc uncertainty.Scenario, an *Analysis, setAnalysis bool) (Session, error) {
	sc = sc.Defaults()
	if err := sc.Validate(); err != nil {
		return Session{}, err
	}
	if an != nil {
		if err := an.Validate(); err != nil {
			return Session{}, fmt.Errorf("analysis: %w", err)
		}
	}
	s, err := sh.store.Get(ctx, id)
	if err != nil {
		return Session{}, err
	}
	s.Scenario = sc
	if setAnalysis {
		s.Analysis = an
	}
	s.Modified = sh.later(s.Modified)
	return s, sh.store.Put(ctx, s)
}

// Rename gives a session a new name and note and marks it modified.
func (sh *Shelf) Rename(ctx context.Context, id, name, note string) (Session, error) {
	s, err := sh.store.Get(ctx, id)
	if err != nil {
		return Session{}, err
	}
	s.Name, s.Note, err = cleanText(name, note, s.Scenario)
	if err != nil {
		return Session{}, err
	}
	s.Modified = sh.later(s.Modified)
	return s, sh.store.Put(ctx, s)
}

// Duplicate saves a copy of a session (with its analysis) under a new id, named "<name> (copy)".
func (sh *Shelf) Duplicate(ctx context.Context, id string) (Session, error) {
	s, err := sh.store.Get(ctx, id)
	if err != nil {
		return Session{}, err
	}
	name := s.Name + " (copy)"
	if utf8.RuneCountInString(name) > MaxNameLen {
		name = s.Name
	}
	return sh.SaveWith(ctx, s.Scenario, s.Analysis, name, s.Note)
}

// Get returns the session with the given id (an error wrapping ErrNotFound if there is none).
func (sh *Shelf) Get(ctx context.Context, id string) (Session, error) { return sh.store.Get(ctx, id) }

// Remove deletes a session and returns it, so that Restore can undo the removal.
func (sh *Shelf) Remove(ctx context.Context, id string) (Session, error) {
	s, err := sh.store.Get(ctx, id)
	if err != nil {
		return Session{}, err
	}
	return s, sh.store.Delete(ctx, id)
}

// Restore puts back a removed session exactly as it was (same id and times). It refuses a session
// whose id is taken by another session meanwhile.
func (sh *Shelf) Restore(ctx context.Context, s Session) error {
	if s.ID == "" {
		return errors.New("store: cannot restore a session without an id")
	}
	if _, err := sh.store.Get(ctx, s.ID); err == nil {
		return fmt.Errorf("store: session %q exists; nothing to restore", s.ID)
	} else if !errors.Is(err, ErrNotFound) {
		return err
	}
	if err := s.Scenario.Validate(); err != nil {
		return err
	}
	if s.Analysis != nil {
		if err := s.Analysis.Validate(); err != nil {
			return fmt.Errorf("analysis: %w", err)
		}
	}
	return sh.store.Put(ctx, s)
}

// List returns the sessions whose name or note contains every word of query (case-insensitive; an
// empty query matches all), newest modification first.
func (sh *Shelf) List(ctx context.Context, query string) ([]Session, error) {
	all, err := sh.store.List(ctx)
	if err != nil {
		return nil, err
	}
	words := strings.Fields(strings.ToLower(query))
	out := all[:0]
	for _, s := range all {
		if matches(s, words) {
			out = append(out, s)
		}
	}
	sortNewestFirst(out)
	return out, nil
}

// sortNewestFirst orders sessions by modification time, newest first, then by id (newest ids sort
// last in string order, so descending) for a stable order among equal times.
func sortNewestFirst(ss []Session) {
	slices.SortFunc(ss, func(a, b Session) int {
		if c := b.Modified.Compare(a.Modified); c != 0 {
			return c
		}
		return cmp.Compare(b.ID, a.ID)
	})
}

func matches(s Session, words []string) bool {
	hay := strings.ToLower(s.Name + "\n" + s.Note)
	for _, w := range words {
		if !strings.Contains(hay, w) {
			return false
		}
	}
	return true
}

// later returns the current time, or just after prev when the clock has not moved past it (so that
// a modification always sorts after what it modified).
func (sh *Shelf) later(prev time.Time) time.Time {
	t := sh.now().UTC()
	if !t.After(prev) {
		t = prev.Add(time.Millisecond)
	}
	return t
}

// newID returns an id not used in the store: the clock in milliseconds and a counter, in base 36.
func (sh *Shelf) newID(ctx context.Context) (string, error) {
	for range 1000 {
		sh.mu.Lock()
		sh.seq++
		id := "s" + strconv.FormatInt(sh.now().UnixMilli(), 36) + "-" + strconv.FormatUint(sh.seq, 36)
		sh.mu.Unlock()
		_, err := sh.store.Get(ctx, id)
		if errors.Is(err, ErrNotFound) {
			return id, nil
		}
		if err != nil {
			return "", err
		}
	}
	return "", errors.New("store: could not find a free session id")
}

// cleanText trims name and note, falls back to the scenario's name or "Untitled", and checks lengths.
func cleanText(name, note string, sc uncertainty.Scenario) (string, string, error) {
	name = strings.TrimSpace(name)
	note = strings.TrimSpace(note)
	if name == "" {
		name = strings.TrimSpace(sc.Name)
	}
	if name == "" {
		name = "Untitled"
	}
	if n := utf8.RuneCountInString(name); n > MaxNameLen {
		return "", "", fmt.Errorf("store: a session name has at most %d characters (this one has %d)", MaxNameLen, n)
	}
	if n := utf8.RuneCountInString(note); n > MaxNoteLen {
		return "", "", fmt.Errorf("store: a session note has at most %d characters (this one has %d)", MaxNoteLen, n)
	}
	return name, note, nil
}
