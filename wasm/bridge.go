//go:build js && wasm

package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"runtime/debug"
	"syscall/js"

	"sizebudget/core"
	"sizebudget/uncertainty"
)

// replyError is the JSON form of an error sent to JavaScript: the message as the engine wrote it and,
// when the error concerns one scenario field, that field's JSON key.
type replyError struct {
	Message string `json:"message"`
	Field   string `json:"field,omitempty"`
}

// fieldError is an error that concerns one setting, named by its JSON key, though it is not a
// range error (a track file whose header the settings cannot read, say).
type fieldError struct {
	field string
	err   error
}

func (e *fieldError) Error() string { return e.err.Error() }
func (e *fieldError) Unwrap() error { return e.err }

// describe returns the reply form of err. A *fieldError, *uncertainty.FieldError or *core.RangeError
// (also inside an import error) names its field.
func describe(err error) replyError {
	r := replyError{Message: err.Error()}
	var fd *fieldError
	var fe *uncertainty.FieldError
	var re *core.RangeError
	switch {
	case errors.As(err, &fd):
		r.Field = fd.field
	case errors.As(err, &fe):
		r.Field = fe.Field
	case errors.As(err, &re):
		r.Field = re.Field
	}
	return r
}

// jsError builds a JavaScript Error with the message of err and a "field" property when it names one.
func jsError(err error) js.Value {
	d := describe(err)
	e := js.Global().Get("Error").New(d.Message)
	if d.Field != "" {
		e.Set("field", d.Field)
	}
	return e
}

// panicError turns a recovered panic into an error that says it is a bug.
func panicError(v any) error {
	return fmt.Errorf("internal error (please report it): %v\n%s", v, debug.Stack())
}

// syncFunc wraps a function that returns at once (it must not wait for JavaScript). Its result is
// returned as is; an error or a panic is thrown as a JavaScript Error.
func syncFunc(fn func(args []js.Value) (any, error)) js.Func {
	return js.FuncOf(func(this js.Value, args []js.Value) (out any) {
		defer func() {
			if v := recover(); v != nil {
				out = throw(panicError(v))
			}
		}()
		res, err := fn(args)
		if err != nil {
			return throw(err)
		}
		return res
	})
}

// throw cannot raise a JavaScript exception from Go, so synchronous functions return an object
// {error: {message, field}} instead; api.js turns it into a thrown Error.
func throw(err error) any {
	return map[string]any{"error": jsError(err)}
}

// asyncFunc wraps a function that may wait (IndexedDB): the JavaScript caller gets a Promise, and fn runs
// on its own goroutine so that the event loop keeps turning. The Promise resolves with fn's result or
// rejects with an Error; a panic rejects it too.
func asyncFunc(fn func(ctx context.Context, args []js.Value) (any, error)) js.Func {
	return js.FuncOf(func(this js.Value, args []js.Value) any {
		args = append([]js.Value(nil), args...)
		var handler js.Func
		handler = js.FuncOf(func(this js.Value, pargs []js.Value) any {
			resolve, reject := pargs[0], pargs[1]
			go func() {
				defer handler.Release()
				defer func() {
					if v := recover(); v != nil {
						reject.Invoke(jsError(panicError(v)))
					}
				}()
				res, err := fn(context.Background(), args)
				if err != nil {
					reject.Invoke(jsError(err))
					return
				}
				resolve.Invoke(res)
			}()
			return nil
		})
		return js.Global().Get("Promise").New(handler)
	})
}

// awaitPromise waits for a JavaScript Promise and returns its value, or its rejection as an error.
// It must be called on a goroutine other than the one serving a JavaScript call (the event loop has
// to turn).
func awaitPromise(p js.Value) (js.Value, error) {
	type outcome struct {
		v   js.Value
		err error
	}
	ch := make(chan outcome, 1)
	var then, catch js.Func
	then = js.FuncOf(func(_ js.Value, args []js.Value) any {
		v := js.Undefined()
		if len(args) > 0 {
			v = args[0]
		}
		ch <- outcome{v: v}
		return nil
	})
	catch = js.FuncOf(func(_ js.Value, args []js.Value) any {
		msg := "rejected"
		if len(args) > 0 {
			msg = js.Global().Get("String").Invoke(args[0]).String()
			if args[0].Type() == js.TypeObject {
				if m := args[0].Get("message"); m.Type() == js.TypeString {
					msg = m.String()
				}
			}
		}
		ch <- outcome{err: errors.New(msg)}
		return nil
	})
	p.Call("then", then, catch)
	o := <-ch
	then.Release()
	catch.Release()
	return o.v, o.err
}

// jsonText marshals v for JavaScript, which parses it with JSON.parse.
func jsonText(v any) (string, error) {
	b, err := json.Marshal(v)
	return string(b), err
}

// argString returns args[i] as a string, or an error if it is missing or not a string.
func argString(args []js.Value, i int, name string) (string, error) {
	if i >= len(args) || args[i].Type() != js.TypeString {
		return "", fmt.Errorf("argument %d (%s) must be a string", i+1, name)
	}
	return args[i].String(), nil
}

// optString returns args[i] as a string, or "" when it is missing, null or undefined.
func optString(args []js.Value, i int) string {
	if i >= len(args) || args[i].Type() != js.TypeString {
		return ""
	}
	return args[i].String()
}
