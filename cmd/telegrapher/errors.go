package main

import (
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// Study-file errors (*study.Error) and problems the analysis finds in the study's data
// (*analysis.InputError) are input errors: exit status 2.
func init() {
	prev := isInputError
	isInputError = func(err error) bool { return study.IsInputError(err) || analysis.IsInputError(err) || prev(err) }
}
