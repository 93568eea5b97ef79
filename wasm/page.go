//go:build js && wasm

package main

import (
	"context"
	"encoding/json"
	"fmt"
	"syscall/js"
	"time"

	"sizebudget/uncertainty"
	"sizebudget/wasm/store"
)

// page is the state of the page role: the sessions shelf and where it keeps them.
type page struct {
	shelf   *store.Shelf
	storage string // "indexeddb" or "memory"
	problem string // why the in-memory fallback is used
}

// installPage installs globalThis.sizebudgetCore for site/static/api.js: demo, validate,
// validateAnalysis and analysisCharts return at once; open, the session functions, export, import and
// the draft return Promises. Scenario documents, analysis settings, sessions and reports travel as
// JSON text.
func installPage(g js.Value) {
	p := &page{}
	core := js.Global().Get("Object").New()
	set := func(name string, f js.Func) { core.Set(name, f) }

	set("demo", syncFunc(func([]js.Value) (any, error) { return jsonText(uncertainty.Demo()) }))
	set("validate", syncFunc(func(args []js.Value) (any, error) {
		text, err := argString(args, 0, "scenario")
		if err != nil {
			return nil, err
		}
		return validate(text), nil
	}))
	set("validateAnalysis", syncFunc(func(args []js.Value) (any, error) {
		text, err := argString(args, 0, "settings")
		if err != nil {
			return nil, err
		}
		return validateAnalysis(text), nil
	}))
	set("analysisCharts", syncFunc(func(args []js.Value) (any, error) {
		text, err := argString(args, 0, "analysis")
		if err != nil {
			return nil, err
		}
		var a uncertainty.Analysis
		if err := json.Unmarshal([]byte(text), &a); err != nil {
			return nil, fmt.Errorf("analysisCharts: not the JSON of an analysis: %v", err)
		}
		if a.Format != uncertainty.AnalysisFormat {
			return nil, fmt.Errorf("analysisCharts: format = %q, expected %q", a.Format, uncertainty.AnalysisFormat)
		}
		charts := js.Global().Get("Object").New()
		for name, svg := range analysisCharts(&a) {
			charts.Set(name, svg)
		}
		return charts, nil
	}))
	set("open", asyncFunc(func(ctx context.Context, _ []js.Value) (any, error) {
		if p.shelf == nil {
			p.open(ctx)
		}
		return jsonText(map[string]string{"storage": p.storage, "problem": p.problem})
	}))
	set("save", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		sc, err := scenarioArg(args, 0)
		if err != nil {
			return nil, err
		}
		an, _, err := analysisArg(args, 3)
		if err != nil {
			return nil, err
		}
		s, err := sh.SaveWith(ctx, sc, an, optString(args, 1), optString(args, 2))
		if err != nil {
			return nil, err
		}
		return jsonText(s)
	}))
	set("update", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		id, err := argString(args, 0, "id")
		if err != nil {
			return nil, err
		}
		sc, err := scenarioArg(args, 1)
		if err != nil {
			return nil, err
		}
		an, given, err := analysisArg(args, 2)
		if err != nil {
			return nil, err
		}
		var s store.Session
		if given {
			s, err = sh.UpdateWith(ctx, id, sc, an)
		} else {
			s, err = sh.Update(ctx, id, sc)
		}
		if err != nil {
			return nil, err
		}
		return jsonText(s)
	}))
	set("list", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		ss, err := sh.List(ctx, optString(args, 0))
		if err != nil {
			return nil, err
		}
		type entry struct {
			ID           string    `json:"id"`
			Name         string    `json:"name"`
			Note         string    `json:"note"`
			Created      time.Time `json:"created"`
			Modified     time.Time `json:"modified"`
			AnalysisFile string    `json:"analysis_file,omitempty"` // name of the analysed track file
		}
		out := make([]entry, len(ss))
		for i, s := range ss {
			out[i] = entry{s.ID, s.Name, s.Note, s.Created, s.Modified, ""}
			if s.Analysis != nil {
				out[i].AnalysisFile = s.Analysis.File.Name
			}
		}
		return jsonText(out)
	}))
	set("get", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		id, err := argString(args, 0, "id")
		if err != nil {
			return nil, err
		}
		s, err := sh.Get(ctx, id)
		if err != nil {
			return nil, err
		}
		return jsonText(s)
	}))
	set("rename", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		id, err := argString(args, 0, "id")
		if err != nil {
			return nil, err
		}
		s, err := sh.Rename(ctx, id, optString(args, 1), optString(args, 2))
		if err != nil {
			return nil, err
		}
		return jsonText(s)
	}))
	set("duplicate", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		id, err := argString(args, 0, "id")
		if err != nil {
			return nil, err
		}
		s, err := sh.Duplicate(ctx, id)
		if err != nil {
			return nil, err
		}
		return jsonText(s)
	}))
	set("remove", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		id, err := argString(args, 0, "id")
		if err != nil {
			return nil, err
		}
		s, err := sh.Remove(ctx, id)
		if err != nil {
			return nil, err
		}
		return jsonText(s)
	}))
	set("restore", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		text, err := argString(args, 0, "session")
		if err != nil {
			return nil, err
		}
		var s store.Session
		if err := json.Unmarshal([]byte(text), &s); err != nil {
			return nil, fmt.Errorf("restore: not a session: %v", err)
		}
		return nil, sh.Restore(ctx, s)
	}))
	set("exportSessions", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		var ids []string
		for _, a := range args {
			if a.Type() == js.TypeString {
				ids = append(ids, a.String())
			}
		}
		b, err := sh.Export(ctx, ids...)
		return string(b), err
	}))
	set("importSessions", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		text, err := argString(args, 0, "file")
		if err != nil {
			return nil, err
		}
		rep, err := sh.Import(ctx, []byte(text))
		if err != nil {
			return nil, err
		}
		return jsonText(rep)
	}))
	set("draft", p.withShelf(func(ctx context.Context, sh *store.Shelf, _ []js.Value) (any, error) {
		d, err := sh.Store().Draft(ctx)
		if err != nil || d == nil {
			return nil, err
		}
		return string(d), nil
	}))
	set("saveDraft", p.withShelf(func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error) {
		text, err := argString(args, 0, "draft")
		if err != nil {
			return nil, err
		}
		return nil, sh.Store().PutDraft(ctx, []byte(text))
	}))
	g.Set("sizebudgetCore", core)
	if f := g.Get("sizebudgetCoreReady"); f.Type() == js.TypeFunction {
		f.Invoke(core)
	}
}

// open opens the IndexedDB store, or falls back to memory and says why.
func (p *page) open(ctx context.Context) {
	var st store.Store
	db, err := openIDB(ctx)
	if err != nil {
		p.storage, p.problem = "memory", fmt.Sprintf("%v: %v", errNoDB, err)
		st = &store.Memory{}
	} else {
		p.storage = "indexeddb"
		st = db
	}
	p.shelf = store.NewShelf(st, time.Now)
}

// withShelf wraps a session function: it opens the store on first use.
func (p *page) withShelf(fn func(ctx context.Context, sh *store.Shelf, args []js.Value) (any, error)) js.Func {
	return asyncFunc(func(ctx context.Context, args []js.Value) (any, error) {
		if p.shelf == nil {
			p.open(ctx)
		}
		return fn(ctx, p.shelf, args)
	})
}

// scenarioArg reads and validates the scenario document in args[i].
func scenarioArg(args []js.Value, i int) (uncertainty.Scenario, error) {
	text, err := argString(args, i, "scenario")
	if err != nil {
		return uncertainty.Scenario{}, err
	}
	return uncertainty.ParseScenario([]byte(text))
}

// analysisArg reads the optional analysis in args[i]: the JSON text of a store.Analysis, or null to
// say "none". given is false when the argument is absent or undefined.
func analysisArg(args []js.Value, i int) (an *store.Analysis, given bool, err error) {
	if i >= len(args) || args[i].IsUndefined() {
		return nil, false, nil
	}
	if args[i].IsNull() {
		return nil, true, nil
	}
	text, err := argString(args, i, "analysis")
	if err != nil {
		return nil, false, err
	}
	an, err = store.ParseAnalysis([]byte(text))
	return an, true, err
}

// analysisValidation is the reply of validateAnalysis: ok with the settings as the engine reads them,
// or the first problem with the setting it concerns.
type analysisValidation struct {
	OK       bool                    `json:"ok"`
	Message  string                  `json:"message,omitempty"`
	Field    string                  `json:"field,omitempty"`
	Settings *store.AnalysisSettings `json:"settings,omitempty"`
}

// validateAnalysis checks analysis settings as the engine will, for validation as the user types.
func validateAnalysis(text string) string {
	st, err := store.ParseAnalysisSettings([]byte(text))
	v := analysisValidation{OK: true, Settings: &st}
	if err != nil {
		d := describe(err)
		v = analysisValidation{Message: d.Message, Field: d.Field}
	}
	out, err := jsonText(v)
	if err != nil {
		return `{"ok":false,"message":` + fmt.Sprintf("%q", err.Error()) + `}`
	}
	return out
}

// validation is the reply of validate: ok, or the first problem with the field it concerns. On
// success Scenario is the document with the defaults filled in.
type validation struct {
	OK       bool                  `json:"ok"`
	Message  string                `json:"message,omitempty"`
	Field    string                `json:"field,omitempty"`
	Scenario *uncertainty.Scenario `json:"scenario,omitempty"`
}

// validate checks a scenario document as the engine will, for validation as the user types.
func validate(text string) string {
	sc, err := uncertainty.ParseScenario([]byte(text))
	var v validation
	if err != nil {
		d := describe(err)
		v = validation{Message: d.Message, Field: d.Field}
	} else {
		v = validation{OK: true, Scenario: &sc}
	}
	out, err := jsonText(v)
	if err != nil {
		return `{"ok":false,"message":` + fmt.Sprintf("%q", err.Error()) + `}`
	}
	return out
}
