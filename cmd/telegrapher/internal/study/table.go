package study

// The table reader: typed, checked access to one decoded TOML table, with key paths in
// every message and unknown-key reporting with a did-you-mean hint. The core loader
// (load.go) and every registered table parser (see the top of load.go) use it.
//
// Errors are sticky: the first problem is recorded in the Loader and every later call
// returns zero values, so a parser reads its keys in order and checks ld.Err() (or
// simply returns) at the end. Keys are visited in a fixed order so the first error
// reported for a file is always the same one.

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Loader carries the state of one load: the file name, the study being built, the
// first error, and values that parsers share (the geometry's conductors, say).
type Loader struct {
	File  string // the study file as given, for messages
	Study *Study // the study being built; filled in stage order

	root   *Table
	err    *Error
	shared map[string]any
}

// Err returns the first error recorded, or nil.
func (ld *Loader) Err() error {
	if ld.err == nil {
		return nil
	}
	return ld.err
}

// Failed reports whether an error has been recorded.
func (ld *Loader) Failed() bool { return ld.err != nil }

// Fail records err (the first one wins). A non-*Error is kept with its text and
// attributed to key.
func (ld *Loader) Fail(key string, err error) {
	if err == nil || ld.err != nil {
		return
	}
	ld.err = wrapHookError(ld.File, key, err)
}

// Errorf records the error `FILE: key: problem` (the first one wins).
func (ld *Loader) Errorf(key, format string, a ...any) {
	if ld.err != nil {
		return
	}
	ld.err = &Error{File: ld.File, Key: key, Msg: fmt.Sprintf(format, a...)}
}

// Set stores a value other parsers may need (for example "conductors").
func (ld *Loader) Set(name string, v any) { ld.shared[name] = v }

// Get returns a value stored by Set, or nil.
func (ld *Loader) Get(name string) any { return ld.shared[name] }

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
	if !ok || t.ld.Failed() {
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
	if !ok || t.ld.Failed() {
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
	if !ok || t.ld.Failed() {
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
	if !ok || t.ld.Failed() {
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
	if !ok || t.ld.Failed() {
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
	if !ok || t.ld.Failed() {
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
	if !ok || t.ld.Failed() {
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

// Known reports the first key of the table (in sorted order) that is not in known, as
// `unknown key` with a did-you-mean hint.
func (t *Table) Known(known ...string) {
	if t.ld.Failed() {
		return
	}
	for _, k := range orderedKeys(t.m) {
		if !contains(known, k) {
			t.Errorf(k, "unknown key%s; known here: %s", DidYouMean(k, known), strings.Join(known, ", "))
			return
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
	best, bestD := "", max(2, len(s)/3)+1
	for _, c := range candidates {
		if d := levenshtein(s, c); d < bestD {
			best, bestD = c, d
		}
	}
	if best == "" {
		return ""
	}
	return fmt.Sprintf(" (did you mean %q?)", best)
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
