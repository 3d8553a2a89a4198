package study

import (
	"errors"
	"strings"
	"testing"
)

// FuzzLoad: the loader never panics, and every error is a *study.Error naming a key
// path or a line (or is one of the whole-file problems: empty, too large).
func FuzzLoad(f *testing.F) {
	f.Add([]byte(base))
	for _, c := range ruleCases {
		f.Add([]byte(c.src))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		st, err := Parse("fuzz.toml", data)
		if err == nil {
			if st == nil || len(st.Line) == 0 || st.Frequency <= 0 || st.Voltage <= 0 {
				t.Fatalf("accepted an incomplete study: %+v", st)
			}
			return
		}
		var e *Error
		if !errors.As(err, &e) {
			t.Fatalf("error %T is not a *study.Error: %v", err, err)
		}
		whole := strings.Contains(e.Msg, "empty") || strings.Contains(e.Msg, "larger than")
		if e.Key == "" && e.Line <= 0 && !whole {
			t.Fatalf("error names neither a key nor a line: %q", err.Error())
		}
		if !strings.HasPrefix(err.Error(), "fuzz.toml: ") {
			t.Fatalf("error does not name the file: %q", err.Error())
		}
	})
}
