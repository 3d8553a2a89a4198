package study

// The table reader: typed, checked access to one decoded TOML table, with key paths in
// every message and unknown-key reporting with a did-you-mean hint. The core loader
// (load.go) and every table parser (see the top of load.go) use it.
//
// Problems are collected: each is recorded in the Loader (one per key path, at most
// MaxErrors) and reading goes on, so a file with several mistakes gets them all in one
// message. A parser gates a check that depends on an earlier value on that value being
// good (ld.Failed, or a mark taken before reading it). Keys are visited in a fixed order so the problems come in the same order.

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Loader carries the state of one load: the file name, the study being built, the
// problems found so far.
type Loader struct {
	File  string // the study file as given, for messages
	Study *Study // the study being built; filled in stage order

	root    *Table
	errs    []*Error        // problems in the order found, at most MaxErrors
	omitted int             // problems beyond MaxErrors
	dropped int             // second problems of a key already reported (not shown)
	keys    map[string]bool // key paths with a problem: one problem per key
}

// Err returns nil, or every problem recorded as one *Error (see Error).
func (ld *Loader) Err() error {
	if len(ld.errs) == 0 {
		return nil
	}
	first := *ld.errs[0]
	first.Others = append([]*Error(nil), ld.errs[1:]...)
	first.Omitted = ld.omitted
	return &first
}

// Failed reports whether a problem has been recorded.
func (ld *Loader) Failed() bool { return len(ld.errs) > 0 }

// mark returns a position in the list of problems, for failedSince.
func (ld *Loader) mark() int { return len(ld.errs) + ld.omitted + ld.dropped }

// failedSince reports whether a problem was recorded after mark m: a check that
// depends on values read since m is skipped then, so one mistake gives one message.
func (ld *Loader) failedSince(m int) bool { return ld.mark() > m }

// add records e unless its key already has a problem (the first one per key is kept,
// so a missing key is not also reported as out of range).
func (ld *Loader) add(e *Error) {
	if ld.keys == nil {
		ld.keys = map[string]bool{}
	}
	for _, o := range ld.errs {
		if o.File == e.File && o.Key == e.Key && o.Line == e.Line && o.Msg == e.Msg && o.text == e.text {
			return // a parser returning ld.Err() hands back what is recorded already
		}
	}
	if e.Key != "" {
		if ld.keys[e.Key] {
			ld.dropped++
			return
		}
		ld.keys[e.Key] = true
	}
	if len(ld.errs) >= MaxErrors {
		ld.omitted++
		return
	}
	ld.errs = append(ld.errs, e)
}

// Fail records err. A non-*Error is kept with its text and attributed to key; an
// *Error carrying others (a nested load) adds each of them.
func (ld *Loader) Fail(key string, err error) {
	if err == nil {
		return
	}
	e := wrapParserError(ld.File, key, err)
	others, omitted := e.Others, e.Omitted
	if len(others) > 0 || omitted > 0 {
		c := *e
		c.Others, c.Omitted = nil, 0
		e = &c
	}
	ld.add(e)
	for _, o := range others {
		ld.add(o)
	}
	ld.omitted += omitted
}

// Errorf records the problem `FILE: key: problem`.
func (ld *Loader) Errorf(key, format string, a ...any) {
	ld.add(&Error{File: ld.File, Key: key, Msg: fmt.Sprintf(format, a...)})
}

// Root returns the whole file as a table.
func (ld *Loader) Root() *Table { return ld.root }

// Note adds an entry to Study.Understood for `check`: the key path, the value as
// understood with its unit, and how it was obtained ("given", "default", or a
// derivation).
func (ld *Loader) Note(key, value, how string) {
	ld.Study.Understood = append(ld.Study.Understood, Entry{Key: key, Value: value, How: how})
}

// Table is one decoded TOML table at a key path. An absent table is a Table with no
// keys (Present reports false), so defaults apply the same way to both.
type Table struct {
	ld   *Loader
	path string // "" for the root
	m    map[string]any
}

// Path returns the table's key path ("" for the whole file).
func (t *Table) Path() string { return t.path }

// Present reports whether the table was in the file.
func (t *Table) Present() bool { return t.m != nil }

// Loader returns the load the table belongs to.
func (t *Table) Loader() *Loader { return t.ld }

// KeyPath returns the full key path of key in this table.
func (t *Table) KeyPath(key string) string {
	key = tomlKey(key)
	if t.path == "" {
		return key
	}
	return t.path + "." + key
}

// tomlKey writes a key as TOML would: bare when it is made of A-Z a-z 0-9 _ - (and
// the . [ ] of the sub-paths and indices the parsers append), quoted otherwise (the
// empty key "" among them), so every key path names its key.
func tomlKey(k string) string {
	if k == "" {
		return `""`
	}
	for _, r := range k {
		if !(r >= 'A' && r <= 'Z' || r >= 'a' && r <= 'z' || r >= '0' && r <= '9' || r == '_' || r == '-' || r == '.' || r == '[' || r == ']') {
			return strconv.Quote(k)
		}
	}
	return k
}

// Has reports whether key is given.
func (t *Table) Has(key string) bool {
	_, ok := t.m[key]
	return ok
}

// Raw returns the decoded value of key as the TOML decoder gave it (int64, float64,
// string, bool, []any, map[string]any, []map[string]any, dates).
func (t *Table) Raw(key string) (any, bool) {
	v, ok := t.m[key]
	return v, ok
}

// Map returns the decoded table itself, for parsers written against plain maps.
func (t *Table) Map() map[string]any { return t.m }

// Errorf records the error `FILE: path.key: problem`.
func (t *Table) Errorf(key, format string, a ...any) {
	t.ld.Errorf(t.KeyPath(key), format, a...)
}

// Float returns the number at key (integer or float in the file) and whether it is
// given. NaN and infinities are rejected, as are other types.
func (t *Table) Float(key string) (float64, bool) {
	v, ok := t.m[key]
	if !ok {
		return 0, false
	}
	f, good := toFloat(v)
	if !good {
		t.Errorf(key, "must be a number, got %s", describe(v))
		return 0, false
	}
	if math.IsNaN(f) || math.IsInf(f, 0) {
		t.Errorf(key, "must be a finite number, got %v", f)
		return 0, false
	}
	return f, true
}

// Int returns the integer at key and whether it is given; a float with an integral
// value is accepted.
func (t *Table) Int(key string) (int64, bool) {
	v, ok := t.m[key]
	if !ok {
		return 0, false
	}
	n, good := toInt(v)
	if !good {
		t.Errorf(key, "must be an integer, got %s", describe(v))
		return 0, false
	}
	return n, true
}

// String returns the string at key and whether it is given.
func (t *Table) String(key string) (string, bool) {
	v, ok := t.m[key]
	if !ok {
		return "", false
	}
	s, good := v.(string)
	if !good {
		t.Errorf(key, "must be a string, got %s", describe(v))
		return "", false
	}
	return s, true
}

// Bool returns the boolean at key and whether it is given.
func (t *Table) Bool(key string) (bool, bool) {
	v, ok := t.m[key]
	if !ok {
		return false, false
	}
	b, good := v.(bool)
	if !good {
		t.Errorf(key, "must be true or false, got %s", describe(v))
		return false, false
	}
	return b, true
}

// Floats returns the array of numbers at key and whether it is given; every element
// must be a finite number.
func (t *Table) Floats(key string) ([]float64, bool) {
	arr, ok := t.array(key)
	if !ok {
		return nil, false
	}
	out := make([]float64, len(arr))
	for i, v := range arr {
		f, good := toFloat(v)
		if !good || math.IsNaN(f) || math.IsInf(f, 0) {
			t.Errorf(fmt.Sprintf("%s[%d]", key, i), "must be a finite number, got %s", describe(v))
			return nil, false
		}
		out[i] = f
	}
	return out, true
}

// Ints returns the array of integers at key and whether it is given.
func (t *Table) Ints(key string) ([]int64, bool) {
	arr, ok := t.array(key)
	if !ok {
		return nil, false
	}
	out := make([]int64, len(arr))
	for i, v := range arr {
		n, good := toInt(v)
		if !good {
			t.Errorf(fmt.Sprintf("%s[%d]", key, i), "must be an integer, got %s", describe(v))
			return nil, false
		}
		out[i] = n
	}
	return out, true
}

func (t *Table) array(key string) ([]any, bool) {
	v, ok := t.m[key]
	if !ok {
		return nil, false
	}
	arr, good := v.([]any)
	if !good {
		t.Errorf(key, "must be an array, got %s", describe(v))
		return nil, false
	}
	if len(arr) > maxArray {
		t.Errorf(key, "must have at most %d elements, got %d", maxArray, len(arr))
		return nil, false
	}
	return arr, true
}

// maxArray caps every array in a study file.
const maxArray = 10000

// Sub returns the sub-table at key; an absent key gives an absent (empty) table.
// A value that is not a table is an error.
func (t *Table) Sub(key string) *Table {
	sub := &Table{ld: t.ld, path: t.KeyPath(key)}
	v, ok := t.m[key]
	if !ok {
		return sub
	}
	m, good := v.(map[string]any)
	if !good {
		t.Errorf(key, "must be a table, got %s", describe(v))
		return sub
	}
	sub.m = m
	return sub
}

// Subs returns the array of tables at key ([[key]] or key = [{...}, ...]), with paths
// key[0], key[1], ...; nil when absent.
func (t *Table) Subs(key string) []*Table {
	v, ok := t.m[key]
	if !ok {
		return nil
	}
	var maps []map[string]any
	switch a := v.(type) {
	case []map[string]any:
		maps = a
	case []any:
		for i, e := range a {
			m, good := e.(map[string]any)
			if !good {
				t.Errorf(fmt.Sprintf("%s[%d]", key, i), "must be a table, got %s", describe(e))
				return nil
			}
			maps = append(maps, m)
		}
	default:
		t.Errorf(key, "must be an array of tables ([[%s]]), got %s", t.KeyPath(key), describe(v))
		return nil
	}
	if len(maps) > maxArray {
		t.Errorf(key, "must have at most %d entries, got %d", maxArray, len(maps))
		return nil
	}
	out := make([]*Table, len(maps))
	for i, m := range maps {
		if m == nil {
			m = map[string]any{}
		}
		out[i] = &Table{ld: t.ld, path: fmt.Sprintf("%s[%d]", t.KeyPath(key), i), m: m}
	}
	return out
}

// Known reports every key of the table (in sorted order) that is not in known, as
// `unknown key` with a did-you-mean hint.
// When the hint names a key the table lacks, that key counts as reported: the typo
// is the one mistake, not also a missing key.
func (t *Table) Known(known ...string) {
	for _, k := range orderedKeys(t.m) {
		if !contains(known, k) {
			t.Errorf(k, "unknown key%s; known here: %s", DidYouMean(k, known), strings.Join(known, ", "))
			if c := closest(k, known); c != "" && !t.Has(c) {
				t.ld.keys[t.KeyPath(c)] = true // keys is made by the Errorf above
			}
		}
	}
}

// Positive checks v > 0.
func (t *Table) Positive(key string, v float64) {
	if !(v > 0) {
		t.Errorf(key, "must be > 0, got %s", num(v))
	}
}

// NonNegative checks v >= 0.
func (t *Table) NonNegative(key string, v float64) {
	if !(v >= 0) {
		t.Errorf(key, "must be >= 0, got %s", num(v))
	}
}

// AtMost checks v <= max.
func (t *Table) AtMost(key string, v, max float64) {
	if !(v <= max) {
		t.Errorf(key, "must be at most %s, got %s", num(max), num(v))
	}
}

// Between checks lo <= v <= hi.
func (t *Table) Between(key string, v, lo, hi float64) {
	if !(v >= lo && v <= hi) {
		t.Errorf(key, "must be between %s and %s, got %s", num(lo), num(hi), num(v))
	}
}

// ZeroOr checks v == 0 or lo <= v <= hi: a quantity that may be zero (none, lossless)
// but, when present, must be large enough to mean something to the numerics.
func (t *Table) ZeroOr(key string, v, lo, hi float64) {
	if v != 0 && !(v >= lo && v <= hi) {
		t.Errorf(key, "must be 0 or between %s and %s, got %s", num(lo), num(hi), num(v))
	}
}

// OneOf checks that s is one of the options.
func (t *Table) OneOf(key, s string, options ...string) {
	if contains(options, s) {
		return
	}
	q := make([]string, len(options))
	for i, o := range options {
		q[i] = strconv.Quote(o)
	}
	t.Errorf(key, "must be %s, got %q%s", strings.Join(q, " or "), s, DidYouMean(s, options))
}

// Exclusive checks that at most one of the keys is given and returns the one given
// ("" for none).
func (t *Table) Exclusive(keys ...string) string {
	var given []string
	for _, k := range keys {
		if t.Has(k) {
			given = append(given, k)
		}
	}
	if len(given) > 1 {
		t.Errorf(given[1], "%s and %s are alternatives; give one of them, not both", t.KeyPath(given[0]), t.KeyPath(given[1]))
		return ""
	}
	if len(given) == 1 {
		return given[0]
	}
	return ""
}

// num formats a number for a message.
func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func toFloat(v any) (float64, bool) {
	switch x := v.(type) {
	case int64:
		return float64(x), true
	case float64:
		return x, true
	}
	return 0, false
}

func toInt(v any) (int64, bool) {
	switch x := v.(type) {
	case int64:
		return x, true
	case float64:
		if x == math.Trunc(x) && math.Abs(x) < 1<<53 {
			return int64(x), true
		}
	}
	return 0, false
}

// describe names the TOML type of v, with the value for scalars.
func describe(v any) string {
	switch x := v.(type) {
	case string:
		return fmt.Sprintf("the string %q", clip(x))
	case bool:
		return fmt.Sprintf("the boolean %v", x)
	case int64:
		return fmt.Sprintf("the integer %d", x)
	case float64:
		return fmt.Sprintf("the number %v", x)
	case []any:
		return fmt.Sprintf("an array of %d elements", len(x))
	case []map[string]any:
		return fmt.Sprintf("an array of %d tables", len(x))
	case map[string]any:
		return "a table"
	case nil:
		return "nothing"
	}
	return fmt.Sprintf("a date or time (%v)", v)
}

func clip(s string) string {
	if len(s) > 40 {
		return s[:40] + "..."
	}
	return s
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func orderedKeys(m map[string]any) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// DidYouMean returns ` (did you mean "x"?)` for the closest candidate within an edit
// distance of about a third of the word (at least 2), or "". The CLI uses it for
// command and CSV column names too.
func DidYouMean(s string, candidates []string) string {
	best := closest(s, candidates)
	if best == "" {
		return ""
	}
	return fmt.Sprintf(" (did you mean %q?)", best)
}

// closest is the candidate DidYouMean suggests, or "".
func closest(s string, candidates []string) string {
	best, bestD := "", max(2, len(s)/3)+1
	for _, c := range candidates {
		if d := levenshtein(s, c); d < bestD {
			best, bestD = c, d
		}
	}
	return best
}

// levenshtein is the edit distance between a and b (insertions, deletions,
// substitutions), on bytes; long inputs are clipped to keep it cheap.
func levenshtein(a, b string) int {
	if len(a) > 64 {
		a = a[:64]
	}
	if len(b) > 64 {
		b = b[:64]
	}
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}
