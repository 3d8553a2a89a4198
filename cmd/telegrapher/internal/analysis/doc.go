// Package analysis computes every study part of telegrapher from a loaded study: the
// line constants, the harmonic scan, energisation, loading, statistical switching,
// the remedy search and the screening of line inventories.
//
// Each function takes a context.Context and a *study.Study (plus options such as a
// progress callback) and returns domain results in SI units (Hz, V, s, ohm, W, var);
// display units, JSON shapes and printing belong to the command layer (package main
// of cmd/telegrapher). A problem with the study's data is an *InputError naming the
// file and the study key, so the command layer can exit with status 2; the settings
// of the library packages are mapped to study keys by one table (errors.go). Long
// loops (switching shots, remedy candidates, inventory rows, scans of many points)
// check the context and return its error (context.Canceled) promptly when it ends.
package analysis
