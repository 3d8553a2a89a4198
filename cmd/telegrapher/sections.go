package main

// The built-in study of a line in sections (demo_cable.toml, embedded): an invented
// 400 kV connection of two overhead sections with an 8 km river cable crossing near
// the receiving end. The demo and report commands may include it.
//
//	demoCableStudy() (*study.Study, error)  the parsed built-in sectioned study

import (
	_ "embed"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

//go:embed demo_cable.toml
var demoCableTOML []byte

// demoCableName is the file name the built-in sectioned study carries in messages.
const demoCableName = "demo_cable.toml (built in)"

// demoCableStudy returns the parsed built-in study of the overhead line with a cable
// crossing.
func demoCableStudy() (*study.Study, error) { return study.Parse(demoCableName, demoCableTOML) }
