package store

import (
	"context"
	"fmt"
	"sync"
)

// Memory is a Store held in memory: the twin of the IndexedDB backend for native tests, and the
// fallback when a browser refuses IndexedDB (then sessions last as long as the page).
// The zero value is an empty store ready to use.
type Memory struct {
	mu       sync.Mutex
	sessions map[string]Session
	draft    []byte
}

var _ Store = (*Memory)(nil)

// Get returns the session with the given id, or an error wrapping ErrNotFound.
func (m *Memory) Get(ctx context.Context, id string) (Session, error) {
	if err := ctx.Err(); err != nil {
		return Session{}, err
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	s, ok := m.sessions[id]
	if !ok {
		return Session{}, fmt.Errorf("%w: %q", ErrNotFound, id)
	}
	return s, nil
}

// List returns every session, in no particular order.
func (m *Memory) List(ctx context.Context) ([]Session, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	out := make([]Session, 0, len(m.sessions))
	for _, s := range m.sessions {
		out = append(out, s)
	}
	return out, nil
}

// Put stores the sessions, replacing any with the same id. It stores all of them or, when one has no
// id, none.
func (m *Memory) Put(ctx context.Context, sessions ...Session) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	for i, s := range sessions {
		if s.ID == "" {
			return fmt.Errorf("store: session %d has no id", i+1)
		}
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.sessions == nil {
		m.sessions = make(map[string]Session)
	}
	for _, s := range sessions {
		m.sessions[s.ID] = s
	}
	return nil
}

// Delete removes the session with the given id, if there is one.
func (m *Memory) Delete(ctx context.Context, id string) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	delete(m.sessions, id)
	return nil
}

// Draft returns a copy of the autosaved draft, or nil when there is none.
func (m *Memory) Draft(ctx context.Context) ([]byte, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.draft == nil {
		return nil, nil
	}
	return append([]byte(nil), m.draft...), nil
}

// PutDraft replaces the autosaved draft with a copy of draft.
func (m *Memory) PutDraft(ctx context.Context, draft []byte) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	m.draft = append([]byte{}, draft...)
	return nil
}
