package study

import (
	"strings"
	"testing"

	"github.com/BurntSushi/toml"
)

// fakeTable decodes src and returns its root table in a fresh load.
func fakeTable(t *testing.T, src string) (*Loader, *Table) {
	t.Helper()
	st, err := Parse("probe.toml", []byte(base))
	if err != nil {
		t.Fatal(err)
	}
	ld := &Loader{File: "t.toml", Study: st}
	var m map[string]any
	if err := decodeForTest(src, &m); err != nil {
		t.Fatal(err)
	}
	ld.root = &Table{ld: ld, m: m}
	return ld, ld.root
}

// The table reader used by the table parsers: values, key paths, sticky errors.
func TestTableReader(t *testing.T) {
	t.Parallel()
	ld, root := fakeTable(t, `
a = 1.5
n = 7
s = "x"
b = true
fs = [1, 2.5]
is = [3, 5]
[sub]
k = 2
[[arr]]
v = 1
[[arr]]
v = "bad"
`)
	if v, ok := root.Float("a"); !ok || v != 1.5 {
		t.Errorf("Float = %v %v", v, ok)
	}
	if v, ok := root.Float("n"); !ok || v != 7 {
		t.Errorf("Float of an integer = %v %v", v, ok)
	}
	if v, ok := root.Int("n"); !ok || v != 7 {
		t.Errorf("Int = %v %v", v, ok)
	}
	if v, ok := root.String("s"); !ok || v != "x" {
		t.Errorf("String = %v", v)
	}
	if v, ok := root.Bool("b"); !ok || !v {
		t.Errorf("Bool = %v", v)
	}
	if v, ok := root.Floats("fs"); !ok || len(v) != 2 || v[1] != 2.5 {
		t.Errorf("Floats = %v", v)
	}
	if v, ok := root.Ints("is"); !ok || v[1] != 5 {
		t.Errorf("Ints = %v", v)
	}
	if _, ok := root.Float("absent"); ok || ld.Failed() {
		t.Errorf("absent key given or failed")
	}
	sub := root.Sub("sub")
	if !sub.Present() || sub.KeyPath("k") != "sub.k" || root.Sub("nothing").Present() {
		t.Errorf("Sub paths wrong")
	}
	arr := root.Subs("arr")
	if len(arr) != 2 || arr[1].Path() != "arr[1]" {
		t.Fatalf("Subs = %v", arr)
	}
	if root.Exclusive("a", "zz") != "a" || ld.Failed() {
		t.Errorf("Exclusive")
	}
	arr[1].Float("v")
	err := ld.Err()
	if err == nil || !strings.HasPrefix(err.Error(), "t.toml: arr[1].v: must be a number, got the string") {
		t.Fatalf("error %v", err)
	}
	// Collected: a later problem on another key is added after the first, a second one
	// on the same key is dropped, and reading goes on.
	root.Errorf("a", "second problem")
	root.Errorf("a", "third problem, same key")
	if v, ok := root.Float("a"); !ok || v != 1.5 {
		t.Errorf("reading stopped after a problem: %v %v", v, ok)
	}
	want := "t.toml: arr[1].v: must be a number, got the string \"bad\"\nt.toml: a: second problem"
	if got := ld.Err().Error(); got != want {
		t.Errorf("problems:\n%s\nwant:\n%s", got, want)
	}
}

// firstError returns the first problem recorded by ld.
func firstError(ld *Loader) *Error {
	if len(ld.errs) == 0 {
		return nil
	}
	return ld.errs[0]
}

func TestTableKnownAndExclusive(t *testing.T) {
	t.Parallel()
	ld, root := fakeTable(t, "shots = 1\nsede = 2\n")
	root.Known("shots", "seed")
	if e := firstError(ld); e == nil || e.Key != "sede" || !strings.Contains(e.Msg, `did you mean "seed"`) {
		t.Errorf("Known: %v", ld.Err())
	}
	ld, root = fakeTable(t, "l = 1\nx = 2\n")
	root.Exclusive("l", "x")
	if e := firstError(ld); e == nil || e.Key != "x" || !strings.Contains(e.Msg, "alternatives") {
		t.Errorf("Exclusive: %v", ld.Err())
	}
}

func decodeForTest(src string, m *map[string]any) error {
	_, err := toml.Decode(src, m)
	return err
}

// A parser that returns ld.Err() hands back every problem recorded so far; Fail
// records none of them twice, a whole-file one (no key) included.
func TestFailKeepsEachProblemOnce(t *testing.T) {
	t.Parallel()
	ld, root := fakeTable(t, "a = 1\n")
	ld.Errorf("", "a whole-file problem")
	root.Errorf("a", "a problem of a")
	ld.Fail("hook", ld.Err())
	if got := strings.Count(ld.Err().Error(), "\n") + 1; got != 2 {
		t.Errorf("%d problems after Fail(ld.Err()), want 2:\n%v", got, ld.Err())
	}
}
