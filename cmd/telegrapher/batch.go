package main

// The batch command: screening of a line inventory, one line per CSV row.
//
//	parseBatch(file, r)        the rows, validated (batch_rows.go): errors read
//	                           `LINES.csv: row N: column: problem`, exit 2
//	screenLine(ctx, file, line) one row as a study (through the study loader) screened
//	                           by analysis.ScreenLine: SIL, first resonance, worst
//	                           watched harmonic, energisation peak, severity; the flags
//	                           in words
//	screenInventory(...)       every row, in parallel over the cores (batch_run.go)
//	batchTable(results)        the summary table, worst first
//
// The output folder follows the report's rules (outputFolder, outfolder.go): batch.csv
// and batch.html, moved into place only when complete, in a folder of its own kind.

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strings"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/freqscan"
)

// openEndRiseScreenPU is the open-end rise above which a line is flagged
// (analysis.OpenEndRiseScreenPU).
const openEndRiseScreenPU = analysis.OpenEndRiseScreenPU

var batchCommand = func() *command {
	return &command{
		name:  "batch",
		args:  "LINES.csv --out DIR [--force] [--jobs N]",
		short: "screening of a line inventory (one line per CSV row)",
		long: `
Screens every line of an inventory (a CSV file, one line per row, columns named in the
first row; see "Line inventories" in the README) and writes one summary table, worst
first, to DIR/batch.csv and DIR/batch.html.

The line columns are the [line] keys of a study file (l or x, c or b, and the
zero-sequence r0, l0 or x0, c0 or b0, g0), read by the same loader with the same rules.
Each row becomes a study with the defaults of a study file (scan 1 Hz to 50 harmonics,
energisation by the numerical Laplace transform, a 1 pu step). For each line: the SIL,
the open-end (Ferranti) rise, the first resonance of the gain |Vr/E| and its gain, the
watched harmonic with the largest gain within its band (triplen harmonics on the
zero-sequence network, or marked "positive-sequence only" without zero-sequence
columns), the open-end energisation peak,
and the flags: a watched harmonic over the gain limit (2.0), an energisation peak above
2.0 pu, an open-end rise above 1.05 pu. "severity" is the largest of gain / limit,
peak / 2.0 and rise / 1.05; the table is sorted by it, so the lines that most exceed a
screening level come first (severity > 1 means flagged).

Rows are screened in parallel over the cores (--jobs); a progress bar is drawn on
standard error when it is a terminal. DIR follows the rules of the report command
(telegrapher help report): built beside and moved in when complete; in a folder an
earlier screening wrote only the files its marker lists are replaced; --force adds the
files to a folder telegrapher did not write, removing nothing; a report's folder and a
file given as DIR are refused, even with --force. DIR is checked before the screening
starts.`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			out := fs.String("out", "", "write the summary into folder `DIR` (required)")
			force := fs.Bool("force", false, "write into DIR even if telegrapher did not make it (overwrites its own file names only)")
			jobs := fs.Int("jobs", 0, "screen `N` lines at a time (0: one per core)")
			return func(ctx context.Context, args []string) error {
				const usage = "usage: telegrapher batch LINES.csv --out DIR [--force] [--jobs N]"
				if len(args) != 1 {
					return usagef("telegrapher batch: expected one LINES.csv file, got %d arguments\n%s", len(args), usage)
				}
				if *out == "" {
					return usagef("telegrapher batch: --out DIR is required\n%s", usage)
				}
				if *jobs < 0 {
					return usagef("telegrapher batch: --jobs: must be >= 0, got %d", *jobs)
				}
				f, err := os.Open(args[0])
				if err != nil {
					var pe *os.PathError
					if errors.As(err, &pe) {
						err = pe.Err
					}
					return usagef("%s: cannot read the inventory: %v", args[0], err)
				}
				lines, err := parseBatch(args[0], f)
				f.Close()
				if err != nil {
					return err
				}
				// The folder first: a refusal comes before the screening, not after it.
				folder, err := newOutputFolder(*out, kindBatch, *force)
				if err != nil {
					return err
				}
				defer folder.discard() // nothing to do once committed
				var progress func(int)
				status := newStatusLine(stderr)
				if status != nil {
					status.Stage("batch")
					progress = func(done int) { status.Count(done, len(lines), "lines") }
				}
				results, err := screenInventory(ctx, args[0], lines, *jobs, progress)
				status.Clear()
				if err != nil {
					return folder.interrupted(ctx, err)
				}
				if err := writeBatch(results, args[0], folder); err != nil {
					return err
				}
				printBatch(stdout, results, *out)
				return nil
			}
		},
	}
}()

// batchResult is the screening of one line.
type batchResult struct {
	Row  int
	Name string

	SILMW          float64
	OpenEndRisePU  float64
	FirstHz        float64 // 0 = no resonance in the band
	FirstHarmonic  float64
	FirstGain      float64 // +Inf when unbounded
	WorstOrder     int     // 0 = no watched harmonic in the band
	WorstBandGain  float64
	WorstSequence  string // the network the worst harmonic was screened on (freqscan.Sequence)
	GainLimit      float64
	EnergisePeakPU float64 // signed
	EnergiseTMs    float64
	Flags          []string
	Severity       float64
}

// screenLine screens one row: its study (through the study loader) screened by
// analysis.ScreenLine, in display units with its flags in words.
func screenLine(ctx context.Context, file string, bl batchLine) (batchResult, error) {
	st, err := bl.study(file)
	if err != nil {
		return batchResult{}, err
	}
	a, err := analysis.ScreenLine(ctx, st)
	if err != nil {
		return batchResult{}, err
	}
	f0 := st.Frequency
	r := batchResult{Row: bl.Row, Name: bl.Name, SILMW: a.SIL / 1e6, OpenEndRisePU: a.OpenEndRise,
		GainLimit: a.Screening.GainLimit, EnergisePeakPU: a.EnergisePeak, EnergiseTMs: a.EnergiseT * 1e3, Severity: a.Severity}
	if p := a.First; a.HasFirst {
		r.FirstHz, r.FirstHarmonic, r.FirstGain = p.F, p.F/f0, p.Gain
		if p.Unbounded {
			r.FirstGain = math.Inf(1)
		}
	}
	if h := a.Worst; a.HasWorst {
		r.WorstOrder, r.WorstBandGain, r.WorstSequence = h.Order, h.BandGain, string(h.Sequence)
	}
	for _, h := range a.Screening.Rows {
		if h.Watched && h.OverLimit {
			r.Flags = append(r.Flags, fmt.Sprintf("h%d%s gain %s > %g", h.Order, sequenceMark(string(h.Sequence)), fmtGain(h.BandGain), a.Screening.GainLimit))
		}
	}
	if a.EnergiseOver {
		r.Flags = append(r.Flags, fmt.Sprintf("energisation %.2f pu > %.1f", math.Abs(r.EnergisePeakPU), energisePeakScreenPU))
	}
	if r.OpenEndRisePU > openEndRiseScreenPU {
		r.Flags = append(r.Flags, fmt.Sprintf("open-end rise %.3f pu > %.2f", r.OpenEndRisePU, openEndRiseScreenPU))
	}
	return r, nil
}

// sequenceMark words the network a triplen harmonic was screened on: " (zero
// sequence)", or " (positive-sequence only)" for a line without zero-sequence data;
// "" for the other harmonics.
func sequenceMark(seq string) string {
	switch freqscan.Sequence(seq) {
	case freqscan.Zero:
		return " (zero sequence)"
	case freqscan.PositiveOnly:
		return " (positive-sequence only)"
	}
	return ""
}

// screenInventory screens every line on up to jobs goroutines (0 = one per core) and
// returns the results worst first. The first error (in row order) is returned; when ctx
// is cancelled, the rows not yet started are skipped and ctx's error is returned.
func screenInventory(ctx context.Context, file string, lines []batchLine, jobs int, progress func(int)) ([]batchResult, error) {
	results := make([]batchResult, len(lines))
	errs := make([]error, len(lines))
	parallelEach(len(lines), jobs, progress, func(i int) {
		defer func() {
			if p := recover(); p != nil {
				errs[i] = fmt.Errorf("%s: row %d: internal error (a bug, please report it): %v", file, lines[i].Row, p)
			}
		}()
		if errs[i] = ctx.Err(); errs[i] != nil {
			return
		}
		results[i], errs[i] = screenLine(ctx, file, lines[i])
	})
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	sort.SliceStable(results, func(a, b int) bool {
		if results[a].Severity != results[b].Severity {
			return results[a].Severity > results[b].Severity
		}
		return results[a].Row < results[b].Row
	})
	return results, nil
}

// batchTable is the summary table, in the order of results. A gain that is unbounded
// (a lossless network) is written "unbounded" (no Inf reaches an output).
func batchTable(results []batchResult) (*report.Table, error) {
	t := report.NewTable("rank", "row", "name", "severity", "sil_mw", "open_end_rise_pu",
		"first_resonance_hz", "first_resonance_harmonic", "first_resonance_gain",
		"worst_watched_harmonic", "worst_watched_gain", "worst_watched_sequence", "gain_limit",
		"energise_peak_pu", "energise_t_peak_ms", "flags")
	for i, r := range results {
		first := []any{"", "", ""}
		if r.FirstHz > 0 {
			first = []any{r.FirstHz, r.FirstHarmonic, r.FirstGain}
			if math.IsInf(r.FirstGain, 1) {
				first[2] = "unbounded"
			}
		}
		worst := []any{"", "", ""}
		if r.WorstOrder > 0 {
			worst = []any{r.WorstOrder, r.WorstBandGain, r.WorstSequence}
			if math.IsInf(r.WorstBandGain, 1) {
				worst[1] = "unbounded"
			}
		}
		sev := any(r.Severity)
		if r.Severity == math.MaxFloat64 {
			sev = "unbounded"
		}
		row := []any{i + 1, r.Row, r.Name, sev, r.SILMW, r.OpenEndRisePU}
		row = append(row, first...)
		row = append(row, worst...)
		row = append(row, r.GainLimit, r.EnergisePeakPU, r.EnergiseTMs, strings.Join(r.Flags, "; "))
		if err := t.Add(row...); err != nil {
			return nil, fmt.Errorf("row %d (%s): %w", r.Row, r.Name, err)
		}
	}
	return t, nil
}

// batchView is the table as the HTML page shows it: rounded, with units in the headers.
func batchView(results []batchResult) *report.Table {
	t := report.NewTable("rank", "row", "name", "severity", "SIL (MW)", "open-end rise (pu)",
		"first resonance", "worst watched harmonic", "energisation peak (pu)", "flags")
	g := func(v float64) string {
		if math.IsInf(v, 1) || v == math.MaxFloat64 {
			return "unbounded"
		}
		return fmt.Sprintf("%.3g", v)
	}
	for i, r := range results {
		first, worst := "none in band", "none"
		if r.FirstHz > 0 {
			first = fmt.Sprintf("h %.2f (%.4g Hz), gain %s", r.FirstHarmonic, r.FirstHz, g(r.FirstGain))
		}
		if r.WorstOrder > 0 {
			worst = fmt.Sprintf("h%d%s, gain %s", r.WorstOrder, sequenceMark(r.WorstSequence), g(r.WorstBandGain))
		}
		flags := strings.Join(r.Flags, "; ")
		if flags == "" {
			flags = "none"
		}
		_ = t.Add(fmt.Sprint(i+1), fmt.Sprint(r.Row), r.Name, g(r.Severity), fmt.Sprintf("%.0f", r.SILMW),
			fmt.Sprintf("%.3f", r.OpenEndRisePU), first, worst, fmt.Sprintf("%+.3f", r.EnergisePeakPU), flags)
	}
	return t
}

// writeBatch writes batch.csv and batch.html into folder and commits it.
func writeBatch(results []batchResult, file string, folder *outputFolder) error {
	t, err := batchTable(results)
	if err != nil {
		return err
	}
	flagged := 0
	for _, r := range results {
		if len(r.Flags) > 0 {
			flagged++
		}
	}
	sec := report.Section{ID: "inventory", Title: "Line inventory screening", Verdict: report.Pass,
		Reading: fmt.Sprintf("%d lines screened, %d flagged", len(results), flagged),
		Tables:  []report.TableView{{Caption: "Worst first (severity: largest ratio of a result to its screening level)", Table: batchView(results)}},
		Files:   []string{"batch.csv"},
		Notes: []string{
			fmt.Sprintf("Screening levels: gain within ±10 %% of a watched harmonic (odd 3 to 25) against the gain limit; open-end energisation peak (1 pu step, numerical Laplace transform, far end open) against %.1f pu; open-end rise at the system frequency against %.2f pu.", energisePeakScreenPU, openEndRiseScreenPU),
			"Triplen harmonics are screened on the zero-sequence network of a line whose row gives zero-sequence constants (r0, l0 or x0, c0 or b0), and marked positive-sequence only where it does not.",
			"Each line uses the defaults of a study file; give a line its own study file for anything beyond the inventory's columns (loads, bus shunts, settings).",
		}}
	if flagged > 0 {
		sec.Verdict = report.Flagged
	}
	doc := &report.Document{Title: "telegrapher batch screening: " + file, StudyFile: file, InputLabel: "Line inventory",
		Generator: "telegrapher " + version, Caution: Caution, Sections: []report.Section{sec}}
	page, err := report.HTML(doc)
	if err != nil {
		return err
	}
	if err := folder.write("batch.csv", t.CSV()); err != nil {
		return err
	}
	if err := folder.write("batch.html", page); err != nil {
		return err
	}
	return folder.commit()
}

// printBatch prints the worst lines and where the table is.
func printBatch(w io.Writer, results []batchResult, out string) {
	flagged := 0
	for _, r := range results {
		if len(r.Flags) > 0 {
			flagged++
		}
	}
	fmt.Fprintf(w, "%d lines screened, %d flagged.\n", len(results), flagged)
	for i, r := range results {
		if i == 10 || len(r.Flags) == 0 {
			break
		}
		fmt.Fprintf(w, "  %2d. %-28s (row %d): %s\n", i+1, r.Name, r.Row, strings.Join(r.Flags, "; "))
	}
	fmt.Fprintf(w, "Summary table: %s and %s\n\n%s\n", out+string(os.PathSeparator)+"batch.csv", out+string(os.PathSeparator)+"batch.html", Caution)
}
