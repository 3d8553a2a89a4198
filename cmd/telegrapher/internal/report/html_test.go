package report

import (
	"bytes"
	"encoding/base64"
	"html"
	"math"
	"regexp"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
)

func testDocument(t *testing.T) *Document {
	t.Helper()
	p := plot.New()
	p.Title.Text = "test"
	l, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 1}})
	if err != nil {
		t.Fatal(err)
	}
	p.Add(l)
	svg, err := RenderPlot(p, 4*vg.Inch, 3*vg.Inch, "svg")
	if err != nil {
		t.Fatal(err)
	}
	tab := NewTable("harmonic", "gain")
	if err := tab.Add(5, 1.25); err != nil {
		t.Fatal(err)
	}
	return &Document{
		Title: "Line <A> & B", StudyFile: "study.toml", Generator: "telegrapher test",
		Caution: "Caution: screening only.",
		Sections: []Section{
			{ID: "scan", Title: "Harmonic scan", Verdict: Flagged, Reading: "gain 6.3 > 2.0 <script>",
				Facts:   []Fact{{Name: "first resonance", Value: "4.1th harmonic", Flag: true}},
				Figures: []Figure{{Title: "Gain", File: "scan.svg", SVG: svg, Alt: "gain over frequency"}},
				Tables:  []TableView{{Caption: "watched", Table: tab}},
				Files:   []string{"scan.csv"}},
			{ID: "switching", Title: "Switching", Verdict: NotRun, Reason: "no zero-sequence data"},
		},
	}
}

func TestHTMLSelfContained(t *testing.T) {
	t.Parallel()
	d := testDocument(t)
	page, err := HTML(d)
	if err != nil {
		t.Fatal(err)
	}
	s := string(page)
	checks := []struct {
		what string
		ok   bool
	}{
		{"no script element", !strings.Contains(strings.ToLower(s), "<script")},
		{"title escaped", strings.Contains(s, "Line &lt;A&gt; &amp; B")},
		{"caution twice (top and foot)", strings.Count(s, d.Caution) == 2},
		{"both sections", strings.Contains(s, `id="scan"`) && strings.Contains(s, `id="switching"`)},
		{"reason of a part not run", strings.Contains(s, "no zero-sequence data")},
		{"flagged fact marked", strings.Contains(s, `<dd class="flag">4.1th harmonic</dd>`)},
		{"table cell", strings.Contains(s, "<td>1.25</td>")},
		{"link to the data file", strings.Contains(s, `href="scan.csv"`)},
	}
	for _, c := range checks {
		if !c.ok {
			t.Errorf("HTML: %s: failed", c.what)
		}
	}
	// Nothing is fetched: every src and href is a data URI, a fragment or a plain
	// file name beside the page.
	for _, m := range regexp.MustCompile(`(?:src|href)="([^"]*)"`).FindAllStringSubmatch(s, -1) {
		u := html.UnescapeString(m[1])
		if strings.HasPrefix(u, "data:image/svg+xml;base64,") {
			raw, err := base64.StdEncoding.DecodeString(strings.TrimPrefix(u, "data:image/svg+xml;base64,"))
			if err != nil || !bytes.Contains(raw, []byte("<svg")) {
				t.Errorf("data URI does not hold an SVG: %v", err)
			}
			continue
		}
		if strings.Contains(u, ":") || strings.Contains(u, "/") {
			t.Errorf("reference %q leaves the folder", u)
		}
	}
}

func TestMarkdownSummary(t *testing.T) {
	t.Parallel()
	md := string(Markdown(testDocument(t)))
	for _, want := range []string{
		"# Line \\<A\\> & B", "> Caution: screening only.", "| Harmonic scan | flagged |",
		"- first resonance: 4.1th harmonic **(flagged)**", "Not run for this study: no zero-sequence data",
		"`scan.csv`",
	} {
		if !strings.Contains(md, want) {
			t.Errorf("summary lacks %q:\n%s", want, md)
		}
	}
}

func TestTableCSV(t *testing.T) {
	t.Parallel()
	tab := NewTable("f_hz", "gain", "name")
	if err := tab.Add(50.0, 1.0/3, "a,b"); err != nil {
		t.Fatal(err)
	}
	if err := tab.Add(math.Inf(1), 1.0, "x"); err == nil {
		t.Error("Add accepted an infinite value")
	}
	want := "f_hz,gain,name\n50,0.3333333333333333,\"a,b\"\n"
	if got := string(tab.CSV()); got != want {
		t.Errorf("CSV = %q, want %q", got, want)
	}
}

func TestNonFinite(t *testing.T) {
	t.Parallel()
	d := testDocument(t)
	if w := NonFinite(d); w != "" {
		t.Fatalf("clean document flagged: %s", w)
	}
	for _, bad := range []string{"gain NaN", "peak +Inf pu", "-Inf"} {
		d := testDocument(t)
		d.Sections[0].Facts = append(d.Sections[0].Facts, Fact{Name: "x", Value: bad})
		if NonFinite(d) == "" {
			t.Errorf("%q not caught", bad)
		}
	}
	d.Sections[0].Notes = []string{"Information on infinite buses"}
	if w := NonFinite(d); w != "" {
		t.Errorf("plain words flagged: %s", w)
	}
}
