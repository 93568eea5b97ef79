//go:build js && wasm

// Command wasm is the browser bridge of sizebudget, built with GOOS=js GOARCH=wasm into the site's
// main.wasm. Every file of the package carries the js && wasm build tag (tags_test.go checks it).
//
// One binary plays three roles, chosen at start from the global scope it runs in:
//
//   - page (a window): the scenario document (demo, validation as the user types), the sessions in
//     IndexedDB (see idb.go; the logic is the pure package sizebudget/wasm/store, tested natively)
//     with the autosaved draft and the export file. Installed as globalThis.sizebudgetCore.
//   - coordinator (the first Web Worker): runs uncertainty.Plan or Check for the page, posts progress
//     from the engine's Progress callback, renders the charts (package chart) and, when helper workers
//     are attached, hands each Monte Carlo propagation to them in chunks (split.go).
//   - helper (further Web Workers): computes chunks of a propagation with uncertainty.RunChunks and
//     returns the sorted values.
//
// Each role installs JavaScript functions that take and return JSON text. Every function recovers
// panics into error replies, and JavaScript exceptions become Go errors.
package main
