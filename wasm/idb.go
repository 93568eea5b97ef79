//go:build js && wasm

package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"syscall/js"
	"time"

	"github.com/hack-pad/go-indexeddb/idb"

	"sizebudget/uncertainty"
	"sizebudget/wasm/store"
)

// The IndexedDB database of the app and its schema versions. Each version only adds to the one
// before, and upgradeDB applies the steps an existing database lacks, so a database of any earlier
// version opens with its sessions intact:
//
//	version 1: object store "sessions", key path "id", one record per session
//	version 2: object store "draft" (out-of-line key "current"): the autosaved form
//
// A record is the JSON of store.Session parsed into a JavaScript object; its scenario is a scenario
// document with its own "format", read back through uncertainty.ParseScenario, so documents written
// by an older version are read by the newer engine. A record may hold an "analysis" (store.Analysis:
// the summary of a track file, the settings and the result); records written before analyses
// existed have none, so the schema version did not change for it.
const (
	dbName        = "sizebudget"
	dbVersion     = 2
	sessionsStore = "sessions"
	draftStore    = "draft"
	draftKey      = "current"
	openTimeout   = 10 * time.Second
)

// idbStore is the store.Store of the browser, on IndexedDB.
type idbStore struct {
	db *idb.Database
}

var _ store.Store = (*idbStore)(nil)

// openIDB opens (creating or upgrading) the app's database.
func openIDB(ctx context.Context) (_ *idbStore, err error) {
	defer func() {
		if v := recover(); v != nil { // idb.Global panics when the browser has no IndexedDB
			err = fmt.Errorf("IndexedDB is not available: %v", v)
		}
	}()
	ctx, cancel := context.WithTimeout(ctx, openTimeout)
	defer cancel()
	req, err := idb.Global().Open(ctx, dbName, dbVersion, upgradeDB)
	if err != nil {
		return nil, err
	}
	db, err := req.Await(ctx)
	if err != nil {
		return nil, err
	}
	return &idbStore{db: db}, nil
}

// upgradeDB brings a database from oldVersion (0 for a new one) to newVersion, one step at a time.
func upgradeDB(db *idb.Database, oldVersion, newVersion uint) error {
	if oldVersion < 1 {
		if _, err := db.CreateObjectStore(sessionsStore, idb.ObjectStoreOptions{KeyPath: js.ValueOf("id")}); err != nil {
			return err
		}
	}
	if oldVersion < 2 {
		if _, err := db.CreateObjectStore(draftStore, idb.ObjectStoreOptions{}); err != nil {
			return err
		}
	}
	return nil
}

// record is a session as stored; the scenario stays raw until ParseScenario reads it.
type record struct {
	ID       string          `json:"id"`
	Name     string          `json:"name"`
	Note     string          `json:"note,omitempty"`
	Created  time.Time       `json:"created"`
	Modified time.Time       `json:"modified"`
	Scenario json.RawMessage `json:"scenario"`
	Analysis json.RawMessage `json:"analysis,omitempty"`
}

func toJS(v any) (js.Value, error) {
	b, err := json.Marshal(v)
	if err != nil {
		return js.Undefined(), err
	}
	return js.Global().Get("JSON").Call("parse", string(b)), nil
}

func fromRecord(v js.Value) (store.Session, error) {
	text := js.Global().Get("JSON").Call("stringify", v).String()
	var r record
	if err := json.Unmarshal([]byte(text), &r); err != nil {
		return store.Session{}, fmt.Errorf("a stored session is unreadable: %v", err)
	}
	sc, err := uncertainty.ParseScenario(r.Scenario)
	if err != nil {
		return store.Session{}, fmt.Errorf("stored session %q: %w", r.ID, err)
	}
	s := store.Session{ID: r.ID, Name: r.Name, Note: r.Note, Created: r.Created, Modified: r.Modified, Scenario: sc}
	if len(r.Analysis) > 0 && string(r.Analysis) != "null" {
		// An analysis this build cannot read (written by a newer one, say) leaves the session usable.
		if s.Analysis, err = store.ParseAnalysis(r.Analysis); err != nil {
			js.Global().Get("console").Call("warn", fmt.Sprintf("sizebudget: stored session %q: its analysis is left out: %v", r.ID, err))
		}
	}
	return s, nil
}

func (s *idbStore) objectStore(mode idb.TransactionMode, name string) (*idb.Transaction, *idb.ObjectStore, error) {
	txn, err := s.db.Transaction(mode, name)
	if err != nil {
		return nil, nil, err
	}
	st, err := txn.ObjectStore(name)
	return txn, st, err
}

// Get returns the session with the given id.
func (s *idbStore) Get(ctx context.Context, id string) (store.Session, error) {
	_, st, err := s.objectStore(idb.TransactionReadOnly, sessionsStore)
	if err != nil {
		return store.Session{}, err
	}
	req, err := st.Get(js.ValueOf(id))
	if err != nil {
		return store.Session{}, err
	}
	v, err := req.Await(ctx)
	if err != nil {
		return store.Session{}, err
	}
	if v.IsUndefined() || v.IsNull() {
		return store.Session{}, fmt.Errorf("%w: %q", store.ErrNotFound, id)
	}
	return fromRecord(v)
}

// List returns every readable session. A record that cannot be read (written by a newer version of
// the app, say) is left in the database and skipped with a message on the console.
func (s *idbStore) List(ctx context.Context) ([]store.Session, error) {
	_, st, err := s.objectStore(idb.TransactionReadOnly, sessionsStore)
	if err != nil {
		return nil, err
	}
	req, err := st.OpenCursor(idb.CursorNext)
	if err != nil {
		return nil, err
	}
	var out []store.Session
	err = req.Iter(ctx, func(c *idb.CursorWithValue) error {
		v, err := c.Value()
		if err != nil {
			return err
		}
		sess, err := fromRecord(v)
		if err != nil {
			js.Global().Get("console").Call("warn", "sizebudget: skipped a stored session: "+err.Error())
			return nil
		}
		out = append(out, sess)
		return nil
	})
	return out, err
}

// Put writes the sessions in one transaction: all of them or none.
func (s *idbStore) Put(ctx context.Context, sessions ...store.Session) error {
	if len(sessions) == 0 {
		return nil
	}
	values := make([]js.Value, len(sessions))
	for i, sess := range sessions {
		if sess.ID == "" {
			return fmt.Errorf("store: session %d has no id", i+1)
		}
		doc, err := json.Marshal(sess.Scenario)
		if err != nil {
			return err
		}
		rec := record{ID: sess.ID, Name: sess.Name, Note: sess.Note, Created: sess.Created, Modified: sess.Modified, Scenario: doc}
		if sess.Analysis != nil {
			if rec.Analysis, err = json.Marshal(sess.Analysis); err != nil {
				return err
			}
		}
		v, err := toJS(rec)
		if err != nil {
			return err
		}
		values[i] = v
	}
	txn, st, err := s.objectStore(idb.TransactionReadWrite, sessionsStore)
	if err != nil {
		return err
	}
	for _, v := range values {
		if _, err := st.Put(v); err != nil {
			_ = txn.Abort()
			return err
		}
	}
	return txn.Await(ctx)
}

// Delete removes the session with the given id, if any.
func (s *idbStore) Delete(ctx context.Context, id string) error {
	txn, st, err := s.objectStore(idb.TransactionReadWrite, sessionsStore)
	if err != nil {
		return err
	}
	if _, err := st.Delete(js.ValueOf(id)); err != nil {
		return err
	}
	return txn.Await(ctx)
}

// Draft returns the autosaved draft, or nil when there is none.
func (s *idbStore) Draft(ctx context.Context) ([]byte, error) {
	_, st, err := s.objectStore(idb.TransactionReadOnly, draftStore)
	if err != nil {
		return nil, err
	}
	req, err := st.Get(js.ValueOf(draftKey))
	if err != nil {
		return nil, err
	}
	v, err := req.Await(ctx)
	if err != nil {
		return nil, err
	}
	if v.Type() != js.TypeString {
		return nil, nil
	}
	return []byte(v.String()), nil
}

// PutDraft replaces the autosaved draft.
func (s *idbStore) PutDraft(ctx context.Context, draft []byte) error {
	txn, st, err := s.objectStore(idb.TransactionReadWrite, draftStore)
	if err != nil {
		return err
	}
	if _, err := st.PutKey(js.ValueOf(draftKey), js.ValueOf(string(draft))); err != nil {
		return err
	}
	return txn.Await(ctx)
}

// errNoDB is wrapped into the message shown when the app falls back to the in-memory store.
var errNoDB = errors.New("sessions are kept in memory only, until this page is closed")
