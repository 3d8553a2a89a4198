package main

// The demo command: the report of the built-in demonstration study (demo.toml,
// embedded), an invented 400 kV, 50 Hz, 320 km line, written into ./telegrapher-demo
// (or --out DIR) by writeReport, with a short summary and where to open it.
//
//   demoStudy() (*study.Study, error): the parsed built-in study, for reuse.

import (
	"context"
	_ "embed"
	"flag"
	"fmt"
	"io"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

//go:embed demo.toml
var demoTOML []byte

// demoName is the file name the built-in study carries in messages.
const demoName = "demo.toml (built in)"

// demoDir is the default output folder of the demo (listed in .gitignore).
const demoDir = "telegrapher-demo"

// demoStudy returns the parsed built-in study.
func demoStudy() (*study.Study, error) { return study.Parse(demoName, demoTOML) }

var demoCommand = func() *command {
	return &command{
		name:  "demo",
		args:  "[--out DIR] [--force] [--cable]",
		short: "the report of the built-in demonstration study",
		long: `Writes the full report (see 'telegrapher help report') of the built-in demonstration
study into ./telegrapher-demo, or --out DIR: an invented 400 kV, 50 Hz line of 320 km
between two invented substations (Harrowmere and Calder Rise), fed from a 15 GVA system
with X/R 12 and compensated by a 150 Mvar line-connected reactor at the receiving end,
with zero-sequence data so every part runs. It then prints each part's reading and
where to open the report. In an earlier demo or report folder only the files it lists
in its marker are replaced (your own files there stay); a folder telegrapher did not
write needs --force, which adds the report's files and removes nothing; a file or a
batch folder is refused (see 'telegrapher help report'). With --cable the study is the
built-in line in sections: two overhead sections with an 8 km river cable crossing
near the receiving end.`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			out := fs.String("out", demoDir, "write the report into folder `DIR`")
			force := fs.Bool("force", false, "write into DIR even if telegrapher did not make it (overwrites its own file names only)")
			cable := fs.Bool("cable", false, "the built-in line in sections with a cable crossing instead (demo_cable.toml)")
			return func(ctx context.Context, args []string) error {
				if len(args) != 0 {
					return usagef("telegrapher demo: takes no study file (it has its own)\nusage: telegrapher demo [--out DIR] [--force] [--cable]")
				}
				load := demoStudy
				if *cable {
					load = demoCableStudy
				}
				st, err := load()
				if err != nil {
					return fmt.Errorf("internal error: the built-in study does not load: %v", err)
				}
				doc, err := writeReportStatus(ctx, st, *out, *force, newStatusLine(stderr))
				if err != nil {
					return err
				}
				printReportSummary(stdout, doc, *out)
				return nil
			}
		},
	}
}()
