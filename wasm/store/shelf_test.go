package store

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"

	"sizebudget/uncertainty"
)

// tick is a test clock that moves one second per call.
type tick struct{ t time.Time }

func (c *tick) now() time.Time {
	c.t = c.t.Add(time.Second)
	return c.t
}

func newTestShelf() (*Shelf, *tick) {
	c := &tick{t: time.Date(2031, 5, 6, 7, 8, 9, 0, time.UTC)}
	return NewShelf(&Memory{}, c.now), c
}

func TestShelfSaveValidates(t *testing.T) {
	sh, _ := newTestShelf()
	ctx := context.Background()
	bad := uncertainty.Demo()
	bad.Frames = 1
	_, err := sh.Save(ctx, bad, "bad", "")
	var fe *uncertainty.FieldError
	if !errors.As(err, &fe) || fe.Field != "frames" {
		t.Fatalf("Save of frames = 1: err = %v, want a FieldError on frames", err)
	}
	if all, _ := sh.List(ctx, ""); len(all) != 0 {
		t.Fatalf("a refused Save stored %d sessions", len(all))
	}
	s, err := sh.Save(ctx, uncertainty.Demo(), "  ", "  a note ")
	if err != nil {
		t.Fatal(err)
	}
	if s.Name != uncertainty.Demo().Name || s.Note != "a note" {
		t.Errorf("blank name: got name %q note %q; want the scenario's name and the trimmed note", s.Name, s.Note)
	}
	if _, err := sh.Save(ctx, uncertainty.Demo(), strings.Repeat("x", MaxNameLen+1), ""); err == nil {
		t.Error("an over-long name was accepted")
	}
}

func TestShelfListNewestFirstAndSearch(t *testing.T) {
	sh, _ := newTestShelf()
	ctx := context.Background()
	var ids []string
	for _, n := range []string{"Beads in water", "Vesicles, cold room", "beads in glycerol"} {
		s, err := sh.Save(ctx, uncertainty.Demo(), n, "invented")
		if err != nil {
			t.Fatal(err)
		}
		ids = append(ids, s.ID)
	}
	if ids[0] == ids[1] || ids[1] == ids[2] {
		t.Fatalf("ids not unique: %v", ids)
	}
	all, _ := sh.List(ctx, "")
	if len(all) != 3 || all[0].ID != ids[2] || all[2].ID != ids[0] {
		t.Fatalf("List order: %v; want newest first %v", names(all), []string{ids[2], ids[1], ids[0]})
	}
	got, _ := sh.List(ctx, "BEADS")
	if len(got) != 2 || got[0].ID != ids[2] || got[1].ID != ids[0] {
		t.Errorf(`List("BEADS") = %v`, names(got))
	}
	if got, _ := sh.List(ctx, "beads glycerol"); len(got) != 1 || got[0].ID != ids[2] {
		t.Errorf(`List("beads glycerol") = %v; every word must match`, names(got))
	}
	if got, _ := sh.List(ctx, "invented"); len(got) != 3 {
		t.Errorf("the note is searched too: got %d sessions", len(got))
	}
	// Renaming the oldest makes it the newest.
	if _, err := sh.Rename(ctx, ids[0], "Beads, second look", "n"); err != nil {
		t.Fatal(err)
	}
	if all, _ := sh.List(ctx, ""); all[0].ID != ids[0] || all[0].Name != "Beads, second look" {
		t.Errorf("after Rename the session is not first: %v", names(all))
	}
}

func TestShelfDuplicateUpdate(t *testing.T) {
	sh, _ := newTestShelf()
	ctx := context.Background()
	s, _ := sh.Save(ctx, uncertainty.Demo(), "Plan A", "note")
	d, err := sh.Duplicate(ctx, s.ID)
	if err != nil {
		t.Fatal(err)
	}
	if d.ID == s.ID || d.Name != "Plan A (copy)" || d.Note != "note" || !same(Session{Scenario: d.Scenario}, Session{Scenario: s.Scenario}) {
		t.Fatalf("Duplicate = %+v", d)
	}
	sc := s.Scenario
	sc.Tracks = 250
	u, err := sh.Update(ctx, s.ID, sc)
	if err != nil {
		t.Fatal(err)
	}
	if u.Scenario.Tracks != 250 || !u.Modified.After(s.Modified) || !u.Created.Equal(s.Created) {
		t.Fatalf("Update = %+v", u)
	}
	sc.Tracks = 0
	if _, err := sh.Update(ctx, s.ID, sc); err == nil {
		t.Fatal("Update with tracks = 0 accepted")
	}
	if got, _ := sh.Get(ctx, s.ID); got.Scenario.Tracks != 250 {
		t.Fatalf("a refused Update changed the session: tracks %d", got.Scenario.Tracks)
	}
	if _, err := sh.Duplicate(ctx, "missing"); !errors.Is(err, ErrNotFound) {
		t.Fatalf("Duplicate(missing): %v", err)
	}
}

func TestShelfRemoveRestore(t *testing.T) {
	sh, _ := newTestShelf()
	ctx := context.Background()
	s, _ := sh.Save(ctx, uncertainty.Demo(), "Keep me", "")
	gone, err := sh.Remove(ctx, s.ID)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := sh.Get(ctx, s.ID); !errors.Is(err, ErrNotFound) {
		t.Fatalf("after Remove, Get: %v", err)
	}
	if err := sh.Restore(ctx, gone); err != nil {
		t.Fatal(err)
	}
	back, err := sh.Get(ctx, s.ID)
	if err != nil || !same(back, s) {
		t.Fatalf("Restore gave %+v, %v; want %+v", back, err, s)
	}
	if err := sh.Restore(ctx, gone); err == nil {
		t.Fatal("Restore over an existing session accepted")
	}
	if _, err := sh.Remove(ctx, "missing"); !errors.Is(err, ErrNotFound) {
		t.Fatalf("Remove(missing): %v", err)
	}
}

func names(ss []Session) []string {
	var out []string
	for _, s := range ss {
		out = append(out, s.ID+":"+s.Name)
	}
	return out
}
