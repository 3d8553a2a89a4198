package main

import "github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"

// Study-file errors (*study.Error) are input errors: exit status 2.
func init() {
	prev := isInputError
	isInputError = func(err error) bool { return study.IsInputError(err) || prev(err) }
}
