package report

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"html/template"
	"regexp"
	"unicode"
	"unicode/utf8"
)

// Verdict is the outcome of one part of a study, as the report shows it.
type Verdict int

// The verdicts of a report section.
const (
	Info    Verdict = iota // results without a limit to compare against
	Pass                   // within every limit checked
	Flagged                // a limit is exceeded or a value needs attention
	NotRun                 // this part cannot run for this study; Section.Reason says why
)

// String returns the word the report prints for v.
func (v Verdict) String() string {
	switch v {
	case Pass:
		return "within limits"
	case Flagged:
		return "flagged"
	case NotRun:
		return "not run"
	}
	return "results"
}

// Fact is one key figure of a section: a name and its value with the unit.
type Fact struct {
	Name  string
	Value string
	Flag  bool // the value exceeds a limit
}

// Figure is a plot of a section: the SVG bytes (inlined in the HTML as a data URI, so
// the page needs nothing beside it) and the name of the same plot's file in the folder.
type Figure struct {
	Title string
	File  string // file name beside report.html, e.g. "scan.svg"
	SVG   []byte
	Alt   string // text description for readers who cannot see the plot
}

// TableView is a table shown in a section, with a caption.
type TableView struct {
	Caption string
	*Table
}

// Section is one part of the report.
type Section struct {
	ID      string // anchor, e.g. "scan"
	Title   string
	Verdict Verdict
	Reading string // the result in one line, e.g. "first resonance at 4.1th harmonic, gain 6.3: above the limit of 2.0"
	Reason  string // why the part did not run (NotRun)
	Facts   []Fact
	Notes   []string // short paragraphs: methods, assumptions
	Tables  []TableView
	Figures []Figure
	Files   []string // data files of this part in the folder (CSV, COMTRADE)
}

// Document is a whole report: a title, the caution, and its sections in order.
type Document struct {
	Title      string
	StudyFile  string
	InputLabel string // what StudyFile is, e.g. "Line inventory"; default "Study file"
	Generator  string // e.g. "telegrapher 1.0"
	Caution    string
	Sections   []Section
}

// NonFinite returns where d holds a number printed as NaN or Inf (a bug upstream: no
// such value may reach an output), or "" when it holds none.
func NonFinite(d *Document) string {
	bad := func(s string) bool { return nonFinite.MatchString(s) }
	for _, s := range d.Sections {
		texts := append([]string{s.Reading, s.Reason}, s.Notes...)
		for _, f := range s.Facts {
			texts = append(texts, f.Value)
		}
		for _, t := range s.Tables {
			for _, r := range t.Rows {
				texts = append(texts, r...)
			}
		}
		for _, t := range texts {
			if bad(t) {
				return fmt.Sprintf("section %q: %q", s.Title, t)
			}
		}
	}
	return ""
}

var nonFinite = regexp.MustCompile(`\b(NaN|[+-]?Inf)\b`)

// HTML renders d as one self-contained HTML page: inline CSS, plots inlined as SVG
// data URIs, no scripts, nothing fetched from a network. It opens from disk in any
// browser.
func HTML(d *Document) ([]byte, error) {
	var b bytes.Buffer
	if err := pageTemplate.Execute(&b, d); err != nil {
		return nil, fmt.Errorf("report: rendering HTML: %w", err)
	}
	return b.Bytes(), nil
}

var pageTemplate = template.Must(template.New("page").Funcs(template.FuncMap{
	"dataURI": func(svg []byte) template.URL {
		return template.URL("data:image/svg+xml;base64," + base64.StdEncoding.EncodeToString(svg))
	},
	"sentence": sentence,
	"verdictClass": func(v Verdict) string {
		return [...]string{"info", "pass", "flag", "notrun"}[v]
	},
}).Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}}</title>
<style>
body{font-family:"Liberation Sans",Arial,Helvetica,sans-serif;margin:0;color:#1d2329;background:#f4f5f7;line-height:1.45}
main{max-width:1000px;margin:0 auto;padding:1.5rem 1.5rem 3rem;background:#fff;min-height:100vh}
h1{font-size:1.6rem;margin:.2rem 0 .3rem}
h2{font-size:1.25rem;margin:0 0 .4rem;display:flex;gap:.6rem;align-items:baseline;flex-wrap:wrap}
.sub{color:#5b6570;margin:0 0 1rem}
.caution{border-left:5px solid #b36b00;background:#fff6e5;padding:.6rem .9rem;margin:1rem 0;font-size:.95rem}
nav ol{columns:2;margin:.3rem 0 1rem;padding-left:1.4rem}
section{border-top:1px solid #d8dde3;padding:1.2rem 0 .6rem}
.badge{font-size:.75rem;font-weight:bold;text-transform:uppercase;letter-spacing:.04em;padding:.12rem .5rem;border-radius:.7rem;white-space:nowrap}
.badge.pass{background:#dff3e4;color:#17612c}.badge.flag{background:#fde2e1;color:#9b1c1c}
.badge.notrun{background:#e8eaed;color:#444}.badge.info{background:#e1ecfb;color:#1c4c8c}
.reading{font-size:1.05rem;margin:.2rem 0 .7rem}
.reading.flag{color:#9b1c1c}
dl.facts{display:grid;grid-template-columns:max-content 1fr;gap:.15rem 1.2rem;margin:.4rem 0 .8rem}
dl.facts dt{color:#5b6570}dl.facts dd{margin:0;font-variant-numeric:tabular-nums}
dd.flag{color:#9b1c1c;font-weight:bold}
table{border-collapse:collapse;margin:.4rem 0 1rem;font-size:.9rem;font-variant-numeric:tabular-nums}
caption{text-align:left;font-weight:bold;padding:.2rem 0}
th,td{border:1px solid #d8dde3;padding:.2rem .55rem;text-align:left;vertical-align:top}
th{background:#f0f2f5}
figure{margin:.6rem 0 1rem}
figure img{width:100%;height:auto;border:1px solid #e3e6ea;background:#fff}
figcaption{font-size:.85rem;color:#5b6570}
.notes p{font-size:.9rem;color:#3b444d;margin:.3rem 0}
.files{font-size:.85rem;color:#5b6570}
footer{margin-top:2rem;font-size:.85rem;color:#5b6570}
@media print{body{background:#fff}main{max-width:none}}
</style>
</head>
<body>
<main>
<header>
<h1>{{.Title}}</h1>
<p class="sub">{{if .InputLabel}}{{.InputLabel}}{{else}}Study file{{end}}: <code>{{.StudyFile}}</code>{{if .Generator}} &middot; made by {{.Generator}}{{end}}</p>
<p class="caution" id="caution">{{.Caution}}</p>
</header>
<nav aria-label="contents"><ol>
{{- range .Sections}}
<li><a href="#{{.ID}}">{{.Title}}</a> <span class="badge {{verdictClass .Verdict}}">{{.Verdict}}</span></li>
{{- end}}
</ol></nav>
{{range .Sections -}}
<section id="{{.ID}}" class="part">
<h2>{{.Title}} <span class="badge {{verdictClass .Verdict}}">{{.Verdict}}</span></h2>
{{if .Reading}}<p class="reading {{verdictClass .Verdict}}">{{.Reading}}</p>{{end}}
{{if .Reason}}<p class="reason"><strong>Not run for this study:</strong> {{.Reason}}</p>{{end}}
{{- if .Facts}}
<dl class="facts">
{{- range .Facts}}
<dt>{{.Name}}</dt><dd{{if .Flag}} class="flag"{{end}}>{{.Value}}</dd>
{{- end}}
</dl>
{{- end}}
{{- range .Figures}}
<figure>
<img src="{{dataURI .SVG}}" alt="{{.Alt}}">
<figcaption>{{.Title}}{{if .File}} (also in <a href="{{.File}}">{{.File}}</a>){{end}}</figcaption>
</figure>
{{- end}}
{{- range .Tables}}
<table>
{{if .Caption}}<caption>{{.Caption}}</caption>{{end}}
<thead><tr>{{range .Columns}}<th>{{.}}</th>{{end}}</tr></thead>
<tbody>
{{- range .Rows}}
<tr>{{range .}}<td>{{.}}</td>{{end}}</tr>
{{- end}}
</tbody>
</table>
{{- end}}
{{- if .Notes}}
<div class="notes">{{range .Notes}}<p>{{sentence .}}</p>{{end}}</div>
{{- end}}
{{- if .Files}}
<p class="files">Data: {{range $i, $f := .Files}}{{if $i}}, {{end}}<a href="{{$f}}">{{$f}}</a>{{end}}</p>
{{- end}}
</section>
{{end -}}
<footer>
<p>{{.Caution}}</p>
</footer>
</main>
</body>
</html>
`))

// sentence returns s with its first letter in upper case, for notes written as
// clauses.
func sentence(s string) string {
	r, n := utf8.DecodeRuneInString(s)
	if n == 0 || !unicode.IsLower(r) {
		return s
	}
	return string(unicode.ToUpper(r)) + s[n:]
}
