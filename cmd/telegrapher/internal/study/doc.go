// Package study loads and validates a telegrapher study file (TOML), converts it to SI
// units once, fills the documented defaults, and builds the line and network models
// every command shares.
//
// Load (a file) and Parse (bytes) return a *Study or an *Error whose text is
// `FILE: key.path: problem, got X` (or `FILE: line N: syntax error: ...`). Unknown keys
// are errors with a did-you-mean hint; alternatives (l or x, c or b, the two source
// forms) exclude each other; numbers must be finite and in range.
//
// Every key is in the schema (schema.go: unit, SI factor, bounds, default, help), which
// README's key tables are written from; the loader calls one parser per table in a
// fixed order (see the top of load.go), each reading its table with the Table reader
// (table.go).
package study
