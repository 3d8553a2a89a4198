package main

// Output folders of report, demo and batch: built beside the target, moved in when
// complete, and never deleting anything telegrapher did not write.
//
// The rules for the folder DIR given as --out:
//
//	absent or empty      made from the temporary folder (one rename when absent)
//	written by an        the new files replace the files the marker (.telegrapher-report)
//	earlier run of the   lists; every other file and folder in DIR stays. A new file
//	same kind            whose name is in DIR but not in the marker is refused unless --force
//	of the other kind    (a report folder for batch, a batch folder for report or demo):
//	                     refused, even with --force
//	anything else        refused unless --force; with --force the run adds its files,
//	                     overwriting files of the same names, and touches nothing else
//	a file, or a link    refused, even with --force
//	to a file
//
// The temporary folder is the sibling .DIR.tmp-N; a run holds a lock on it while it
// lives. Leftovers of killed runs are removed by the next run into the same parent
// (cleanLeftovers).

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"time"
)

// reportMarker is the small file that marks a folder as written by telegrapher: the
// kind of folder and every file the run wrote (see readMarker).
const reportMarker = ".telegrapher-report"

// markerHeader is the first line of a marker; a marker without it was written by an
// earlier version and lists no files.
const markerHeader = "telegrapher output folder"

// folderKind is what an output folder holds; report and batch folders are kept apart.
type folderKind string

const (
	kindReport folderKind = "report" // report and demo
	kindBatch  folderKind = "batch"
)

// describe is the kind as messages name it.
func (k folderKind) describe() string {
	if k == kindBatch {
		return "a batch screening (written by telegrapher batch)"
	}
	return "a report (written by telegrapher report or demo)"
}

// noun is what a run of the kind makes.
func (k folderKind) noun() string {
	if k == kindBatch {
		return "a batch screening"
	}
	return "a report"
}

// files is what a run of the kind writes, as messages name it.
func (k folderKind) files() string {
	if k == kindBatch {
		return "the screening's files"
	}
	return "the report's files"
}

// Ages of a leftover temporary folder (its last change) before cleanLeftovers removes
// it. With locks: no live run holds its lock, and the minute covers the instant
// between a run making its folder and locking it. Without locks (a file system that
// has none): a day, far longer than any run (common practice, no source).
const (
	leftoverAgeUnlocked = time.Minute
	leftoverAgeNoLocks  = 24 * time.Hour
)

// outputFolder is an output folder under construction (see the rules above). Files
// go into the temporary sibling; commit moves them into place only when every file is
// written, so a failed or interrupted run changes nothing in DIR.
type outputFolder struct {
	target string // the folder as the user named it, for messages
	dir    string // the same, absolute, links resolved
	kind   folderKind
	force  bool
	tmp    string   // the temporary sibling being filled
	made   []string // parent folders made for it, innermost first
	files  []string // names written, in order
	unlock func()   // releases the lock on tmp

	// rename moves a file or folder: os.Rename, replaced in tests to fail.
	rename func(oldpath, newpath string) error

	mu   sync.Mutex // one of write, commit and discard at a time (discard runs on interrupt)
	done bool       // committed or discarded
}

// folderState is what an existing output folder holds.
type folderState struct {
	entries map[string]fs.FileMode // the names in the folder and their types
	marker  bool                   // it holds a marker
	kind    folderKind             // the marker's kind; "" when unknown
	listed  map[string]bool        // the files the marker lists
	legacy  bool                   // the marker is of an earlier version and lists no files
}

// newOutputFolder checks that target may be written by a run of kind (see the rules
// above), removes leftovers of killed runs beside it and creates the temporary
// sibling. Refusals are input errors (exit 2) naming the flag.
func newOutputFolder(target string, kind folderKind, force bool) (*outputFolder, error) {
	if target == "" {
		return nil, usagef("--out: an output folder is required")
	}
	o := &outputFolder{target: filepath.Clean(target), kind: kind, force: force, rename: os.Rename}
	abs, err := filepath.Abs(o.target)
	if err != nil {
		return nil, fmt.Errorf("--out %s: %v", o.target, err)
	}
	o.dir = abs
	exists, err := o.checkTarget()
	if err != nil {
		return nil, err
	}
	if exists {
		if o.dir, err = filepath.EvalSymlinks(abs); err != nil {
			return nil, fmt.Errorf("--out %s: %v", o.target, fsCause(err))
		}
		st, err := o.inspect()
		if err != nil {
			return nil, err
		}
		if err := o.allowed(st); err != nil {
			return nil, err
		}
	}
	// Parent folders that do not exist yet are made, and removed again on failure.
	parent, base := filepath.Dir(o.dir), filepath.Base(o.dir)
	for p := parent; ; p = filepath.Dir(p) {
		if _, err := os.Stat(p); err == nil || filepath.Dir(p) == p {
			break
		}
		o.made = append(o.made, p)
	}
	if err := os.MkdirAll(parent, 0o755); err != nil {
		o.discard()
		return nil, fmt.Errorf("--out %s: cannot make the folder %s: %v", o.target, filepath.Dir(o.target), fsCause(err))
	}
	cleanLeftovers(parent, base, time.Now())
	tmp, err := os.MkdirTemp(parent, "."+base+".tmp-")
	if err != nil {
		o.discard()
		return nil, fmt.Errorf("--out %s: cannot make a temporary folder beside it: %v", o.target, fsCause(err))
	}
	o.tmp = tmp
	// Without locks (unsupported by the file system) the leftover age alone protects
	// the folder; see cleanLeftovers.
	if unlock, err := lockDir(tmp); err == nil {
		o.unlock = unlock
	}
	if err := os.Chmod(tmp, 0o755); err != nil {
		o.discard()
		return nil, fmt.Errorf("--out %s: %v", o.target, fsCause(err))
	}
	return o, nil
}

// checkTarget reports whether the target exists as a folder (or a link to one); a
// file, a link to a file or a broken link is refused.
func (o *outputFolder) checkTarget() (bool, error) {
	li, err := os.Lstat(o.dir)
	if errors.Is(err, fs.ErrNotExist) {
		return false, nil
	}
	if err != nil {
		return false, fmt.Errorf("--out %s: %v", o.target, fsCause(err))
	}
	info, err := os.Stat(o.dir)
	if err != nil {
		if li.Mode()&fs.ModeSymlink != 0 && errors.Is(err, fs.ErrNotExist) {
			return false, usagef("--out %s: is a link to nothing (a broken symbolic link); give a folder", o.target)
		}
		return false, fmt.Errorf("--out %s: %v", o.target, fsCause(err))
	}
	if !info.IsDir() {
		return false, usagef("--out %s: is a file, not a folder; telegrapher writes a folder and never replaces a file, even with --force: give the name of a folder", o.target)
	}
	return true, nil
}

// inspect reads the existing folder and its marker.
func (o *outputFolder) inspect() (folderState, error) {
	entries, err := os.ReadDir(o.dir)
	if err != nil {
		return folderState{}, fmt.Errorf("--out %s: %v", o.target, fsCause(err))
	}
	st := folderState{entries: map[string]fs.FileMode{}}
	for _, e := range entries {
		st.entries[e.Name()] = e.Type()
	}
	mode, ok := st.entries[reportMarker]
	if !ok {
		return st, nil
	}
	markerPath := filepath.Join(o.target, reportMarker)
	if !mode.IsRegular() {
		return st, usagef("%s: is not a file telegrapher wrote (it is a folder or a link); move it away", markerPath)
	}
	data, err := os.ReadFile(filepath.Join(o.dir, reportMarker))
	if err != nil {
		return st, fmt.Errorf("%s: %v", markerPath, fsCause(err))
	}
	st.marker = true
	st.kind, st.listed, st.legacy, err = readMarker(data)
	if err != nil {
		return st, usagef("%s: %v; it marks this folder as written by telegrapher: delete it only if that is wrong", markerPath, err)
	}
	if st.legacy {
		// An earlier version's marker says neither kind nor files: the kind is read
		// from the main file of each.
		switch {
		case st.entries["report.html"].IsRegular() && !has(st.entries, "batch.csv"):
			st.kind = kindReport
		case st.entries["batch.csv"].IsRegular() && !has(st.entries, "report.html"):
			st.kind = kindBatch
		}
	}
	return st, nil
}

func has(m map[string]fs.FileMode, name string) bool { _, ok := m[name]; return ok }

// allowed refuses a folder the run may not write into (see the rules above).
func (o *outputFolder) allowed(st folderState) error {
	switch {
	case st.marker && st.kind != "" && st.kind != o.kind:
		return usagef("--out %s: holds %s; %s goes into a folder of its own (--force does not change this): choose another folder",
			o.target, st.kind.describe(), o.kind.noun())
	case !st.marker && len(st.entries) > 0 && !o.force:
		return usagef("--out %s: the folder exists and was not written by telegrapher; choose another folder, "+
			"or use --force to add %s to it (files of the same names are overwritten; nothing else is touched or removed)", o.target, o.kind.files())
	}
	return nil
}

// readMarker reads a marker: the header line, then "kind = K" and one "file = NAME"
// per file; lines starting with # are comments. A marker without the header is an
// earlier version's (legacy).
func readMarker(data []byte) (kind folderKind, listed map[string]bool, legacy bool, err error) {
	sc := bufio.NewScanner(bytes.NewReader(data))
	if !sc.Scan() || strings.TrimSpace(sc.Text()) != markerHeader {
		return "", nil, true, nil
	}
	listed = map[string]bool{}
	for n := 2; sc.Scan(); n++ {
		line := strings.TrimSpace(sc.Text())
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		key, value, ok := strings.Cut(line, "=")
		key, value = strings.TrimSpace(key), strings.TrimSpace(value)
		switch {
		case !ok:
			return "", nil, false, fmt.Errorf("line %d: expected key = value, got %q", n, line)
		case key == "kind":
			if kind = folderKind(value); kind != kindReport && kind != kindBatch {
				return "", nil, false, fmt.Errorf("line %d: kind: must be report or batch, got %q", n, value)
			}
		case key == "file":
			if !plainName(value) || value == reportMarker {
				return "", nil, false, fmt.Errorf("line %d: file: %q is not a plain file name", n, value)
			}
			listed[value] = true
		}
		// Other keys (version) are for people reading the marker.
	}
	if err := sc.Err(); err != nil {
		return "", nil, false, err
	}
	if kind == "" {
		return "", nil, false, fmt.Errorf("no kind line")
	}
	return kind, listed, false, nil
}

// plainName reports whether name is a file name without a folder: never "..", never
// a separator, so a marker cannot name a file outside its folder.
func plainName(name string) bool {
	return name != "" && name != "." && name != ".." && !strings.ContainsAny(name, `/\`) && !strings.ContainsRune(name, 0)
}

// markerText is the marker of this run.
func (o *outputFolder) markerText() []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "%s\nkind = %s\nversion = %s\n", markerHeader, o.kind, version)
	fmt.Fprintf(&b, "# Written by telegrapher. A later run of the same kind into this folder replaces the\n"+
		"# files listed here and leaves every other file and folder alone.\n")
	names := append([]string(nil), o.files...)
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(&b, "file = %s\n", n)
	}
	return b.Bytes()
}

// write writes one file of the folder (a plain name, no separators).
func (o *outputFolder) write(name string, data []byte) error {
	if !plainName(name) || name == reportMarker {
		panic(fmt.Sprintf("telegrapher: output file name %q is not a plain name", name))
	}
	o.mu.Lock()
	defer o.mu.Unlock()
	if o.done {
		return fmt.Errorf("writing %s: the folder is already finished", filepath.Join(o.target, name))
	}
	if err := os.WriteFile(filepath.Join(o.tmp, name), data, 0o644); err != nil {
		return fmt.Errorf("writing %s: %v", filepath.Join(o.target, name), fsCause(err))
	}
	for _, n := range o.files {
		if n == name {
			return nil
		}
	}
	o.files = append(o.files, name)
	return nil
}

// commit writes the marker and moves the files into place. An absent target is the
// temporary folder renamed; into an existing one the files the earlier marker lists
// (and files of the new names, where allowed) are first moved aside, then the new
// files moved in. After an error the target is as it was and nothing is left beside
// it.
func (o *outputFolder) commit() error {
	o.mu.Lock()
	defer o.mu.Unlock()
	if o.done {
		return fmt.Errorf("--out %s: the folder is already finished", o.target)
	}
	if err := os.WriteFile(filepath.Join(o.tmp, reportMarker), o.markerText(), 0o644); err != nil {
		o.discardLocked()
		return fmt.Errorf("writing %s: %v", filepath.Join(o.target, reportMarker), fsCause(err))
	}
	exists, err := o.checkTarget()
	if err == nil && !exists {
		if err = o.rename(o.tmp, o.dir); err != nil {
			err = fmt.Errorf("moving the new folder to %s: %v", o.target, fsCause(err))
		}
	} else if err == nil {
		err = o.moveIn()
	}
	if err != nil {
		o.discardLocked()
		return err
	}
	o.tmp = "" // it is the target now, or emptied by moveIn
	o.discardLocked()
	return nil
}

// moveIn moves the new files into the existing target (see commit).
func (o *outputFolder) moveIn() error {
	st, err := o.inspect()
	if err != nil {
		return err
	}
	if err := o.allowed(st); err != nil {
		return err
	}
	news := append([]string{reportMarker}, o.files...)
	// What goes aside: the files the earlier run listed and the files of the new
	// names. Only files and links: a folder is never moved or removed.
	var aside []string
	seen := map[string]bool{}
	for _, n := range news {
		seen[n] = true
		mode, ok := st.entries[n]
		switch {
		case !ok:
			continue
		case mode.IsDir():
			return usagef("--out %s: %s is a folder, and this run writes a file of that name; move it away",
				o.target, filepath.Join(o.target, n))
		case n != reportMarker && st.marker && !st.legacy && !st.listed[n] && !o.force:
			return usagef("--out %s: %s was not written by telegrapher and would be overwritten; move it away, or use --force to overwrite it",
				o.target, filepath.Join(o.target, n))
		}
		aside = append(aside, n)
	}
	for n := range st.listed {
		if mode, ok := st.entries[n]; ok && !seen[n] && !mode.IsDir() {
			aside = append(aside, n)
		}
	}
	prev := filepath.Join(o.tmp, ".previous")
	if err := os.Mkdir(prev, 0o700); err != nil {
		return fmt.Errorf("--out %s: cannot make a temporary folder beside it: %v", o.target, fsCause(err))
	}
	var moved, placed []string
	undo := func(cause error) error {
		bad := false
		for _, n := range placed {
			if os.Remove(filepath.Join(o.dir, n)) != nil {
				bad = true
			}
		}
		for _, n := range moved {
			if o.rename(filepath.Join(prev, n), filepath.Join(o.dir, n)) != nil {
				bad = true
			}
		}
		if bad {
			// The one case a temporary name is worth showing: the earlier files are
			// there, and the folder is not removed.
			o.tmp = ""
			return fmt.Errorf("%v; the earlier files could not all be put back: those missing from %s are in %s", cause, o.target, prev)
		}
		return cause
	}
	for _, n := range aside {
		if err := o.rename(filepath.Join(o.dir, n), filepath.Join(prev, n)); err != nil {
			return undo(fmt.Errorf("replacing %s: %v", filepath.Join(o.target, n), fsCause(err)))
		}
		moved = append(moved, n)
	}
	// The marker first: should the run die now, the folder is still known as ours.
	for _, n := range news {
		if err := o.rename(filepath.Join(o.tmp, n), filepath.Join(o.dir, n)); err != nil {
			return undo(fmt.Errorf("moving %s into place: %v", filepath.Join(o.target, n), fsCause(err)))
		}
		placed = append(placed, n)
	}
	os.RemoveAll(o.tmp) // should this fail, a later run cleans the leftover
	return nil
}

// discard removes the temporary folder and the parent folders newOutputFolder made;
// the target is untouched. It reports false when the folder was already committed or
// discarded.
// interrupted returns err, or, when ctx was cancelled (err is then usually ctx's
// error), discards the folder under construction and returns an *interruptedError
// saying nothing was written.
func (o *outputFolder) interrupted(ctx context.Context, err error) error {
	if ctx.Err() == nil {
		return err
	}
	if o.discard() {
		return &interruptedError{what: "nothing written to " + o.target, err: ctx.Err()}
	}
	return &interruptedError{what: "after " + o.target + " was written", err: ctx.Err()}
}

// interruptedError is a command stopped by the cancellation of its context (Ctrl-C,
// SIGTERM): run exits 130 with its message.
type interruptedError struct {
	what string // what the command left: "nothing written to DIR"
	err  error  // the context's error
}

func (e *interruptedError) Error() string { return "telegrapher: interrupted; " + e.what }
func (e *interruptedError) Unwrap() error { return e.err }

func (o *outputFolder) discard() bool {
	o.mu.Lock()
	defer o.mu.Unlock()
	if o.done {
		return false
	}
	o.discardLocked()
	return true
}

func (o *outputFolder) discardLocked() {
	if o.tmp != "" {
		os.RemoveAll(o.tmp)
	}
	if o.unlock != nil {
		o.unlock()
		o.unlock = nil
	}
	for _, p := range o.made {
		os.Remove(p) // only if still empty
	}
	o.made = nil
	o.done = true
}

// cleanLeftovers removes the temporary folders of killed runs into parent/base: the
// folders named .BASE.tmp-N (and .BASE.tmp-N.old, an earlier version's) that no live
// run holds locked and that have not changed for leftoverAgeUnlocked, or, where the
// file system has no locks, for leftoverAgeNoLocks. Cleaning is best effort: errors
// are ignored.
func cleanLeftovers(parent, base string, now time.Time) {
	entries, err := os.ReadDir(parent)
	if err != nil {
		return
	}
	for _, e := range entries {
		if !e.IsDir() || !leftoverName(e.Name(), base) {
			continue
		}
		p := filepath.Join(parent, e.Name())
		info, err := e.Info()
		if err != nil {
			continue
		}
		age := now.Sub(info.ModTime())
		unlock, err := tryLockDir(p)
		switch {
		case errors.Is(err, errLocked):
			continue // a live run
		case err != nil:
			if age > leftoverAgeNoLocks {
				os.RemoveAll(p)
			}
		default:
			if age > leftoverAgeUnlocked {
				os.RemoveAll(p)
			}
			unlock()
		}
	}
}

// leftoverName reports whether name is that of a temporary folder for the target
// base: .BASE.tmp-N or .BASE.tmp-N.old, N the digits os.MkdirTemp puts in.
func leftoverName(name, base string) bool {
	rest, ok := strings.CutPrefix(name, "."+base+".tmp-")
	rest = strings.TrimSuffix(rest, ".old")
	return ok && rest != "" && strings.Trim(rest, "0123456789") == ""
}

// errLocked is tryLockDir's answer for a folder a live process holds locked.
var errLocked = errors.New("locked by a running process")

// fsCause is the reason of a file-system error without the path it names (which may
// be a temporary name the user never gave): "no space left on device".
func fsCause(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	var se *os.SyscallError
	if errors.As(err, &se) {
		return se.Err
	}
	return err
}
