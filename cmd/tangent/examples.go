package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"slices"

	"tangent/cases"
)

func init() {
	register("examples", "list the embedded example cases, or write them out", runExamples)
}

type exampleEntry struct {
	Name    string `json:"name"`
	Title   string `json:"title"`
	Default bool   `json:"default"`
	File    string `json:"file,omitempty"` // where --write put it
}

func runExamples(args []string, stdout, stderr io.Writer) int {
	flags := newFlags("examples", "tangent examples [NAME...] [--write DIR [--force]] [--json]",
		"List the example cases built into tangent (all, or the NAMEs given), or write them\n"+
			"to DIR as NAME.toml. Any subcommand runs on the default example when no FILE is\n"+
			"given, and on another one with FILE = example:NAME.", stderr)
	dir := flags.String("write", "", "write the examples to `DIR` (created if missing)")
	force := flags.Bool("force", false, "with --write, replace files that exist")
	asJSON := flags.Bool("json", false, "print the list as JSON on stdout")
	names, code, ok := parseFlags(flags, args, stderr)
	if !ok {
		return code
	}
	if len(names) == 0 {
		names = cases.Examples()
	}
	for _, n := range names {
		if !slices.Contains(cases.Examples(), n) {
			_, err := cases.ExampleSource(n)
			fmt.Fprintf(stderr, "tangent examples: %v\n", err)
			return exitUsage
		}
	}
	if *force && *dir == "" {
		fmt.Fprintln(stderr, "tangent examples: --force needs --write DIR")
		return exitUsage
	}

	var list []exampleEntry
	for _, n := range names {
		c, err := cases.Example(n)
		if err != nil { // an embedded example must be valid; the tests check it
			printError(stderr, err)
			return exitAnalysis
		}
		list = append(list, exampleEntry{Name: n, Title: c.Title, Default: n == cases.DefaultExample})
	}

	if *dir != "" {
		if err := os.MkdirAll(*dir, 0o755); err != nil {
			fmt.Fprintf(stderr, "tangent examples: %v\n", err)
			return exitAnalysis
		}
		for i, e := range list {
			path := filepath.Join(*dir, e.Name+".toml")
			if _, err := os.Stat(path); err == nil && !*force {
				fmt.Fprintf(stderr, "tangent examples: %s exists; use --force to replace it\n", path)
				return exitUsage
			} else if err != nil && !errors.Is(err, fs.ErrNotExist) {
				fmt.Fprintf(stderr, "tangent examples: %v\n", err)
				return exitAnalysis
			}
			src, _ := cases.ExampleSource(e.Name)
			if err := os.WriteFile(path, src, 0o644); err != nil {
				fmt.Fprintf(stderr, "tangent examples: %v\n", err)
				return exitAnalysis
			}
			list[i].File = path
		}
	}

	if *asJSON {
		writeJSON(stdout, map[string]any{"examples": list})
		return exitOK
	}
	var b bytes.Buffer
	for _, e := range list {
		mark := ""
		if e.Default {
			mark = " (default)"
		}
		if e.File != "" {
			fmt.Fprintf(&b, "wrote %s  %s%s\n", e.File, e.Title, mark)
		} else {
			fmt.Fprintf(&b, "%-18s %s%s\n", e.Name, e.Title, mark)
		}
	}
	stdout.Write(b.Bytes())
	return exitOK
}
