package store

import (
	"context"
	"errors"
	"testing"
	"time"

	"sizebudget/uncertainty"
)

// testStore checks the Store contract on a fresh, empty store.
func testStore(t *testing.T, st Store) {
	t.Helper()
	ctx := context.Background()
	if _, err := st.Get(ctx, "nope"); !errors.Is(err, ErrNotFound) {
		t.Fatalf("Get of a missing id: err = %v, want ErrNotFound", err)
	}
	if d, err := st.Draft(ctx); err != nil || d != nil {
		t.Fatalf("Draft of an empty store = %q, %v; want nil, nil", d, err)
	}
	t0 := time.Date(2030, 1, 2, 3, 4, 5, 0, time.UTC)
	a := Session{ID: "a", Name: "A", Created: t0, Modified: t0, Scenario: uncertainty.Demo()}
	b := Session{ID: "b", Name: "B", Note: "n", Created: t0, Modified: t0.Add(time.Hour), Scenario: uncertainty.Demo()}
	if err := st.Put(ctx, a, b); err != nil {
		t.Fatal(err)
	}
	got, err := st.Get(ctx, "b")
	if err != nil || !same(got, b) {
		t.Fatalf("Get(b) = %+v, %v; want %+v", got, err, b)
	}
	if err := st.Put(ctx, Session{ID: "c", Scenario: uncertainty.Demo()}, Session{Scenario: uncertainty.Demo()}); err == nil {
		t.Fatal("Put with a session without id: no error")
	}
	if _, err := st.Get(ctx, "c"); !errors.Is(err, ErrNotFound) {
		t.Fatalf("Put that failed stored session c (err = %v)", err)
	}
	b.Name = "B2"
	if err := st.Put(ctx, b); err != nil {
		t.Fatal(err)
	}
	if got, _ := st.Get(ctx, "b"); got.Name != "B2" {
		t.Fatalf("Put did not replace: name %q", got.Name)
	}
	all, err := st.List(ctx)
	if err != nil || len(all) != 2 {
		t.Fatalf("List = %d sessions, %v; want 2", len(all), err)
	}
	if err := st.Delete(ctx, "a"); err != nil {
		t.Fatal(err)
	}
	if err := st.Delete(ctx, "a"); err != nil {
		t.Fatalf("second Delete: %v", err)
	}
	if all, _ := st.List(ctx); len(all) != 1 || all[0].ID != "b" {
		t.Fatalf("after Delete: %+v", all)
	}
	draft := []byte(`{"half":"typed`)
	if err := st.PutDraft(ctx, draft); err != nil {
		t.Fatal(err)
	}
	draft[0] = 'X' // the store must have kept its own copy
	if d, err := st.Draft(ctx); err != nil || string(d) != `{"half":"typed` {
		t.Fatalf("Draft = %q, %v", d, err)
	}
	done, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := st.List(done); !errors.Is(err, context.Canceled) {
		t.Fatalf("List with a cancelled context: err = %v", err)
	}
}

func TestMemory(t *testing.T) { testStore(t, &Memory{}) }
