package chart

import (
	"encoding/xml"
	"flag"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// node is a parsed XML element.
type node struct {
	name xml.Name
	attr map[string]string
	kids []*node
	text string
}

// parse parses an SVG document with encoding/xml (strict mode), failing the test if it is not
// well-formed, and returns the root element.
func parse(t *testing.T, doc string) *node {
	t.Helper()
	d := xml.NewDecoder(strings.NewReader(doc))
	var stack []*node
	var root *node
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("not well-formed XML: %v\n%s", err, doc)
		}
		switch tok := tok.(type) {
		case xml.StartElement:
			n := &node{name: tok.Name, attr: map[string]string{}}
			for _, a := range tok.Attr {
				n.attr[a.Name.Local] = a.Value
			}
			if len(stack) > 0 {
				p := stack[len(stack)-1]
				p.kids = append(p.kids, n)
			} else if root == nil {
				root = n
			} else {
				t.Fatal("more than one root element")
			}
			stack = append(stack, n)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			if len(stack) > 0 {
				stack[len(stack)-1].text += string(tok)
			}
		case xml.ProcInst, xml.Directive:
			t.Fatalf("unexpected %T in output", tok)
		}
	}
	if root == nil {
		t.Fatal("no root element")
	}
	return root
}

// walk calls fn on n and all its descendants.
func (n *node) walk(fn func(*node)) {
	fn(n)
	for _, k := range n.kids {
		k.walk(fn)
	}
}

// all returns the descendants of n (and n) named name.
func (n *node) all(name string) []*node {
	var out []*node
	n.walk(func(m *node) {
		if m.name.Local == name {
			out = append(out, m)
		}
	})
	return out
}

// group returns the first <g> with the given class, or nil.
func (n *node) group(class string) *node {
	for _, g := range n.all("g") {
		if g.attr["class"] == class {
			return g
		}
	}
	return nil
}

// count returns the number of children of g named name (0 if g is nil).
func (g *node) count(name string) int {
	if g == nil {
		return 0
	}
	c := 0
	for _, k := range g.kids {
		if k.name.Local == name {
			c++
		}
	}
	return c
}

func (n *node) float(t *testing.T, key string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(n.attr[key], 64)
	if err != nil {
		t.Fatalf("<%s %s=%q>: %v", n.name.Local, key, n.attr[key], err)
	}
	return v
}

// checkDocument parses doc and checks what every chart must have: the SVG namespace, a viewBox,
// role="img", an aria-label and <title> equal to title, a non-empty <desc>, text at least 12 px tall
// when shown 360 px wide, and nothing a strict Content-Security-Policy would block.
func checkDocument(t *testing.T, doc, title string) *node {
	t.Helper()
	root := parse(t, doc)
	if root.name.Local != "svg" || root.name.Space != "http://www.w3.org/2000/svg" {
		t.Errorf("root is %v, want svg in the SVG namespace", root.name)
	}
	vb := strings.Fields(root.attr["viewBox"])
	if len(vb) != 4 || vb[0] != "0" || vb[1] != "0" {
		t.Fatalf("viewBox = %q", root.attr["viewBox"])
	}
	vw, _ := strconv.ParseFloat(vb[2], 64)
	if root.attr["role"] != "img" {
		t.Errorf("role = %q, want img", root.attr["role"])
	}
	if root.attr["aria-label"] != title {
		t.Errorf("aria-label = %q, want %q", root.attr["aria-label"], title)
	}
	if len(root.kids) < 2 || root.kids[0].name.Local != "title" || root.kids[1].name.Local != "desc" {
		t.Fatal("the first children are not <title> and <desc>")
	}
	if root.kids[0].text != title {
		t.Errorf("<title> = %q, want %q", root.kids[0].text, title)
	}
	if strings.TrimSpace(root.kids[1].text) == "" {
		t.Error("empty <desc>")
	}
	// 12 px at 360 px wide: a requirement of the brief for phones.
	if fs := root.float(t, "font-size"); fs*360/vw < 12 {
		t.Errorf("font-size %v in a viewBox %v wide is %.1f px at 360 px", fs, vw, fs*360/vw)
	}
	root.walk(func(n *node) {
		switch n.name.Local {
		case "script", "style", "foreignObject", "image", "use", "a":
			t.Errorf("forbidden element <%s>", n.name.Local)
		}
		for k := range n.attr {
			if strings.HasPrefix(k, "on") || k == "style" || k == "href" {
				t.Errorf("forbidden attribute %s on <%s>", k, n.name.Local)
			}
		}
		if fs, ok := n.attr["font-size"]; ok && n != root {
			t.Errorf("<%s> overrides font-size to %s", n.name.Local, fs)
		}
	})
	if strings.Contains(doc, "url(") || strings.Contains(doc, "@import") {
		t.Error("reference to an external resource")
	}
	return root
}

// golden compares got with testdata/name, or rewrites the file with -update.
func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./chart -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s (run with -update after checking the change)", path)
	}
}

// hostile is a label with every character XML escapes, a line break and a control character.
const hostile = "a<b & \"c\" 'd'>\ne\x01"

// hostileParsed is hostile as an XML parser reads it back from our output.
const hostileParsed = "a<b & \"c\" 'd'> e\uFFFD"

func TestEscape(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"plain µm²/s", "plain µm²/s"},
		{`<&>"'`, "&lt;&amp;&gt;&quot;&#39;"},
		{"a\tb\nc\rd", "a b c d"},
		{"nul\x00", "nul\uFFFD"},
		{"bad \xff utf-8", "bad \uFFFD utf-8"},
		{"\uFFFE", "\uFFFD"},
	} {
		if got := escape(c.in); got != c.want {
			t.Errorf("escape(%q) = %q, want %q", c.in, got, c.want)
		}
	}
	// Every escaped string must read back as itself inside text and inside an attribute.
	doc := `<r a="` + escape(hostile) + `">` + escape(hostile) + `</r>`
	root := parse(t, doc)
	if root.attr["a"] != hostileParsed || root.text != hostileParsed {
		t.Errorf("read back attribute %q, text %q, want %q", root.attr["a"], root.text, hostileParsed)
	}
}

func TestNum(t *testing.T) {
	for _, c := range []struct {
		x    float64
		want string
	}{
		{0, "0"}, {-0.04, "0"}, {0.04, "0"}, {math.Copysign(0, -1), "0"},
		{12.34, "12.3"}, {12.36, "12.4"}, {-7.25, "-7.3"}, {100, "100"}, {359.95, "360"},
	} {
		if got := num(c.x); got != c.want {
			t.Errorf("num(%v) = %q, want %q", c.x, got, c.want)
		}
	}
}

func TestFontSize(t *testing.T) {
	// 13 px at most widths a phone shows; larger viewBoxes get larger text so that it still renders
	// at 12 px or more when scaled down to 360 px.
	if got := fontSize(360); got != 13 {
		t.Errorf("fontSize(360) = %v, want 13", got)
	}
	if got := fontSize(640); got != 22 { // ceil(12·640/360) = ceil(21.33)
		t.Errorf("fontSize(640) = %v, want 22", got)
	}
	for w := minWidth; w <= maxWidth; w++ {
		if fs := fontSize(w); fs < 13 || fs*360/float64(w) < 12 {
			t.Fatalf("fontSize(%d) = %v renders at %.2f px at 360 px", w, fs, fs*360/float64(w))
		}
	}
}

func TestCheckSize(t *testing.T) {
	for _, c := range []struct {
		w, h int
		ok   bool
	}{
		{360, 240, true}, {240, 160, true}, {4000, 4000, true},
		{239, 240, false}, {360, 159, false}, {4001, 240, false}, {360, 4001, false}, {0, 0, false},
	} {
		if err := checkSize(c.w, c.h); (err == nil) != c.ok {
			t.Errorf("checkSize(%d, %d) = %v", c.w, c.h, err)
		}
	}
}
