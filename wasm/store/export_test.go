package store

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"sizebudget/uncertainty"
)

func TestExportImportRoundTrip(t *testing.T) {
	ctx := context.Background()
	src, _ := newTestShelf()
	a, _ := src.Save(ctx, uncertainty.Demo(), "Beads", "first")
	glyc := uncertainty.Demo()
	glyc.Medium, glyc.GlycerolMassFraction = "glycerol", 0.4
	b, err := src.Save(ctx, glyc, "Beads in glycerol", "")
	if err != nil {
		t.Fatal(err)
	}
	file, err := src.Export(ctx)
	if err != nil {
		t.Fatal(err)
	}
	dst, _ := newTestShelf()
	rep, err := dst.Import(ctx, file)
	if err != nil {
		t.Fatal(err)
	}
	if rep.Added != 2 || rep.Unchanged != 0 || len(rep.Renamed) != 0 {
		t.Fatalf("Import report %+v; want 2 added", rep)
	}
	for _, want := range []Session{a, b} {
		got, err := dst.Get(ctx, want.ID)
		if err != nil || !same(got, want) {
			t.Errorf("imported %q = %+v, %v; want %+v", want.ID, got, err, want)
		}
	}
	// Importing the same file again changes nothing.
	rep, err = dst.Import(ctx, file)
	if err != nil || rep.Added != 0 || rep.Unchanged != 2 {
		t.Fatalf("second Import: %+v, %v; want 2 unchanged", rep, err)
	}
	// A changed session with a taken id comes in under a new id.
	if _, err := dst.Rename(ctx, a.ID, "Beads, renamed here", ""); err != nil {
		t.Fatal(err)
	}
	rep, err = dst.Import(ctx, file)
	if err != nil || rep.Added != 1 || rep.Unchanged != 1 || len(rep.Renamed) != 1 || rep.Renamed[0] != a.ID {
		t.Fatalf("Import over a changed session: %+v, %v", rep, err)
	}
	if all, _ := dst.List(ctx, ""); len(all) != 3 {
		t.Fatalf("%d sessions after the third import; want 3", len(all))
	}
	// Export of one session.
	one, err := src.Export(ctx, b.ID)
	if err != nil {
		t.Fatal(err)
	}
	ss, err := ReadExport(one)
	if err != nil || len(ss) != 1 || ss[0].ID != b.ID {
		t.Fatalf("Export(one) read back as %v, %v", names(ss), err)
	}
}

func TestImportTestdata(t *testing.T) {
	ctx := context.Background()
	good, err := os.ReadFile(filepath.Join("testdata", "sessions-good.json"))
	if err != nil {
		t.Fatal(err)
	}
	sh, _ := newTestShelf()
	rep, err := sh.Import(ctx, good)
	if err != nil {
		t.Fatal(err)
	}
	if rep.Added != 2 {
		t.Fatalf("good file: %+v", rep)
	}
	// Every bad file is refused with a message naming the problem, and the shelf keeps exactly what it had.
	for _, tc := range []struct{ file, want string }{
		{"sessions-bad-scenario.json", "session 2"},
		{"sessions-bad-scenario.json", "frames"},
		{"sessions-bad-format.json", "newer"},
		{"sessions-bad-json.json", "not a sizebudget sessions file"},
		{"sessions-bad-dupid.json", "used by session 1"},
		{"sessions-bad-field.json", "unknown field"},
	} {
		data, err := os.ReadFile(filepath.Join("testdata", tc.file))
		if err != nil {
			t.Fatal(err)
		}
		before := snapshot(t, sh)
		_, err = sh.Import(ctx, data)
		var ie *ImportError
		if !errors.As(err, &ie) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v; want an ImportError mentioning %q", tc.file, err, tc.want)
		}
		if after := snapshot(t, sh); !bytes.Equal(before, after) {
			t.Errorf("%s: a refused import changed the shelf", tc.file)
		}
	}
}

// snapshot returns the JSON of every session on the shelf, newest first.
func snapshot(t *testing.T, sh *Shelf) []byte {
	t.Helper()
	all, err := sh.List(context.Background(), "")
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(all)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestImportFieldErrorSurvives(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("testdata", "sessions-bad-scenario.json"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = ReadExport(data)
	var fe *uncertainty.FieldError
	if !errors.As(err, &fe) || fe.Field != "frames" {
		t.Fatalf("err = %v; want it to wrap the scenario's FieldError on frames", err)
	}
}

func FuzzReadExport(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("testdata", "sessions-*.json"))
	for _, name := range files {
		data, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		ss, err := ReadExport(data)
		if err != nil {
			var ie *ImportError
			if !errors.As(err, &ie) {
				t.Fatalf("error of type %T, want *ImportError: %v", err, err)
			}
			return
		}
		// What was accepted exports and reads back to the same sessions.
		sh, _ := newTestShelf()
		if err := sh.Store().Put(context.Background(), ss...); err != nil {
			t.Fatal(err)
		}
		out, err := sh.Export(context.Background())
		if err != nil {
			t.Fatal(err)
		}
		back, err := ReadExport(out)
		if err != nil {
			t.Fatalf("re-read of an accepted file: %v", err)
		}
		if len(back) != len(ss) {
			t.Fatalf("%d sessions came back of %d", len(back), len(ss))
		}
		for _, s := range back {
			var orig Session
			for _, o := range ss {
				if o.ID == s.ID {
					orig = o
				}
			}
			if !same(orig, s) {
				a, _ := json.Marshal(orig)
				b, _ := json.Marshal(s)
				t.Fatalf("round trip changed a session:\n%s\n%s", a, b)
			}
		}
	})
}
