package study

import (
	"flag"
	"math"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

var updateREADME = flag.Bool("update", false, "rewrite README.md's key tables from the schema")

// readmePath is the repository's README, from this package's directory.
const readmePath = "../../../../README.md"

// readmeColumns are the columns of each README key table, by the schema table it lists.
var readmeColumns = map[string][]string{
	"":                   {"key", "unit", "default", "rule"},
	"line":               {"key", "unit", "default", "rule"},
	"source":             {"key", "unit", "rule"},
	"shunt":              {"key", "rule"},
	"receiving":          {"key", "rule"},
	"scan":               {"key", "default", "rule"},
	"energise":           {"key", "default", "rule"},
	"loading":            {"key", "unit", "default", "rule"},
	"conductors.NAME":    {"key", "unit", "default", "rule"},
	"line.geometry":      {"key", "unit", "default", "rule"},
	"switching":          {"key", "unit", "default", "rule"},
	"switching.arrester": {"key", "unit", "rule"},
	"targets":            {"key", "unit", "rule"},
	"levers":             {"key", "unit", "rule", "cost units"},
	// a wire of phases and earth_wires
	"line.geometry.phases": {"key", "unit", "default", "rule"},
}

// readmeBlock is a key table in README.md: the lines between
// `<!-- schema: TABLE -->` and `<!-- /schema -->`.
var readmeBlock = regexp.MustCompile(`(?s)(<!-- schema: ([^ ]*) -->\n)(.*?)(<!-- /schema -->)`)

// README's key tables are the schema's: every table of the schema is in README.md once,
// and each reads as keyTable writes it. `go test -run TestREADMEKeyTables -update`
// rewrites them.
func TestREADMEKeyTables(t *testing.T) {
	t.Parallel()
	data, err := os.ReadFile(readmePath)
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]int{}
	out := readmeBlock.ReplaceAllStringFunc(string(data), func(block string) string {
		m := readmeBlock.FindStringSubmatch(block)
		name := m[2]
		if name == "top" {
			name = ""
		}
		seen[name]++
		want := keyTable(t, name)
		if m[3] != want && !*updateREADME {
			t.Errorf("README.md: the key table of [%s] differs from the schema (go test -run TestREADMEKeyTables -update rewrites it)\nREADME:\n%s\nschema:\n%s", name, m[3], want)
		}
		return m[1] + want + m[4]
	})
	for name := range readmeColumns {
		if seen[name] != 1 {
			t.Errorf("README.md has the key table of [%s] %d times, want once (<!-- schema: %s -->)", name, seen[name], name)
		}
	}
	if *updateREADME && out != string(data) {
		if err := os.WriteFile(readmePath, []byte(out), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// keyTable writes the markdown table of the schema's keys of table.
func keyTable(t *testing.T, table string) string {
	cols, ok := readmeColumns[table]
	if !ok {
		t.Fatalf("no README columns for [%s]", table)
	}
	var b strings.Builder
	b.WriteString("| " + strings.Join(cols, " | ") + " |\n")
	b.WriteString(strings.Repeat("|---", len(cols)) + "|\n")
	for _, k := range Schema {
		if k.Table != table || k.Hidden {
			continue
		}
		cells := make([]string, len(cols))
		for i, c := range cols {
			switch c {
			case "key":
				cells[i] = k.Row
				if cells[i] == "" {
					cells[i] = "`" + k.Name + "`"
				}
			case "unit":
				cells[i] = k.DocUnit
				if cells[i] == "" {
					cells[i] = strings.NewReplacer("uS", "µS", "us", "µs").Replace(k.Unit)
				}
			case "default":
				cells[i] = k.Default
				if cells[i] == "" {
					cells[i] = docNum(k.Def)
				}
			case "rule":
				cells[i] = docRule(t, k)
			case "cost units":
				cells[i] = k.Cost
			}
		}
		b.WriteString("|")
		for _, c := range cells {
			if c != "" {
				b.WriteString(" " + c)
			}
			b.WriteString(" |")
		}
		b.WriteString("\n")
	}
	return b.String()
}

// rulePlaceholder is {range}, {lo} or {hi}, with an optional key path.
var rulePlaceholder = regexp.MustCompile(`\{(range|lo|hi)( [a-z0-9_.A-Z]+)?\}`)

// docRule is the key's rule with the bounds written in.
func docRule(t *testing.T, k *Key) string {
	return rulePlaceholder.ReplaceAllStringFunc(k.Rule, func(p string) string {
		m := rulePlaceholder.FindStringSubmatch(p)
		b := k.Bounds
		if m[2] != "" {
			o := schemaIndex[strings.TrimSpace(m[2])]
			if o == nil {
				t.Fatalf("%s: rule names %q, not in the schema", k.Path(), m[2])
			}
			b = o.Bounds
		}
		switch m[1] {
		case "lo":
			return docNum(b.Lo)
		case "hi":
			return docNum(b.Hi)
		}
		r := docNum(b.Lo) + " to " + docNum(b.Hi)
		if b.ZeroOK {
			r = "0 or " + r
		}
		return r
	})
}

// docNum writes a number for README: powers of ten from 1e4 up and 1e-4 down as 1eN,
// others in the shortest form.
func docNum(v float64) string {
	if v != 0 {
		if e := math.Round(math.Log10(math.Abs(v))); math.Abs(e) >= 4 && math.Abs(v) == math.Pow(10, e) {
			s := "1e" + strconv.Itoa(int(e))
			if v < 0 {
				s = "-" + s
			}
			return s
		}
	}
	s := strconv.FormatFloat(v, 'g', -1, 64)
	s = strings.Replace(s, "e+0", "e", 1)
	s = strings.Replace(s, "e+", "e", 1)
	s = strings.Replace(s, "e-0", "e-", 1)
	return s
}

// Every key the parsers read with Table.Num, Table.Check or Table.SI is in the schema
// (lookup panics otherwise), and every schema key's bounds say something consistent.
func TestSchemaBounds(t *testing.T) {
	t.Parallel()
	for _, k := range Schema {
		b := k.Bounds
		if b.hasRange() && !(b.Lo <= b.Hi) {
			t.Errorf("%s: bounds %g > %g", k.Path(), b.Lo, b.Hi)
		}
		if b.AtMostFirst && !(b.Hi > 0) {
			t.Errorf("%s: AtMostFirst without an upper bound", k.Path())
		}
		if k.Alt != "" {
			a := schemaIndex[k.Table+"."+k.Alt]
			if a == nil || a.Alt != k.Name {
				t.Errorf("%s: alternative %q is not in the schema naming it back", k.Path(), k.Alt)
			}
		}
		if k.Def != 0 && b.hasRange() && b.problem(k.Def) != "" {
			t.Errorf("%s: default %g breaks its own bounds: %s", k.Path(), k.Def, b.problem(k.Def))
		}
	}
}

// The messages of Bounds.problem are those of Table.Positive, NonNegative, AtMost,
// Between and ZeroOr, the first bound broken.
func TestBoundsProblem(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		b    Bounds
		v    float64
		want string
	}{
		{Bounds{Lo: 1, Hi: 1e4, Positive: true, AtMostFirst: true}, -3, "must be > 0, got -3"},
		{Bounds{Lo: 1, Hi: 1e4, Positive: true, AtMostFirst: true}, 2e4, "must be at most 10000, got 20000"},
		{Bounds{Lo: 1, Hi: 1e4, Positive: true, AtMostFirst: true}, 0.5, "must be between 1 and 10000, got 0.5"},
		{Bounds{Lo: 1, Hi: 1e4, Positive: true, AtMostFirst: true}, 50, ""},
		{Bounds{Lo: 1e-6, Hi: 1000, ZeroOK: true, NonNegative: true}, -1, "must be >= 0, got -1"},
		{Bounds{Lo: 1e-6, Hi: 1000, ZeroOK: true, NonNegative: true}, 0, ""},
		{Bounds{Lo: 1e-6, Hi: 1000, ZeroOK: true, NonNegative: true}, 1e-320, "must be 0 or between 1e-06 and 1000, got 1e-320"},
		{Bounds{Positive: true}, 0, "must be > 0, got 0"},
		{Bounds{Positive: true}, 1e300, ""},
		{Bounds{Lo: -360, Hi: 360}, -361, "must be between -360 and 360, got -361"},
	} {
		if got := tc.b.problem(tc.v); got != tc.want {
			t.Errorf("%+v at %g: %q, want %q", tc.b, tc.v, got, tc.want)
		}
	}
}

// [switching] keeps its own list of keys (its order decides ties of the did-you-mean
// hint); it holds the schema's keys of the table and the [[switching.arrester]] array.
func TestSwitchingKeysInSchema(t *testing.T) {
	t.Parallel()
	want := append(tableKeys("switching"), "arrester")
	if len(want) != len(switchingKeys) {
		t.Errorf("switchingKeys has %d keys, the schema %d: %v against %v", len(switchingKeys), len(want), switchingKeys, want)
	}
	for _, k := range want {
		if !contains(switchingKeys, k) {
			t.Errorf("switchingKeys lacks the schema's %q", k)
		}
	}
}

// Every table of the schema is a top-level key the loader knows (rootKeys), and a
// section's name comes first among the line's keys (a single [line] drops it).
func TestSchemaTablesKnown(t *testing.T) {
	t.Parallel()
	for _, k := range Schema {
		top, _, _ := strings.Cut(k.Table, ".")
		if top == "" {
			top = k.Name
		}
		if !contains(rootKeys, top) {
			t.Errorf("%s: table %q is not in rootKeys", k.Path(), top)
		}
	}
	if sectionKeys[0] != "name" {
		t.Errorf("sectionKeys start with %q, want name", sectionKeys[0])
	}
}
