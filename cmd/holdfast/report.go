package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
	"golang.org/x/term"

	"holdfast/assess/gate"
	"holdfast/report"
)

func newReportCmd() *cobra.Command {
	var (
		md, html, plots string
		png             bool
		requires        []string
		quiet           bool
	)
	c := &cobra.Command{
		Use:   "report RESULT.json --md FILE --html FILE [--plots DIR]",
		Short: "Render a saved result as a Markdown or HTML report with plots",
		Long: `report renders a result file saved with --out by assess, sensitivity or
sweep into a report to attach to a planning report or a design review,
without running the model again: the caution notice, the inputs, the
method with the run's own settings, the results with their intervals, plots, every
warning, and the exact command and scenario text to reproduce the run.

  --md FILE     Markdown that reads on any Markdown viewer; its plots go as
                SVG files to --plots DIR, or beside it in FILE-plots/.
  --html FILE   one self-contained HTML page (inline style and plots, no
                scripts, nothing fetched), printable to PDF from a browser.
  --plots DIR   the plot files (SVG, and PNG with --png).

The same result file always renders to the same bytes. The result must be
one this holdfast reads (same or older schema), complete, and with its
embedded scenario text unchanged.

--require "LABEL VERDICT OP PROBABILITY" (repeatable) judges requirements on
an assess result, on the end of each probability's 95% interval; the exit
status is 3 when one is not met.`,
		Example: `  holdfast assess demo:lake --seed 7 --out lake.json
  holdfast report lake.json --md lake.md --html lake.html
  holdfast report lake.json --html review/lake.html --require "E1 attracting >= 0.95"`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			opt := report.ReportOptions{Markdown: md, HTML: html, PlotsDir: plots, PNG: png}
			reqs, err := gate.ParseAll(requires)
			if err != nil {
				return badInput(fmt.Errorf("--require: %w", err))
			}
			if !opt.Any() && len(reqs) == 0 {
				return badInput(errors.New("nothing to do: give --md FILE, --html FILE, --plots DIR or --require"))
			}
			if png && !opt.Any() {
				return badInput(errors.New("--png needs --plots DIR or --md FILE"))
			}
			saved, err := report.ReadResult(args[0])
			if err != nil {
				return badInput(err)
			}
			env := saved.Envelope()
			opt.Protect = []string{args[0]}
			if !strings.HasPrefix(env.Scenario, "demo:") && env.Scenario != "" {
				opt.Protect = append(opt.Protect, env.Scenario)
			}
			var outs []gate.Outcome
			if len(reqs) > 0 {
				if saved.Assess == nil {
					return badInput(fmt.Errorf("--require: a %s result has no probabilities to judge; requirements apply to assess results", saved.Kind))
				}
				if outs, err = saved.Assess.Judge(reqs); err != nil {
					return badInput(err)
				}
				saved.Assess.Requirements = report.NewRequirementsJSON(outs)
			}
			w := cmd.OutOrStdout()
			if opt.Any() {
				rs, err := report.PrepareReports(opt)
				if err != nil {
					return badInput(err)
				}
				defer rs.Abort()
				if err := rs.Write(saved); err != nil {
					return failed(err)
				}
				if !quiet {
					fmt.Fprintf(w, "Wrote %s.\n", describeWritten(rs.Written()))
				}
			}
			if !quiet {
				report.RequirementLines(w, outs, painter(w))
				fmt.Fprintf(w, "\n%s\n", report.Caution)
			}
			return gateError(outs)
		},
	}
	f := c.Flags()
	f.StringVar(&md, "md", "", "write the Markdown report to this file")
	f.StringVar(&html, "html", "", "write the self-contained HTML report to this file")
	f.StringVar(&plots, "plots", "", "write the plots as SVG files into this folder (default with --md: beside it, FILE-plots/)")
	f.BoolVar(&png, "png", false, "also write each plot as PNG")
	f.StringArrayVar(&requires, "require", nil, `requirement to judge, e.g. "E2 attracting >= 0.95" (repeatable; exit status 3 when not met)`)
	f.BoolVar(&quiet, "quiet", false, "print nothing but errors")
	return c
}

// reportFlags are the report options shared by the commands that run a
// model: --report, --plots and --png.
type reportFlags struct {
	reports []string
	plots   string
	png     bool
}

// any reports whether a report or plots were asked for.
func (r *reportFlags) any() bool { return len(r.reports) > 0 || r.plots != "" || r.png }

func (r *reportFlags) add(f *pflag.FlagSet) {
	f.StringArrayVar(&r.reports, "report", nil, "also write a report: FILE.md (Markdown, plots in FILE-plots/) or FILE.html (self-contained); repeatable")
	f.StringVar(&r.plots, "plots", "", "write the report's plots as SVG files into this folder")
	f.BoolVar(&r.png, "png", false, "also write each plot as PNG")
}

// prepare checks and stages the report files before the run, so that a
// bad path fails fast; nil when no report is asked for.
func (r *reportFlags) prepare(protect ...string) (*report.Reports, error) {
	md, html, err := report.SortReportPaths(r.reports)
	if err != nil {
		return nil, badInput(err)
	}
	opt := report.ReportOptions{Markdown: md, HTML: html, PlotsDir: r.plots, PNG: r.png, Protect: protect}
	if !opt.Any() {
		if r.png {
			return nil, badInput(errors.New("--png needs --report FILE.md or --plots DIR"))
		}
		return nil, nil
	}
	rs, err := report.PrepareReports(opt)
	if err != nil {
		return nil, badInput(err)
	}
	return rs, nil
}

func describeWritten(files []string) string {
	var plots, docs []string
	for _, f := range files {
		if strings.HasSuffix(f, ".svg") || strings.HasSuffix(f, ".png") {
			plots = append(plots, f)
		} else {
			docs = append(docs, f)
		}
	}
	parts := docs
	if len(plots) > 0 {
		parts = append(parts, fmt.Sprintf("%d plot files", len(plots)))
	}
	if len(parts) == 0 {
		return "no file"
	}
	return strings.Join(parts, ", ")
}

// gateError is the exit-status-3 error for requirements not met, or nil.
func gateError(outs []gate.Outcome) error {
	if err := report.GateFailure(outs); err != nil {
		return &codeError{code: exitGate, err: err}
	}
	return nil
}

// painter colours verdict words only when w is a terminal and NO_COLOR is
// not set (https://no-color.org; any value, even empty, turns colour off
// here).
func painter(w io.Writer) report.Painter {
	if _, set := os.LookupEnv("NO_COLOR"); set {
		return report.Painter{}
	}
	f, ok := w.(*os.File)
	return report.Painter{On: ok && term.IsTerminal(int(f.Fd()))}
}

// outputOnly are the flags that never change a result: the worker count,
// where outputs go and how they look, and how the run is split or saved.
// commandLine leaves them out, so that the recorded command is the same
// for one run, its shards merged, and a run resumed from a checkpoint.
var outputOnly = map[string]bool{
	"workers": true, "out": true, "report": true, "plots": true, "png": true, "format": true,
	"quiet": true, "draws-csv": true, "shard": true, "checkpoint": true, "resume": true, "checkpoint-every": true,
}

// commandLine reconstructs the command line for the result file: the
// command path, the arguments, then every flag given (in name order, each
// value of a repeated flag as given), leaving out the outputOnly ones.
func commandLine(cmd *cobra.Command, args []string) []string {
	words := strings.Fields(cmd.CommandPath())
	words = append(words, args...)
	var names []string
	cmd.Flags().Visit(func(f *pflag.Flag) {
		if !outputOnly[f.Name] {
			names = append(names, f.Name)
		}
	})
	sort.Strings(names)
	for _, n := range names {
		f := cmd.Flags().Lookup(n)
		if sv, ok := f.Value.(pflag.SliceValue); ok {
			for _, v := range sv.GetSlice() {
				words = append(words, "--"+n, v)
			}
			continue
		}
		if f.Value.Type() == "bool" {
			if f.Value.String() == "true" {
				words = append(words, "--"+n)
			} else {
				words = append(words, "--"+n+"=false")
			}
			continue
		}
		words = append(words, "--"+n, f.Value.String())
	}
	return words
}

// renderReports renders the staged reports from a result's JSON bytes as a
// file holds them (read back through report.LoadResult), so that holdfast
// report gives the same bytes later from the saved --out file.
func renderReports(reports *report.Reports, raw []byte) error {
	saved, err := report.LoadResult(raw)
	if err != nil {
		return fmt.Errorf("reading back the result: %w", err)
	}
	return reports.Write(saved)
}
