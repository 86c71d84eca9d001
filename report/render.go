package report

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

// newDocument lays out the report of a saved result.
func newDocument(s *Saved) (*document, error) {
	switch {
	case s == nil:
		return nil, errors.New("no result to render")
	case s.Assess != nil:
		return assessDocument(s.Assess), nil
	case s.Sensitivity != nil:
		return sensitivityDocument(s.Sensitivity), nil
	case s.Sweep != nil:
		return sweepDocument(s.Sweep), nil
	}
	return nil, fmt.Errorf("no renderer for %q results", s.Kind)
}

// Plot is one rendered plot of a report.
type Plot struct {
	// Name is the file stem, e.g. "rate-band" or "slope-E2".
	Name    string
	Caption string
	SVG     []byte
	// PNG is set when asked for.
	PNG []byte
	// Err is set when the plot could not be drawn; the report then shows
	// its caption without a picture.
	Err error
}

// Plots draws every plot of the report of s, in report order.
func Plots(s *Saved, png bool) ([]Plot, error) {
	d, err := newDocument(s)
	if err != nil {
		return nil, err
	}
	return drawPlots(d, png), nil
}

// annotate adds to the caption of each plot that could not be drawn why,
// so that the report says so where the picture would be.
func annotate(d *document, plots []Plot) {
	for i, p := range plots {
		if p.Err != nil && i < len(d.figures) {
			d.figures[i].caption += " (The plot could not be drawn: " + p.Err.Error() + ".)"
		}
	}
}

func drawPlots(d *document, png bool) []Plot {
	var out []Plot
	for _, f := range d.figures {
		p := Plot{Name: f.name, Caption: fmt.Sprintf("Figure %d. %s", f.number, f.caption)}
		p.Err = plotErr(f.name, func() error {
			c, err := f.draw()
			if err != nil {
				return err
			}
			if p.SVG, err = c.svg(); err != nil {
				return err
			}
			if png {
				p.PNG, err = c.png()
			}
			return err
		})
		if p.Err != nil {
			p.SVG, p.PNG = nil, nil
		}
		out = append(out, p)
	}
	return out
}

// WriteMarkdown writes the Markdown report of s. link maps a plot's name
// to the relative path of its SVG file ("" or a nil link: no picture, the
// caption only).
func WriteMarkdown(w io.Writer, s *Saved, link func(name string) string) error {
	d, err := newDocument(s)
	if err != nil {
		return err
	}
	if link == nil {
		link = func(string) string { return "" }
	}
	return d.writeMarkdown(w, link)
}

// WriteHTML writes the HTML report of s as one self-contained page, the
// plots inline (drawn here) unless plots is false.
func WriteHTML(w io.Writer, s *Saved, plots bool) error {
	d, err := newDocument(s)
	if err != nil {
		return err
	}
	svgs := map[string]string{}
	if plots {
		drawn := drawPlots(d, false)
		for _, p := range drawn {
			if p.Err == nil {
				svgs[p.Name] = inlineSVG(p.SVG, p.Caption)
			}
		}
		annotate(d, drawn)
	}
	return d.writeHTML(w, func(f *figure) string { return svgs[f.name] })
}

// ReportOptions names the report files to write.
type ReportOptions struct {
	// Markdown and HTML are the report files ("" for none).
	Markdown, HTML string
	// PlotsDir is the folder for the plot files. With a Markdown report
	// and no PlotsDir, the plots go beside it in a folder named after it
	// (report.md → report-plots/). With an HTML report only and no
	// PlotsDir, the plots are only inline.
	PlotsDir string
	// PNG writes a PNG beside each SVG plot file.
	PNG bool
	// Protect lists input files never to be overwritten (the scenario,
	// a result file being rendered).
	Protect []string
}

// Any reports whether any output is asked for.
func (o ReportOptions) Any() bool { return o.Markdown != "" || o.HTML != "" || o.PlotsDir != "" }

// SortReportPaths assigns the values of --report to the Markdown and HTML
// report by their extension (.md or .markdown; .html or .htm).
func SortReportPaths(paths []string) (md, html string, err error) {
	for _, p := range paths {
		switch strings.ToLower(filepath.Ext(p)) {
		case ".md", ".markdown":
			if md != "" {
				return "", "", fmt.Errorf("--report %s: a Markdown report is already asked for (%s)", p, md)
			}
			md = p
		case ".html", ".htm":
			if html != "" {
				return "", "", fmt.Errorf("--report %s: an HTML report is already asked for (%s)", p, html)
			}
			html = p
		default:
			return "", "", fmt.Errorf("--report %s: want a file ending in .md or .html", p)
		}
	}
	return md, html, nil
}

// Reports writes the report files of one result, all or none: the files
// are staged when prepared (so bad paths fail before any work) and appear
// together on Write.
type Reports struct {
	opt      ReportOptions
	md, html *Staged
	plotsDir string
	// madeDirs lists the folders PrepareReports created, deepest first,
	// so that an aborted run can remove them again while they are empty.
	madeDirs []string
	staged   []*Staged
	written  []string
	done     bool
}

// PrepareReports checks and stages the report files, creating missing
// folders. It refuses a path that names an input in opt.Protect.
func PrepareReports(opt ReportOptions) (*Reports, error) {
	r := &Reports{opt: opt}
	if opt.Markdown != "" && opt.HTML != "" {
		if a, b := absPath(opt.Markdown), absPath(opt.HTML); a == b {
			return nil, fmt.Errorf("output %s: the Markdown and the HTML report cannot be the same file", opt.Markdown)
		}
	}
	var err error
	if opt.Markdown != "" {
		if r.md, err = Stage(opt.Markdown, opt.Protect...); err != nil {
			return nil, err
		}
	}
	if opt.HTML != "" {
		if r.html, err = Stage(opt.HTML, opt.Protect...); err != nil {
			r.Abort()
			return nil, err
		}
	}
	r.plotsDir = opt.PlotsDir
	if r.plotsDir == "" && opt.Markdown != "" {
		stem := strings.TrimSuffix(filepath.Base(opt.Markdown), filepath.Ext(opt.Markdown))
		r.plotsDir = filepath.Join(filepath.Dir(opt.Markdown), stem+"-plots")
	}
	if r.plotsDir != "" {
		if fi, err := os.Stat(r.plotsDir); err == nil && !fi.IsDir() {
			r.Abort()
			return nil, fmt.Errorf("plots folder %s: is a file, not a folder", r.plotsDir)
		}
		r.madeDirs = missingDirs(r.plotsDir)
		if err := os.MkdirAll(r.plotsDir, 0o755); err != nil {
			r.Abort()
			return nil, fmt.Errorf("plots folder %s: %w", r.plotsDir, err)
		}
	}
	return r, nil
}

func absPath(p string) string {
	a, err := filepath.Abs(p)
	if err != nil {
		return p
	}
	return a
}

// Write renders the result into every staged file and makes them all
// appear. A plot that cannot be drawn is left out, and its caption says
// why, rather than failing the run.
func (r *Reports) Write(s *Saved) error {
	if r.done {
		return errors.New("reports already written")
	}
	d, err := newDocument(s)
	if err != nil {
		return err
	}
	plots := drawPlots(d, r.opt.PNG)
	annotate(d, plots)
	files := map[string]string{}
	if r.plotsDir != "" {
		for _, p := range plots {
			if p.Err != nil {
				continue
			}
			exts := []struct {
				ext  string
				data []byte
			}{{".svg", p.SVG}}
			if r.opt.PNG {
				exts = append(exts, struct {
					ext  string
					data []byte
				}{".png", p.PNG})
			}
			for _, e := range exts {
				path := filepath.Join(r.plotsDir, p.Name+e.ext)
				st, err := Stage(path, r.opt.Protect...)
				if err != nil {
					return err
				}
				r.staged = append(r.staged, st)
				if _, err := st.Write(e.data); err != nil {
					return fmt.Errorf("output %s: %w", path, err)
				}
				r.written = append(r.written, path)
				if e.ext == ".svg" {
					files[p.Name] = path
				}
			}
		}
	}
	if r.md != nil {
		base := filepath.Dir(absPath(r.opt.Markdown))
		link := func(name string) string {
			f, ok := files[name]
			if !ok {
				return ""
			}
			rel, err := filepath.Rel(base, absPath(f))
			if err != nil {
				return ""
			}
			return filepath.ToSlash(rel)
		}
		if err := d.writeMarkdown(r.md, link); err != nil {
			return fmt.Errorf("output %s: %w", r.opt.Markdown, err)
		}
	}
	if r.html != nil {
		svgs := map[string]string{}
		for _, p := range plots {
			if p.Err == nil {
				svgs[p.Name] = inlineSVG(p.SVG, p.Caption)
			}
		}
		if err := d.writeHTML(r.html, func(f *figure) string { return svgs[f.name] }); err != nil {
			return fmt.Errorf("output %s: %w", r.opt.HTML, err)
		}
	}
	for _, st := range r.staged {
		if err := st.Commit(); err != nil {
			return err
		}
	}
	for _, st := range []*Staged{r.md, r.html} {
		if st != nil {
			if err := st.Commit(); err != nil {
				return err
			}
		}
	}
	if r.opt.Markdown != "" {
		r.written = append(r.written, r.opt.Markdown)
	}
	if r.opt.HTML != "" {
		r.written = append(r.written, r.opt.HTML)
	}
	r.done = true
	return nil
}

// Written lists the files written, plots first.
func (r *Reports) Written() []string { return r.written }

// Abort discards every staged file; safe after Write.
func (r *Reports) Abort() {
	if r == nil {
		return
	}
	for _, st := range r.staged {
		st.Abort()
	}
	r.md.Abort()
	r.html.Abort()
	if !r.done {
		// No partial output: folders this run made go again (os.Remove
		// leaves a folder that holds anything).
		removeEmpty(r.madeDirs)
	}
}
