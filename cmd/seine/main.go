// Command seine trains, checks and uses small neural-network classifiers
// described by YAML specs.
//
// Usage:
//
//	seine <command> [flags]
//	seine help [command]
//
// The commands are train, evaluate, predict, report, export,
// gradient-check, inspect, compare, sweep and curve; `seine help COMMAND`
// describes each. Exit status is 0 on success, 1 when the work fails (bad
// data, bad spec, divergence), 2 on bad usage, and 130 or 143 when stopped
// by SIGINT or SIGTERM. Messages go to standard error and name the file, the
// line or row, and the field.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"sort"
	"strings"
	"syscall"
	"time"
)

// command is one subcommand of the tool.
type command struct {
	name    string
	args    string // synopsis of the flags
	summary string // one line
	help    string // paragraphs printed after the flags by -h; may be empty
	// run does the work. It returns a *usageError for bad usage (exit 2) and
	// any other error for a failure of the work (exit 1).
	run func(ctx context.Context, e *env, args []string) error
}

// env is what a command may touch of the outside world; tests replace it.
type env struct {
	stdin          io.Reader
	stdout, stderr io.Writer
	// terminal reports whether stderr is an interactive terminal (progress
	// bars) rather than a file or pipe (plain lines).
	terminal bool
	// flags is the flag set the command made last (newFlags), for
	// completion scripts.
	flags *flag.FlagSet
}

// usageError is bad usage: a wrong flag, a missing argument.
type usageError struct{ msg string }

func (e *usageError) Error() string { return e.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// commandList returns the command table. It is a function rather than a
// package variable because the commands' run functions call newFlags, which
// looks the table up: a variable would depend on itself.
func commandList() []*command {
	return []*command{
		{name: "train", help: trainHelp, args: "-spec FILE -data FILE -out FILE [flags]", summary: "train a model on CSV data and save it", run: runTrain},
		{name: "evaluate", help: evaluateHelp, args: "-model FILE -data FILE [-json] [-plot FILE]", summary: "score a model on labelled CSV data", run: runEvaluate},
		{name: "predict", help: predictHelp, args: "-model FILE -data FILE [-out FILE] [-probabilities]", summary: "classify the rows of a CSV file", run: runPredict},
		{name: "gradient-check", help: gradientCheckHelp, args: "-spec FILE [-data FILE] [-rows N] [-json]", summary: "check backpropagation against finite differences", run: runGradientCheck},
		{name: "export", help: exportHelp, args: "-model FILE -out FILE [-opset N]", summary: "write a model as an ONNX model for other runtimes", run: runExport},
		{name: "inspect", help: inspectHelp, args: "-spec FILE | -model FILE [-rows N]", summary: "describe a spec or model: layers, params, memory, FLOPs", run: runInspect},
		{name: "compare", help: compareHelp, args: "-spec FILE -data FILE -optimizers LIST [flags]", summary: "compare optimizers on the same objective from the same start", run: runCompare},
		{name: "sweep", help: sweepHelp, args: "-spec FILE -data FILE -l2 LIST [flags]", summary: "train at several penalty strengths and compare validation cost", run: runSweep},
		{name: "curve", help: curveHelp, args: "-spec FILE -data FILE [-steps N] [flags]", summary: "learning curve: cost against the number of training rows", run: runCurve},
		{name: "merge", help: mergeHelp, args: "[-json] [-plot FILE] [-trace FILE] PART...", summary: "put the parts of a sharded sweep, compare or curve back together", run: runMerge},
		{name: "report", help: reportHelp, args: "-model FILE -data FILE -out FILE [-repeats N] [-seed S]", summary: "write one self-contained HTML page about a model on labelled data", run: runReport},
		{name: "version", help: versionHelp, args: "", summary: "print the version, Go version, platform and matrix backend", run: runVersion},
		{name: "completion", help: completionHelp, args: "bash|zsh|fish", summary: "print a shell completion script made from the command table", run: runCompletion},
	}
}

func lookup(name string) *command {
	for _, c := range commandList() {
		if c.name == name {
			return c
		}
	}
	return nil
}

// grace is how long a command has, after SIGINT or SIGTERM, to stop on its
// own (readers and long loops watch the context and end within moments,
// saving what they promise to save); past it, or on a second signal, the
// process exits anyway. Files are only ever replaced by renaming a
// complete temporary file, so an exit at any moment leaves no half-written
// output.
const grace = 900 * time.Millisecond

// signalError is the cause of a context cancelled by a signal.
type signalError struct{ sig os.Signal }

func (e signalError) Error() string { return "stopped by " + signalName(e.sig) }

func signalName(sig os.Signal) string {
	switch sig {
	case os.Interrupt:
		return "SIGINT"
	case syscall.SIGTERM:
		return "SIGTERM"
	}
	return sig.String()
}

// status is the exit status of a process stopped by the signal: 128 plus
// its number, as shells report it (130 for SIGINT, 143 for SIGTERM).
func (e signalError) status() int {
	if n, ok := e.sig.(syscall.Signal); ok {
		return 128 + int(n)
	}
	return 130
}

func main() {
	sigs := make(chan os.Signal, 2)
	signal.Notify(sigs, os.Interrupt, syscall.SIGTERM)
	ctx, cancel := context.WithCancelCause(context.Background())
	go func() {
		sig := <-sigs
		se := signalError{sig}
		cancel(se)
		select {
		case <-time.After(grace):
		case <-sigs:
		}
		fmt.Fprintf(os.Stderr, "seine: %v\n", se)
		os.Exit(se.status())
	}()
	e := &env{stdin: os.Stdin, stdout: os.Stdout, stderr: os.Stderr, terminal: isTerminal(os.Stderr)}
	code := run(ctx, e, os.Args[1:])
	var se signalError
	if code != 0 && errors.As(context.Cause(ctx), &se) {
		code = se.status()
	}
	os.Exit(code)
}

// run executes the command line args and returns the exit status.
func run(ctx context.Context, e *env, args []string) int {
	if len(args) == 0 {
		topUsage(e.stderr)
		return 2
	}
	name := args[0]
	if name == "help" || name == "-h" || name == "-help" || name == "--help" {
		if len(args) > 1 {
			c := lookup(args[1])
			if c == nil {
				fmt.Fprintf(e.stderr, "seine help: unknown command %q\n", args[1])
				return 2
			}
			c.run(ctx, &env{stdout: e.stdout, stderr: e.stdout}, []string{"-h"})
			return 0
		}
		topUsage(e.stdout)
		return 0
	}
	c := lookup(name)
	if c == nil {
		fmt.Fprintf(e.stderr, "seine: unknown command %q (commands: %s; see 'seine help')\n", name, names())
		return 2
	}
	err := c.run(ctx, e, args[1:])
	var ue *usageError
	switch {
	case err == nil:
		return 0
	case errors.Is(err, flag.ErrHelp):
		return 0
	case errors.As(err, &ue):
		fmt.Fprintf(e.stderr, "seine %s: %v (see 'seine help %s')\n", c.name, oneLine(err), c.name)
		return 2
	default:
		fmt.Fprintf(e.stderr, "seine %s: %v\n", c.name, oneLine(err))
		return 1
	}
}

// oneLine folds a multi-line error (a list of spec problems) so that each
// problem still reads on its own line, indented under the first.
func oneLine(err error) string {
	return strings.ReplaceAll(strings.TrimRight(err.Error(), "\n"), "\n", "\n  ")
}

func names() string {
	cs := commandList()
	n := make([]string, len(cs))
	for i, c := range cs {
		n[i] = c.name
	}
	sort.Strings(n)
	return strings.Join(n, ", ")
}

func topUsage(w io.Writer) {
	fmt.Fprintln(w, "seine trains, checks and uses small neural-network classifiers described by YAML specs.")
	fmt.Fprintln(w, "\nUsage:\n  seine <command> [flags]\n  seine help <command>\n\nCommands:")
	for _, c := range commandList() {
		fmt.Fprintf(w, "  %-15s %s\n", c.name, c.summary)
		writeUsageDoc(w, c.name, "                  ")
	}
	fmt.Fprintln(w, "\nExit status: 0 success, 1 the work failed, 2 bad usage, 130/143 stopped by SIGINT/SIGTERM.")
}

// newFlags returns a flag set for command c. Parse errors come back from
// parseFlags as usage errors; -h prints the command's help to standard
// output and ends the command with status 0.
func newFlags(c string, e *env) *flag.FlagSet {
	fs := flag.NewFlagSet("seine "+c, flag.ContinueOnError)
	fs.SetOutput(e.stdout)
	e.flags = fs
	cmd := lookup(c)
	fs.Usage = func() {
		fmt.Fprintf(fs.Output(), "Usage: seine %s %s\n\n%s.\n\n", c, cmd.args, upperFirst(cmd.summary))
		writeUsageDoc(fs.Output(), c, "  ")
		fmt.Fprint(fs.Output(), "\nFlags:\n")
		fs.PrintDefaults()
		if cmd.help != "" {
			fmt.Fprint(fs.Output(), "\n"+cmd.help)
		}
	}
	return fs
}

// parseFlagsArgs is parseFlags for a command that takes positional
// arguments after its flags (fs.Args()).
func parseFlagsArgs(fs *flag.FlagSet, args []string) error {
	out := fs.Output()
	fs.SetOutput(io.Discard)
	err := fs.Parse(args)
	fs.SetOutput(out)
	if errors.Is(err, flag.ErrHelp) {
		fs.Usage()
		return flag.ErrHelp
	}
	if err != nil {
		return usagef("%v", err)
	}
	return nil
}

func upperFirst(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// parseFlags parses args into fs and turns flag's errors into usage errors.
// Extra positional arguments are a usage error.
func parseFlags(fs *flag.FlagSet, args []string) error {
	if err := parseFlagsArgs(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		if err := boolFlagValue(fs, args); err != nil {
			return err
		}
		return usagef("unexpected argument %q", fs.Arg(0))
	}
	return nil
}
