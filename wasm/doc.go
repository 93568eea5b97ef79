//go:build js && wasm

// Command wasm is the browser bridge: JSON scenario in, JSON result out, sessions in IndexedDB and the
// Web Worker entry for Monte Carlo work. Every file carries the js && wasm build tag.
package main
