package main

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"
)

type jsonInner struct {
	A float64 `json:"a"`
	B float64 `json:"b"`
}

type jsonOuter struct {
	First float64 `json:"first"`
	jsonInner
	Z    complex128         `json:"z"`
	List []float64          `json:"list"`
	Map  map[string]float64 `json:"map"`
	Skip float64            `json:"-"`
	Opt  *float64           `json:"opt,omitempty"`
}

// The contract's JSON rules: complex numbers as {"re", "im"}, a value too large for a
// float64 written as null with its key path in "overflow", never NaN; embedded structs
// flatten into their parent as in encoding/json.
func TestWriteJSONRules(t *testing.T) {
	t.Parallel()
	v := jsonOuter{First: 1, jsonInner: jsonInner{A: 2, B: math.Inf(1)}, Z: complex(3, -4),
		List: []float64{5, math.Inf(-1)}, Map: map[string]float64{"k": 6}, Skip: 7}
	var buf bytes.Buffer
	if err := writeJSON(&buf, &v); err != nil {
		t.Fatal(err)
	}
	var got map[string]any
	if err := json.Unmarshal(buf.Bytes(), &got); err != nil {
		t.Fatal(err)
	}
	if got["first"] != 1.0 || got["a"] != 2.0 || got["b"] != nil {
		t.Errorf("embedded fields not flattened or overflow not null: %s", buf.String())
	}
	if z, _ := got["z"].(map[string]any); z["re"] != 3.0 || z["im"] != -4.0 {
		t.Errorf("complex written as %v", got["z"])
	}
	if l, _ := got["list"].([]any); len(l) != 2 || l[0] != 5.0 || l[1] != nil {
		t.Errorf("list written as %v", got["list"])
	}
	if _, has := got["Skip"]; has {
		t.Error(`a json:"-" field was written`)
	}
	if _, has := got["opt"]; has {
		t.Error("an omitempty nil pointer was written")
	}
	ov, _ := got["overflow"].([]any)
	if len(ov) != 2 || ov[0] != "b" || ov[1] != "list[1]" {
		t.Errorf("overflow = %v, want [b list[1]]", ov)
	}
	keys := []string{`"first"`, `"a"`, `"b"`, `"z"`, `"list"`, `"map"`, `"overflow"`}
	last := -1
	for _, k := range keys {
		i := strings.Index(buf.String(), k)
		if i < last {
			t.Errorf("key %s out of field order", k)
		}
		last = i
	}
	buf.Reset()
	v.A = math.NaN()
	if err := writeJSON(&buf, &v); err == nil || !strings.Contains(err.Error(), "NaN computed at a") || buf.Len() != 0 {
		t.Errorf("NaN: err %v, output %q; want an error naming a and no output", err, buf.String())
	}
}
