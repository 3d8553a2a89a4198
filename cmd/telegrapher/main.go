// Command telegrapher is a frequency and transient line-response analyser for overhead
// transmission lines: line constants, harmonic scans, energisation and switching
// overvoltages, and loading against the surge-impedance loading, driven by one study
// file.
//
// Usage:
//
//	telegrapher COMMAND [flags] [STUDY]
//
// Run `telegrapher help` for the list of commands.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// version is set at build time with -ldflags "-X main.version=..."; "dev" otherwise.
var version = "dev"

func main() {
	os.Exit(runSignals(os.Args[1:], os.Stdout, os.Stderr))
}

// runSignals is runContext with a context that Ctrl-C and SIGTERM cancel: the command
// stops at its next check, writes nothing more, and the status is 130. A second
// Ctrl-C ends the process at once (the default handling is restored).
func runSignals(args []string, stdout, stderr io.Writer) int {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	go func() {
		<-ctx.Done()
		stop()
	}()
	return runContext(ctx, args, stdout, stderr)
}

// command is one entry of the command table.
type command struct {
	name  string
	args  string // the usage line after the command name
	short string // one line for the list of commands
	long  string // paragraphs for `help COMMAND`
	// flags declares the command's flags on fs and returns the function that runs it
	// with the positional arguments.
	flags func(fs *flag.FlagSet, stdout, stderr io.Writer) func(ctx context.Context, args []string) error
}

// commandList is every command, in the order of `telegrapher help`; each command's
// definition is a package-level variable in its own file.
var commandList = []*command{
	batchCommand,
	checkCommand,
	constantsCommand,
	demoCommand,
	energiseCommand,
	loadingCommand,
	remedyCommand,
	reportCommand,
	scanCommand,
	switchingCommand,
}

// commands indexes commandList by name. It is filled by init rather than by its
// initialiser because the commands' own code looks commands up (studyArg), which would
// make the initialisation of commandList depend on itself.
var commands = map[string]*command{}

func init() {
	for _, c := range commandList {
		commands[c.name] = c
	}
}

// aliases maps accepted alternative spellings to command names.
var aliases = map[string]string{"energize": "energise"}

// usageError is bad usage or bad input: exit status 2.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

// usagef returns a usageError.
func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// run is the whole CLI without cancellation (runContext with context.Background()).
func run(args []string, stdout, stderr io.Writer) int {
	return runContext(context.Background(), args, stdout, stderr)
}

// statusInterrupted is the exit status of a run whose context was cancelled (an
// interrupt: 128 + SIGINT).
const statusInterrupted = 130

// runContext is the whole CLI: it returns the exit status (0 success, 2 bad usage or
// input, 1 any other failure, 130 when ctx was cancelled, by Ctrl-C or SIGTERM in
// main) and never panics on user input. A cancelled command writes nothing more to
// stdout and leaves no output folder.
func runContext(ctx context.Context, args []string, stdout, stderr io.Writer) (status int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(stderr, "telegrapher: internal error (a bug, please report it): %v\n", r)
			status = 1
		}
	}()
	if len(args) == 0 {
		printCommands(stderr)
		return 2
	}
	name := args[0]
	if a, ok := aliases[name]; ok {
		name = a
	}
	switch name {
	case "help", "-h", "-help", "--help":
		return help(args[1:], stdout, stderr)
	case "version", "--version", "-version":
		fmt.Fprintf(stdout, "telegrapher %s\n", version)
		return 0
	}
	c, ok := commands[name]
	if !ok {
		fmt.Fprintf(stderr, "telegrapher: unknown command %q%s\nRun 'telegrapher help' for the list of commands.\n", args[0], suggestCommand(args[0]))
		return 2
	}
	fs := flag.NewFlagSet(c.name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	do := c.flags(fs, stdout, stderr)
	positional, err := parseInterleaved(fs, args[1:])
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			commandHelp(c, stdout)
			return 0
		}
		fmt.Fprintf(stderr, "telegrapher %s: %v\nusage: telegrapher %s %s\n", c.name, err, c.name, c.args)
		return 2
	}
	if err := do(ctx, positional); err != nil {
		if ctx.Err() != nil && errors.Is(err, ctx.Err()) {
			var ie *interruptedError
			if errors.As(err, &ie) {
				fmt.Fprintln(stderr, ie.Error())
			} else {
				fmt.Fprintf(stderr, "telegrapher %s: interrupted; nothing written\n", c.name)
			}
			return statusInterrupted
		}
		fmt.Fprintln(stderr, err.Error())
		var ue *usageError
		if errors.As(err, &ue) || isInputError(err) {
			return 2
		}
		return 1
	}
	return 0
}

// isInputError reports whether err is a problem with the user's input (set by the
// input-error types of the study and report packages through this hook).
var isInputError = func(err error) bool { return false }

// parseInterleaved parses flags that may stand before or after the positional
// arguments (the standard flag package stops at the first non-flag). "--" ends flags.
func parseInterleaved(fs *flag.FlagSet, args []string) ([]string, error) {
	var positional []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return positional, nil
		}
		// fs.Parse stops at "--" too; the flag package drops it, so detect it.
		consumed := len(args) - len(rest)
		if consumed > 0 && args[consumed-1] == "--" {
			return append(positional, rest...), nil
		}
		positional = append(positional, rest[0])
		args = rest[1:]
	}
}

func printCommands(w io.Writer) {
	fmt.Fprintln(w, "telegrapher: frequency and transient line-response analyser for overhead lines")
	fmt.Fprintln(w, "\nusage: telegrapher COMMAND [flags] [STUDY]\n\ncommands:")
	for _, c := range commandList {
		fmt.Fprintf(w, "  %-10s %s\n", c.name, c.short)
	}
	fmt.Fprintf(w, "  %-10s %s\n  %-10s %s\n", "help", "help on a command", "version", "print the version")
	fmt.Fprintln(w, "\nRun 'telegrapher help COMMAND' for a command's flags.")
	fmt.Fprintln(w, "\n"+Caution)
}

func help(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		printCommands(stdout)
		return 0
	}
	name := args[0]
	if a, ok := aliases[name]; ok {
		name = a
	}
	switch name {
	case "help":
		fmt.Fprint(stdout, "usage: telegrapher help [COMMAND]\n\nWithout COMMAND, lists the commands; with one, prints its usage, what it does and its flags.\n")
		return 0
	case "version":
		fmt.Fprint(stdout, "usage: telegrapher version\n\nPrints the version of this build (set at build time; \"dev\" for a build from source).\n")
		return 0
	}
	c, ok := commands[name]
	if !ok {
		fmt.Fprintf(stderr, "telegrapher help: unknown command %q%s\n", args[0], suggestCommand(args[0]))
		return 2
	}
	commandHelp(c, stdout)
	return 0
}

func commandHelp(c *command, w io.Writer) {
	fmt.Fprintf(w, "usage: telegrapher %s %s\n\n%s\n", c.name, c.args, strings.TrimSpace(c.long))
	fs := flag.NewFlagSet(c.name, flag.ContinueOnError)
	c.flags(fs, io.Discard, io.Discard)
	has := false
	fs.VisitAll(func(*flag.Flag) { has = true })
	if has {
		fmt.Fprintln(w, "\nflags:")
		fs.SetOutput(w)
		fs.PrintDefaults()
	}
}

func suggestCommand(s string) string {
	names := make([]string, 0, len(commandList))
	for _, c := range commandList {
		names = append(names, c.name)
	}
	return study.DidYouMean(s, names)
}

// Caution is the safety note every report and the help text carry.
const Caution = "Caution: telegrapher screens and plans; it does not certify. Its results depend on the data given " +
	"and do not replace a detailed study, the applicable standards and codes, or the judgement of a licensed engineer."

// studyArg is the common start of a command that takes one STUDY: it checks that
// args holds exactly one file, that each file flag given (name, path) ends in .png or
// .svg, and loads the study, writing its warnings to stderr. Every failure is an input
// error (exit 2).
func studyArg(cmd string, args []string, stderr io.Writer, plotFlags ...[2]string) (*study.Study, error) {
	if len(args) != 1 {
		usage := "STUDY"
		if c, ok := commands[cmd]; ok {
			usage = c.args
		}
		return nil, usagef("telegrapher %s: expected one study file, got %d arguments\nusage: telegrapher %s %s", cmd, len(args), cmd, usage)
	}
	for _, f := range plotFlags {
		if f[1] != "" {
			if _, err := report.PlotFormat(f[1], f[0]); err != nil {
				return nil, usagef("%v", err)
			}
		}
	}
	st, err := study.Load(args[0]) // a study input error: exit 2 (errors.go)
	if err != nil {
		return nil, err
	}
	for _, w := range st.Warnings {
		fmt.Fprintf(stderr, "%s: warning: %s\n", st.File, w)
	}
	return st, nil
}
