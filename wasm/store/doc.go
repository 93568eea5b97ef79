// Package store keeps saved sessions: the Store interface that the browser's IndexedDB backend and the
// in-memory twin implement, the Shelf that adds naming, listing, duplication, undoable removal and
// the export file, and the export file format itself.
//
// It is pure Go with no syscall/js, so everything but the IndexedDB backend (in package wasm, under
// the js && wasm build tag) is tested natively.
package store
