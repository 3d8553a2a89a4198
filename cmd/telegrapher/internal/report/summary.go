package report

import (
	"bytes"
	"fmt"
	"strings"
)

// Markdown renders the key figures of d as a short Markdown summary: the title, the
// caution, and for each section its verdict, its one-line reading (or why it did not
// run), its facts and its data files. Plots and long tables stay in the HTML report.
func Markdown(d *Document) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "# %s\n\n", mdEscape(d.Title))
	if d.StudyFile != "" {
		label := d.InputLabel
		if label == "" {
			label = "Study file"
		}
		fmt.Fprintf(&b, "%s: `%s`", label, d.StudyFile)
		if d.Generator != "" {
			fmt.Fprintf(&b, " (made by %s)", d.Generator)
		}
		b.WriteString("\n\n")
	}
	fmt.Fprintf(&b, "> %s\n\n", mdEscape(d.Caution))
	b.WriteString("| part | verdict | reading |\n|---|---|---|\n")
	for _, s := range d.Sections {
		r := s.Reading
		if s.Verdict == NotRun && r == "" {
			r = s.Reason
		}
		fmt.Fprintf(&b, "| %s | %s | %s |\n", mdCell(s.Title), s.Verdict, mdCell(r))
	}
	b.WriteString("\n")
	for _, s := range d.Sections {
		fmt.Fprintf(&b, "## %s (%s)\n\n", mdEscape(s.Title), s.Verdict)
		if s.Reading != "" {
			fmt.Fprintf(&b, "%s\n\n", mdEscape(s.Reading))
		}
		if s.Reason != "" {
			fmt.Fprintf(&b, "Not run for this study: %s\n\n", mdEscape(s.Reason))
		}
		for _, f := range s.Facts {
			mark := ""
			if f.Flag {
				mark = " **(flagged)**"
			}
			fmt.Fprintf(&b, "- %s: %s%s\n", mdEscape(f.Name), mdEscape(f.Value), mark)
		}
		if len(s.Facts) > 0 {
			b.WriteString("\n")
		}
		if len(s.Files) > 0 {
			names := make([]string, len(s.Files))
			for i, f := range s.Files {
				names[i] = "`" + f + "`"
			}
			fmt.Fprintf(&b, "Files: %s\n\n", strings.Join(names, ", "))
		}
	}
	return b.Bytes()
}

// mdEscape escapes the Markdown characters that would change the meaning of plain
// text (emphasis, code, links, HTML).
func mdEscape(s string) string {
	r := strings.NewReplacer(`\`, `\\`, "*", `\*`, "_", `\_`, "`", "\\`", "[", `\[`, "]", `\]`, "<", `\<`, ">", `\>`)
	return r.Replace(s)
}

// mdCell is mdEscape for a table cell: pipes escaped, line breaks removed.
func mdCell(s string) string {
	return strings.ReplaceAll(strings.ReplaceAll(mdEscape(s), "|", `\|`), "\n", " ")
}
