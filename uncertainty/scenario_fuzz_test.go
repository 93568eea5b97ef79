package uncertainty

import (
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// FuzzScenarioFile feeds arbitrary bytes to ParseScenario. It must never panic; whatever it accepts
// must be valid, and must survive Marshal → ParseScenario unchanged (an empty track_lengths list
// reads back as none, which means the same). Seeds: the scenario documents of testdata/scenarios and
// variations of the demo scenario.
func FuzzScenarioFile(f *testing.F) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "scenarios", "*.json"))
	if err != nil {
		f.Fatal(err)
	}
	for _, path := range files {
		b, err := os.ReadFile(path)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	demo, err := Demo().Marshal()
	if err != nil {
		f.Fatal(err)
	}
	f.Add(demo)
	with := func(old, new string) []byte { return []byte(strings.Replace(string(demo), old, new, 1)) }
	f.Add(with(`"medium": "water"`, `"medium": "custom", "viscosity_mPa_s": 1.2, "viscosity_reference_C": 20, "viscosity_relative_u": 0`))
	f.Add(with(`"medium": "water"`, `"medium": "glycerol", "glycerol_mass_fraction": 0.4`))
	f.Add(with(`"frames": 60`, `"frames": 0, "track_lengths": [{"frames": 20, "count": 5}, {"frames": 60, "count": 3}]`))
	f.Add(with(`"tracks": 100`, `"tracks": 100, "track_lengths": []`))
	f.Add(with(Format, "sizebudget/scenario/9"))
	f.Add(with(`"seed": 1`, `"seed": 1, "reported_radius_nm": 82, "reported_u_nm": 1, "reported_k": 2`))
	f.Add([]byte(`{"format": "sizebudget/scenario/1"}`))
	f.Add([]byte(`{"format": null}`))
	f.Add([]byte(`{"format": "sizebudget/scenario/1", "radius_nm": 1e400}`))
	f.Add([]byte("\xff\xfe"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ParseScenario(data)
		if err != nil {
			return
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("accepted a document Validate refuses: %v", err)
		}
		b, err := s.Marshal()
		if err != nil {
			t.Fatalf("Marshal: %v", err)
		}
		back, err := ParseScenario(b)
		if err != nil {
			t.Fatalf("the marshalled document is refused: %v\n%s", err, b)
		}
		if len(s.TrackLengths) == 0 {
			s.TrackLengths = nil
		}
		if !reflect.DeepEqual(back, s) {
			t.Fatalf("round trip changed the document:\n got %+v\nwant %+v", back, s)
		}
	})
}
