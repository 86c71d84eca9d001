package main

import (
	"bytes"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"holdfast/report"
)

// resultFiles are the files a command writes its result to besides
// standard output: staged before the run, so that a bad path fails
// before any work, and committed by write once every one is written.
type resultFiles struct {
	out     *report.Staged   // the --out file, or nil
	reports *report.Reports  // the --report files and plots, or nil
	staged  []*report.Staged // further outputs already written, committed with --out (nil entries skipped)
}

// stageResult stages the --out file (none when out is empty) and the
// reports asked for by rf, for a command that reads one scenario file:
// neither may overwrite the scenario, nor a report the --out file. The
// caller defers abort.
func stageResult(out string, rf *reportFlags, scenario string) (resultFiles, error) {
	var f resultFiles
	if out != "" {
		st, err := report.Stage(out, scenario)
		if err != nil {
			return resultFiles{}, badInput(err)
		}
		f.out = st
	}
	reports, err := rf.prepare(scenario, out)
	if err != nil {
		f.abort()
		return resultFiles{}, err
	}
	f.reports = reports
	return f, nil
}

// abort discards every file not committed yet, the reports first, so that
// folders created for --out are removed once they are empty again. It is
// safe after write.
func (f resultFiles) abort() {
	f.reports.Abort()
	for i := len(f.staged) - 1; i >= 0; i-- {
		f.staged[i].Abort()
	}
	f.out.Abort()
}

// write encodes the result document doc as JSON, writes it to the --out
// file, renders the reports from it (see renderReports), then commits the
// further outputs and --out, so that the files appear together once all
// are written. It then names the report files written on stderr (unless
// quiet) and prints the JSON (format "json") or the table drawn by table
// on stdout; with quiet and a file written, no table.
func (f resultFiles) write(cmd *cobra.Command, doc any, format string, quiet bool, table func(w io.Writer) error) error {
	var raw bytes.Buffer
	if err := report.WriteJSON(&raw, doc); err != nil {
		return failed(err)
	}
	if f.out != nil {
		if _, err := f.out.Write(raw.Bytes()); err != nil {
			return failed(err)
		}
	}
	if f.reports != nil {
		if err := renderReports(f.reports, raw.Bytes()); err != nil {
			return failed(err)
		}
	}
	for _, st := range append(f.staged, f.out) {
		if st != nil {
			if err := st.Commit(); err != nil {
				return failed(err)
			}
		}
	}
	if f.reports != nil && !quiet {
		fmt.Fprintf(cmd.ErrOrStderr(), "Wrote %s.\n", describeWritten(f.reports.Written()))
	}
	w := cmd.OutOrStdout()
	if format == "json" {
		_, err := w.Write(raw.Bytes())
		return failed(err)
	}
	if quiet && (f.out != nil || f.reports != nil) {
		return nil
	}
	return failed(table(w))
}
