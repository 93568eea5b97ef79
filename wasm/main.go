//go:build js && wasm

package main

import "syscall/js"

func main() {
	g := js.Global()
	switch {
	case !g.Get("document").IsUndefined():
		installPage(g)
	case g.Get("sizebudgetRole").String() == "helper":
		installHelper(g)
	default:
		installCoordinator(g)
	}
	select {} // serve calls from JavaScript until the page or worker goes away
}
