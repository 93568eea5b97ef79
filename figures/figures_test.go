package figures

import (
	"context"
	"encoding/xml"
	"io"
	"strings"
	"testing"

	"sizebudget/uncertainty"
)

// wellFormed parses an SVG document with encoding/xml in strict mode.
func wellFormed(t *testing.T, name, doc string) {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(doc))
	for {
		_, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s: not well-formed: %v", name, err)
		}
	}
	if !strings.Contains(doc, "<svg") || !strings.Contains(doc, "<title>") {
		t.Errorf("%s: no svg or title element", name)
	}
}

func TestPlanFigures(t *testing.T) {
	s := uncertainty.Demo()
	s.Trials = 2000
	p, err := uncertainty.Plan(context.Background(), s, uncertainty.PlanOptions{})
	if err != nil {
		t.Fatal(err)
	}
	h, err := PlanHistogram(p)
	if err != nil {
		t.Fatal(err)
	}
	wellFormed(t, "histogram", h)
	if !strings.Contains(h, "95 % coverage interval") || !strings.Contains(h, "2000 trials") {
		t.Error("histogram lacks its interval or trial count")
	}
	c, err := PlanCurve(p)
	if err != nil {
		t.Fatal(err)
	}
	wellFormed(t, "curve", c)
	if !strings.Contains(c, "recommended: 75 frames") {
		t.Error("curve lacks the recommendation")
	}
	b, err := BudgetBars(p.Budget)
	if err != nil {
		t.Fatal(err)
	}
	wellFormed(t, "budget", b)
	if n := strings.Count(b, "<rect"); n < len(p.Budget) {
		t.Errorf("%d rects for %d budget lines", n, len(p.Budget))
	}
	p.Curve = nil
	if _, err := PlanCurve(p); err == nil {
		t.Error("no error without a curve")
	}
}
