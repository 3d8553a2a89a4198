package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"reflect"
	"strings"
)

// jsonComplex is a complex number as the contract writes it.
type jsonComplex struct {
	Re float64 `json:"re"`
	Im float64 `json:"im"`
}

// writeJSON writes v, a struct (or pointer to one), as one indented JSON document.
// complex128 values become {"re", "im"} objects. Every float that is not finite is
// written as null and its key path listed in a top-level "overflow" array (the
// contract's overflow rule). A NaN is a bug upstream and is returned as an error
// instead of written.
func writeJSON(w io.Writer, v any) error {
	var overflow, nan []string
	tree, err := walk(reflect.ValueOf(v), "", &overflow, &nan)
	if err != nil {
		return err
	}
	obj, ok := tree.(*object)
	if !ok {
		return fmt.Errorf("internal error: JSON output is not an object")
	}
	if len(nan) > 0 {
		return fmt.Errorf("internal error: NaN computed at %s (a bug, please report it)", strings.Join(nan, ", "))
	}
	if len(overflow) > 0 {
		obj.set("overflow", overflow)
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	if err := enc.Encode(obj); err != nil {
		return err
	}
	_, err = w.Write(buf.Bytes())
	return err
}

// object is a JSON object that keeps its keys in order.
type object struct {
	keys []string
	vals []any
}

func (o *object) set(k string, v any) {
	o.keys = append(o.keys, k)
	o.vals = append(o.vals, v)
}

func (o *object) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, k := range o.keys {
		if i > 0 {
			b.WriteByte(',')
		}
		kb, _ := json.Marshal(k)
		b.Write(kb)
		b.WriteByte(':')
		vb, err := json.Marshal(o.vals[i])
		if err != nil {
			return nil, err
		}
		b.Write(vb)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// walk turns v into objects, slices and scalars, replacing non-finite floats by nil
// and recording their key paths.
func walk(v reflect.Value, path string, overflow, nan *[]string) (any, error) {
	join := func(k string) string {
		if path == "" {
			return k
		}
		return path + "." + k
	}
	if !v.IsValid() {
		return nil, nil
	}
	if v.CanInterface() && v.Kind() != reflect.Pointer {
		if m, ok := v.Interface().(json.Marshaler); ok {
			return m, nil
		}
	}
	switch v.Kind() {
	case reflect.Pointer, reflect.Interface:
		if v.IsNil() {
			return nil, nil
		}
		return walk(v.Elem(), path, overflow, nan)
	case reflect.Float32, reflect.Float64:
		f := v.Float()
		switch {
		case math.IsNaN(f):
			*nan = append(*nan, path)
			return nil, nil
		case math.IsInf(f, 0):
			*overflow = append(*overflow, path)
			return nil, nil
		}
		return f, nil
	case reflect.Complex64, reflect.Complex128:
		c := v.Complex()
		return walk(reflect.ValueOf(jsonComplex{real(c), imag(c)}), path, overflow, nan)
	case reflect.Bool:
		return v.Bool(), nil
	case reflect.String:
		return v.String(), nil
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		return v.Int(), nil
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return v.Uint(), nil
	case reflect.Slice, reflect.Array:
		out := make([]any, v.Len())
		for i := range out {
			e, err := walk(v.Index(i), fmt.Sprintf("%s[%d]", path, i), overflow, nan)
			if err != nil {
				return nil, err
			}
			out[i] = e
		}
		return out, nil
	case reflect.Map:
		o := &object{}
		keys := v.MapKeys()
		names := make([]string, len(keys))
		for i, k := range keys {
			if k.Kind() == reflect.String {
				names[i] = k.String()
			} else {
				names[i] = fmt.Sprint(k)
			}
		}
		order := make([]int, len(keys))
		for i := range order {
			order[i] = i
		}
		// sort by name for a stable output
		for i := 1; i < len(order); i++ {
			for j := i; j > 0 && names[order[j]] < names[order[j-1]]; j-- {
				order[j], order[j-1] = order[j-1], order[j]
			}
		}
		for _, i := range order {
			e, err := walk(v.MapIndex(keys[i]), join(names[i]), overflow, nan)
			if err != nil {
				return nil, err
			}
			o.set(names[i], e)
		}
		return o, nil
	case reflect.Struct:
		t := v.Type()
		o := &object{}
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			if !f.IsExported() && !f.Anonymous {
				continue
			}
			name, omitEmpty := f.Name, false
			if tag, ok := f.Tag.Lookup("json"); ok {
				parts := strings.Split(tag, ",")
				if parts[0] == "-" {
					continue
				}
				if parts[0] != "" {
					name = parts[0]
				}
				for _, p := range parts[1:] {
					omitEmpty = omitEmpty || p == "omitempty"
				}
			}
			fv := v.Field(i)
			if omitEmpty && fv.IsZero() {
				continue
			}
			if f.Anonymous && f.Tag.Get("json") == "" && fv.Kind() == reflect.Struct {
				// An embedded struct's fields belong to this object, as in encoding/json.
				e, err := walk(fv, path, overflow, nan)
				if err != nil {
					return nil, err
				}
				if inner, ok := e.(*object); ok {
					o.keys = append(o.keys, inner.keys...)
					o.vals = append(o.vals, inner.vals...)
				}
				continue
			}
			e, err := walk(fv, join(name), overflow, nan)
			if err != nil {
				return nil, err
			}
			o.set(name, e)
		}
		return o, nil
	}
	return nil, fmt.Errorf("internal error: cannot write %s as JSON", v.Type())
}
