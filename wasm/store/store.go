package store

import (
	"context"
	"errors"
	"time"

	"sizebudget/uncertainty"
)

// ErrNotFound is returned (wrapped) by Store.Get and the Shelf when no session has the given id.
var ErrNotFound = errors.New("store: no such session")

// Session is one saved scenario with the name and note the user gave it. Created and Modified are
// wall-clock times; the scenario is the validated scenario document. Analysis, when set, is the
// analysis of a recorded track file kept with the session (its summary, settings and result; not
// the file's rows).
type Session struct {
	ID       string               `json:"id"`
	Name     string               `json:"name"`
	Note     string               `json:"note,omitempty"`
	Created  time.Time            `json:"created"`
	Modified time.Time            `json:"modified"`
	Scenario uncertainty.Scenario `json:"scenario"`
	Analysis *Analysis            `json:"analysis,omitempty"`
}

// Store is where sessions and the autosaved draft live. Implementations: Memory (for tests and as a
// fallback when the browser offers no IndexedDB) and the IndexedDB backend of the browser bridge.
//
// Calls that wait take a context. Put writes all given sessions or none of them. Delete of a missing
// id is not an error. Draft returns nil, nil when no draft was saved.
type Store interface {
	Get(ctx context.Context, id string) (Session, error)
	List(ctx context.Context) ([]Session, error)
	Put(ctx context.Context, sessions ...Session) error
	Delete(ctx context.Context, id string) error
	Draft(ctx context.Context) ([]byte, error)
	PutDraft(ctx context.Context, draft []byte) error
}
