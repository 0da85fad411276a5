// Command auscult listens to a machine and tells when it sounds wrong.
//
// Offline commands work on WAV recordings; run and check listen live; see
// `auscult help`.
package main

import (
	"fmt"
	"io"
	"os"
	"strings"
)

// version is set at build time with -ldflags "-X main.version=...".
var version = "dev"

type command struct {
	name, args, summary string
	run                 func(args []string, stdout, stderr io.Writer) error
}

func commands() []command {
	return []command{
		{"simulate", "--out DIR [--seed N]", "write a synthetic pump-skid data set (train/ and test/ with labels.csv)", runSimulate},
		{"enroll", "--out BASELINE PATH...", "learn the healthy baseline from WAV files or folders", runEnroll},
		{"score", "--baseline BASELINE PATH...", "score WAV files against a baseline (CSV on stdout)", runScore},
		{"evaluate", "--baseline BASELINE --labels CSV DIR", "AUC and pAUC of labelled recordings, overall and per group", runEvaluate},
		{"run", "--config FILE [--source SPEC]", "listen continuously: alarms, trend and evidence into the local log", runRun},
		{"check", "--config FILE [--source SPEC]", "validate the config, the baseline, the log folder and the microphone level", runCheck},
		{"devices", "", "list the sound input devices live capture can open", runDevices},
		{"export", "(--url URL | --db FILE) [--what events|trend|summaries] [--format csv|json]", "take the log home: events, trend or summaries for a time range", runExport},
		{"backup", "(--url URL | --db FILE) --out FILE", "a consistent copy of the whole log, also from a running agent", runBackup},
		{"report", "(--url URL | --db FILE) --out FILE [--from --to]", "one self-contained HTML file for the visit record", runReport},
		{"version", "", "print the version", func(_ []string, out, _ io.Writer) error {
			fmt.Fprintln(out, "auscult", version)
			return nil
		}},
	}
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "auscult: acoustic condition monitoring for pumps and other rotating machines")
	fmt.Fprintln(w, "\nusage: auscult COMMAND [options]\n\ncommands:")
	for _, c := range commands() {
		fmt.Fprintln(w, strings.TrimRight(fmt.Sprintf("  %-9s %s", c.name, c.args), " "))
		fmt.Fprintf(w, "            %s\n", c.summary)
	}
	fmt.Fprintln(w, "\n`auscult COMMAND -h` lists a command's options.")
}

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// run is main without the process: it returns the exit code (0 ok, 1 the
// command failed, 2 the command line was wrong).
func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 || args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
		usage(stdout)
		if len(args) == 0 {
			return 2
		}
		return 0
	}
	for _, c := range commands() {
		if c.name != args[0] {
			continue
		}
		err := c.run(args[1:], stdout, stderr)
		switch {
		case err == nil:
			return 0
		case err == errHelp:
			return 0
		case isUsage(err):
			fmt.Fprintf(stderr, "auscult %s: %v\nusage: auscult %s %s\n", c.name, err, c.name, c.args)
			return 2
		default:
			fmt.Fprintf(stderr, "auscult %s: %v\n", c.name, err)
			return 1
		}
	}
	fmt.Fprintf(stderr, "auscult: unknown command %q\n", args[0])
	usage(stderr)
	return 2
}
