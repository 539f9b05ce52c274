// Command reticle is the headless twin of the Reticle desktop program: it
// runs the same analysis on scan files from the command line, for batches
// and scripts.
//
// Usage:
//
//	reticle peaks [options] FILE...
//	reticle index [options] FILE...
//	reticle refine --cell CELL [options] FILE...
//	reticle contents --cell CELL --formula F [--z N | --density D]
//	reticle report --out DIR [options] FILE...
//
// `reticle COMMAND --help` lists the options of each command.
package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"strings"
	"syscall"
)

func main() {
	if os.Getenv("GOGC") == "" {
		// A command lives for one scan or one batch: the collector runs
		// when the heap has grown by four times the live data, not once,
		// trading memory for time (BENCHMARKS.md), and past maxHeap as
		// often as it must.
		debug.SetGCPercent(400)
		if os.Getenv("GOMEMLIMIT") == "" {
			debug.SetMemoryLimit(maxHeap)
		}
	}
	// Ctrl-C (or a termination request) cancels the work in progress:
	// a batch stops, says which scans were finished, and exits with 130.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := runContext(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// exitInterrupted is the exit status of a command stopped by Ctrl-C
// (128 + SIGINT, the shells' convention).
const exitInterrupted = 130

// maxHeap is the heap size, in bytes, beyond which the command collects
// garbage as often as it must to stay there.
const maxHeap = 2 << 30

// usage is the top-level help.
func usage() string {
	var b strings.Builder
	b.WriteString("reticle: powder diffraction scans from the command line\n\nusage:\n")
	for _, c := range []command{cmdPeaks, cmdIndex, cmdRefine, cmdFit, cmdContents, cmdReport} {
		fmt.Fprintf(&b, "  reticle %s %s\n      %s\n", commandNames[c], synopsis[c], wrap(about[c], 5, 78))
	}
	b.WriteString("\n`reticle COMMAND --help` lists the options of a command.\n")
	return b.String()
}

// run executes one command line and returns the process exit status.
func run(args []string, stdout, stderr io.Writer) int {
	return runContext(context.Background(), args, stdout, stderr)
}

// runContext is run with a context that cancels the work.
func runContext(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage())
		return 2
	}
	switch args[0] {
	case "peaks":
		return cmdPeaksRun(ctx, args[1:], stdout, stderr)
	case "index":
		return cmdIndexRun(ctx, args[1:], stdout, stderr)
	case "refine":
		return cmdRefineRun(ctx, args[1:], stdout, stderr)
	case "fit":
		return cmdFitRun(ctx, args[1:], stdout, stderr)
	case "contents":
		return cmdContentsRun(args[1:], stdout, stderr)
	case "report":
		return cmdReportRun(ctx, args[1:], stdout, stderr)
	case "help", "-h", "--help":
		fmt.Fprint(stdout, usage())
		return 0
	}
	fmt.Fprintf(stderr, "reticle: unknown command %q\n\n%s", args[0], usage())
	return 2
}

// start parses a command's options and checks its settings; it reports
// the exit status to use when the command must stop.
func start(c command, args []string, stderr io.Writer) (*request, []string, int, bool) {
	r, files, err := parse(c, args, stderr)
	if err == errHelp {
		return nil, nil, 0, false
	}
	if err == nil {
		err = r.settings.Check()
	}
	if err != nil {
		fmt.Fprintf(stderr, "reticle %s: %v\n", commandNames[c], err)
		return nil, nil, 2, false
	}
	return r, files, 0, true
}
