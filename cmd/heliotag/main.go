// Command heliotag adds the sun's position and natural-light columns to
// files of located, timed events (CSV and TSV in this version).
//
//	heliotag enrich [flags] INPUT
//	heliotag inspect [flags] INPUT
//	heliotag version
//
// Run `heliotag help` or `heliotag enrich --help` for the flags and worked
// examples.
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
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

const usage = `heliotag adds the sun's position and natural-light columns to located, timed records.

Usage:
  heliotag enrich [flags] INPUT     write INPUT with sun columns added
  heliotag inspect [flags] INPUT    show how enrich would read INPUT
  heliotag version                  print the version
  heliotag help [COMMAND]           show help

Run 'heliotag enrich --help' for flags and worked examples.
`

// run is the whole program; it returns the exit code.
func run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return 2
	}
	switch args[0] {
	case "enrich":
		return runEnrich(ctx, args[1:], stdin, stdout, stderr)
	case "inspect":
		return runInspect(ctx, args[1:], stdin, stdout, stderr)
	case "version", "--version", "-version":
		return runVersion(stdout)
	case "help", "-h", "--help", "-help":
		if len(args) > 1 {
			return run(ctx, []string{args[1], "--help"}, stdin, stdout, stderr)
		}
		fmt.Fprint(stdout, usage)
		return 0
	}
	fmt.Fprintf(stderr, "heliotag: unknown command %q\n\n%s", args[0], usage)
	return 2
}

// parseInterspersed parses flags that may come before or after positional
// arguments (`heliotag enrich in.csv --tz UTC`). A lone "--" ends the flags.
func parseInterspersed(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if len(args) > len(rest) && args[len(args)-len(rest)-1] == "--" {
			return append(pos, rest...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// flagError reports a usage problem and returns exit code 2.
func flagError(stderr io.Writer, cmd string, err error) int {
	if errors.Is(err, flag.ErrHelp) {
		return 0
	}
	fmt.Fprintf(stderr, "heliotag %s: %v\nRun 'heliotag %s --help' for usage.\n", cmd, err, cmd)
	return 2
}

// oneInput returns the single positional argument.
func oneInput(pos []string) (string, error) {
	switch len(pos) {
	case 0:
		return "", errors.New("missing INPUT (a file path, or - for stdin)")
	case 1:
		return pos[0], nil
	}
	return "", fmt.Errorf("one INPUT expected, got %d: %s", len(pos), strings.Join(pos, " "))
}
