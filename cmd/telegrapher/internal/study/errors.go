package study

import (
	"errors"
	"fmt"
	"strings"
)

// Error is a problem with a study file: the file, the key path (or the line of a TOML
// syntax error) and what is wrong. Its text is `FILE: key.path: problem`, for example
//
//	study.toml: line.length_km: must be > 0, got -3
//	study.toml: line 12: syntax error: expected value but found "="
//
// Every error the loader returns is an *Error. A file with several independent
// problems gives one *Error for the first (its File, Key, Line and Msg) carrying the
// others in Others, at most MaxErrors in all; its text has one line per problem and a
// last line "and N more problems" when some were left out.
type Error struct {
	File string // the study file as given
	Key  string // key path such as "line.sections[1].length_km"; "" for whole-file problems
	Line int    // line of a TOML syntax error; 0 otherwise
	Msg  string // the problem, with the offending value where there is one

	Others  []*Error // further independent problems of the same file, in the order found
	Omitted int      // problems found beyond MaxErrors and not listed

	text string // the full text of an error returned by a table parser
}

// MaxErrors is the most problems one load reports; the rest are counted.
const MaxErrors = 20

func (e *Error) Error() string {
	if len(e.Others) == 0 && e.Omitted == 0 {
		return e.line()
	}
	var b strings.Builder
	b.WriteString(e.line())
	for _, o := range e.Others {
		b.WriteString("\n" + o.line())
	}
	if e.Omitted > 0 {
		fmt.Fprintf(&b, "\n%s: and %d more problem%s", e.File, e.Omitted, plural(e.Omitted))
	}
	return b.String()
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// line is the text of this one problem.
func (e *Error) line() string {
	if e.text != "" {
		return e.text
	}
	switch {
	case e.Key != "":
		return fmt.Sprintf("%s: %s: %s", e.File, e.Key, e.Msg)
	case e.Line > 0:
		return fmt.Sprintf("%s: line %d: %s", e.File, e.Line, e.Msg)
	}
	return fmt.Sprintf("%s: %s", e.File, e.Msg)
}

// IsInputError reports whether err is (or wraps) a problem with a study file, which the
// CLI reports with exit status 2.
func IsInputError(err error) bool {
	var e *Error
	return errors.As(err, &e)
}

// wrapParserError turns an error returned by a table parser into an *Error keeping
// its text. Parsers deal only with user data, so whatever they return is an input
// error; key is the table the parser owns.
func wrapParserError(file, key string, err error) *Error {
	var e *Error
	if errors.As(err, &e) {
		return e
	}
	return &Error{File: file, Key: key, Msg: err.Error(), text: err.Error()}
}
