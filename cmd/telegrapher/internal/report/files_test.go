package report

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestWriteFileAtomicErrorsNameTarget: a failed write names the file asked for, not
// the temporary file it goes through, and leaves no temporary file behind.
func TestWriteFileAtomicErrorsNameTarget(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, "taken"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "taken", "keep"), []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name, path string
		want       error // the cause, through errors.Is
	}{
		{"folder missing", filepath.Join(dir, "missing", "a.csv"), fs.ErrNotExist},
		{"a non-empty folder of that name", filepath.Join(dir, "taken"), nil}, // the rename fails
	}
	for _, tc := range tests {
		err := WriteFileAtomic(tc.path, []byte("data"))
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		if strings.Contains(err.Error(), ".tmp-") || !strings.Contains(err.Error(), tc.path) {
			t.Errorf("%s: %q names a temporary file, or not %s", tc.name, err, tc.path)
		}
		var pe *fs.PathError
		if !errors.As(err, &pe) || pe.Path != tc.path {
			t.Errorf("%s: %T %v is not a PathError of the target", tc.name, err, err)
		}
		if tc.want != nil && !errors.Is(err, tc.want) {
			t.Errorf("%s: %v is not %v", tc.name, err, tc.want)
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if e.Name() != "taken" {
			t.Errorf("left behind: %s", e.Name())
		}
	}
}
