// Command tangent finds the bias point of a transistor or diode circuit,
// linearizes every device there and derives the small-signal port ratios,
// poles and zeros. Run "tangent help" for the subcommands.
package main

import (
	"fmt"
	"io"
	"os"
	"sort"
)

// Exit statuses.
const (
	exitOK       = 0
	exitAnalysis = 1 // no convergence, singular circuit
	exitUsage    = 2 // bad input file or flags
)

// command is one subcommand. run returns the exit status; it writes results
// to stdout and messages to stderr.
type command struct {
	summary string
	run     func(args []string, stdout, stderr io.Writer) int
}

// commands is filled by the init functions of the subcommand files
// (check.go, bias.go, ...). It is written only during package
// initialisation and read-only afterwards.
var commands = map[string]command{}

func register(name, summary string, run func(args []string, stdout, stderr io.Writer) int) {
	commands[name] = command{summary: summary, run: run}
}

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		usage(stdout)
		return exitOK
	}
	c, ok := commands[args[0]]
	if !ok {
		fmt.Fprintf(stderr, "tangent: unknown subcommand %q\n", args[0])
		usage(stderr)
		return exitUsage
	}
	return c.run(args[1:], stdout, stderr)
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "usage: tangent SUBCOMMAND [FILE] [flags]")
	fmt.Fprintln(w, "With no FILE a subcommand runs on the embedded default example.")
	fmt.Fprintln(w, "\nsubcommands:")
	names := make([]string, 0, len(commands))
	for n := range commands {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(w, "  %-10s %s\n", n, commands[n].summary)
	}
}
