package main

// The check command: validates a study file and prints what the loader understood,
// key by key, with units and how each value was obtained (given, default, derived).
//
//   printCheck(w, st): the listing; the report command may reuse it.

import (
	"context"
	"flag"
	"fmt"
	"io"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

var checkCommand = func() *command {
	return &command{
		name:  "check",
		args:  "STUDY",
		short: "validate a study file and print what it understood",
		long: `Reads and validates the study file, then lists every setting as understood: the
value in its unit, and whether it was given, filled by a default, or derived (a source
impedance from its short-circuit level, an inductance from a reactance). Any problem is
reported as FILE: key.path: problem, with exit status 2.`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			return func(ctx context.Context, args []string) error {
				st, err := studyArg("check", args, stderr)
				if err != nil {
					return err
				}
				printCheck(stdout, st)
				return nil
			}
		},
	}
}()

// printCheck writes what the loader understood.
func printCheck(w io.Writer, st *study.Study) {
	fmt.Fprintf(w, "%s: valid study\n\n", st.File)
	width := 0
	for _, e := range st.Understood {
		width = max(width, len(e.Key))
	}
	for _, e := range st.Understood {
		fmt.Fprintf(w, "  %-*s  %s  [%s]\n", width, e.Key, e.Value, e.How)
	}
	fmt.Fprintf(w, "\nline: %d section(s), %.6g km; zero sequence: %s; source: %s; %d shunt(s)\n",
		len(st.Line), st.Line.Length()/1e3, yesNo(st.Zero != nil, "given", "not given"),
		yesNo(st.Source.Ideal, "ideal", fmt.Sprintf("R = %.4g ohm, L = %.4g mH", st.Source.R, st.Source.L*1e3)),
		len(st.Network.Shunts))
	if len(st.Warnings) > 0 {
		fmt.Fprintf(w, "\nwarnings (the study runs; check these values):\n")
		for _, x := range st.Warnings {
			fmt.Fprintf(w, "  %s\n", x)
		}
	}
}

func yesNo(b bool, yes, no string) string {
	if b {
		return yes
	}
	return no
}
