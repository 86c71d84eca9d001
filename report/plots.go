package report

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"regexp"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"holdfast/assess/agg"
)

// The visual style of holdfast's plots: a white ground with hairline grid,
// a narrow sans-serif face, deep teal for the nominal case over two tones
// of sea green for the spread over draws, a sienna dashed zero line, and
// the phase-line marks for equilibria (filled disc attracting, ring
// repelling, half-filled disc attracting from one side, square degenerate).
// The legend sits in its own column at the right, never over the data.
var (
	colInk      = color.NRGBA{0x22, 0x31, 0x3f, 0xff}
	colMuted    = color.NRGBA{0x5b, 0x6b, 0x78, 0xff}
	colGrid     = color.NRGBA{0xe6, 0xe2, 0xd9, 0xff}
	colNominal  = color.NRGBA{0x0e, 0x6e, 0x73, 0xff}
	colOuter    = color.NRGBA{0xc4, 0xe0, 0xdb, 0xff}
	colInner    = color.NRGBA{0x86, 0xc1, 0xb8, 0xff}
	colMedian   = color.NRGBA{0x3d, 0x5a, 0x66, 0xff}
	colZero     = color.NRGBA{0xa0, 0x52, 0x2d, 0xff}
	colStable   = color.NRGBA{0x1d, 0x6f, 0x42, 0xff}
	colUnstable = color.NRGBA{0xb0, 0x32, 0x28, 0xff}
	colSemi     = color.NRGBA{0xc8, 0x7f, 0x12, 0xff}
	colDegen    = color.NRGBA{0x6c, 0x4f, 0x9c, 0xff}
	colBar      = color.NRGBA{0x4f, 0x7c, 0x93, 0xff}
	colHist     = color.NRGBA{0x86, 0xa9, 0xbd, 0xff}
	// series colours of the convergence plot, in label order
	colSeries = []color.NRGBA{
		{0x0e, 0x6e, 0x73, 0xff}, {0xb0, 0x32, 0x28, 0xff}, {0xc8, 0x7f, 0x12, 0xff},
		{0x6c, 0x4f, 0x9c, 0xff}, {0x1d, 0x6f, 0x42, 0xff}, {0x4f, 0x7c, 0x93, 0xff},
	}
	plotFont = font.Font{Typeface: "Liberation", Variant: "Sans"}
)

func translucent(c color.NRGBA, a uint8) color.NRGBA { c.A = a; return c }

// chart is a plot with its legend column and size.
type chart struct {
	p      *plot.Plot
	legend plot.Legend
	w, h   vg.Length
}

func newChart(title string, w, h vg.Length) *chart {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = font.From(plotFont, 10)
	p.Title.TextStyle.Color = colInk
	p.Title.Padding = vg.Points(6)
	p.BackgroundColor = color.White
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(plotFont, 9)
		a.Label.TextStyle.Color = colInk
		a.Tick.Label.Font = font.From(plotFont, 8)
		a.Tick.Label.Color = colMuted
		a.LineStyle.Color = colInk
		a.LineStyle.Width = vg.Points(0.7)
		a.Tick.LineStyle.Color = colInk
		a.Tick.LineStyle.Width = vg.Points(0.6)
		a.Tick.Length = vg.Points(3)
		a.Padding = vg.Points(3)
	}
	g := plotter.NewGrid()
	g.Vertical = draw.LineStyle{Color: colGrid, Width: vg.Points(0.5)}
	g.Horizontal = g.Vertical
	p.Add(g)
	l := plot.NewLegend()
	l.TextStyle.Font = font.From(plotFont, 8)
	l.TextStyle.Color = colInk
	l.Top, l.Left = true, true
	l.ThumbnailWidth = vg.Points(18)
	l.Padding = vg.Points(3)
	return &chart{p: p, legend: l, w: w, h: h}
}

// draw lays out the plot and its legend column on a canvas.
func (c *chart) draw(cv vg.CanvasSizer) {
	dc := draw.New(cv)
	area := dc
	if lw := c.legendWidth(dc); lw > 0 {
		area = draw.Crop(dc, 0, -lw, 0, 0)
		leg := draw.Crop(dc, dc.Max.X-dc.Min.X-lw+vg.Points(10), -vg.Points(4), 0, -vg.Points(22))
		c.legend.Draw(leg)
	}
	c.p.Draw(area)
}

func (c *chart) legendWidth(dc draw.Canvas) vg.Length {
	r := c.legend.Rectangle(dc)
	w := r.Max.X - r.Min.X
	if w <= 0 {
		return 0
	}
	return w + vg.Points(16)
}

var (
	svgHead   = regexp.MustCompile(`(?s)\A<\?xml[^>]*\?>\s*(<!--.*?-->\s*)?`)
	svgOpen   = regexp.MustCompile(`(?s)<svg width="[^"]*" height="[^"]*" viewBox="([^"]*)"\s*xmlns="[^"]*"\s*xmlns:xlink="[^"]*">`)
	fontFamLS = "font-family:Liberation Sans;"
)

// plotErr runs fn and turns a panic of the plotting library (which
// panics on some degenerate data) into an error.
func plotErr(name string, fn func() error) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("plot %s: %v", name, r)
		}
	}()
	return fn()
}

// svg renders the chart as a standalone SVG document. Text asks for the
// Liberation Sans face the layout was measured with, falling back to the
// metric-compatible Arial and Helvetica, then any sans-serif face; no
// font is embedded or fetched.
func (c *chart) svg() ([]byte, error) {
	cv := vgsvg.New(c.w, c.h)
	c.draw(cv)
	var b bytes.Buffer
	if _, err := cv.WriteTo(&b); err != nil {
		return nil, err
	}
	out := strings.ReplaceAll(b.String(), fontFamLS, "font-family:'Liberation Sans',Arial,Helvetica,sans-serif;")
	return []byte(out), nil
}

// png renders the chart as a PNG image at 150 dots per inch.
func (c *chart) png() ([]byte, error) {
	cv := vgimg.NewWith(vgimg.UseWH(c.w, c.h), vgimg.UseDPI(150))
	c.draw(cv)
	var b bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: cv}).WriteTo(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// inlineSVG turns a standalone SVG document into an element for an HTML
// page: no XML prolog, no namespace declarations, a viewBox that scales
// to the page width, and an accessible label.
func inlineSVG(doc []byte, label string) string {
	s := svgHead.ReplaceAllString(string(doc), "")
	s = svgOpen.ReplaceAllStringFunc(s, func(m string) string {
		vb := svgOpen.FindStringSubmatch(m)[1]
		return fmt.Sprintf(`<svg viewBox="%s" role="img" aria-label="%s" preserveAspectRatio="xMidYMid meet">`, vb, escapeAttr(label))
	})
	return strings.TrimSpace(s)
}

func escapeAttr(s string) string {
	return strings.NewReplacer("&", "&amp;", `"`, "&quot;", "<", "&lt;", ">", "&gt;").Replace(s)
}

// axisLabel is "name [unit]", or name alone without a unit.
func axisLabel(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " [" + unit + "]"
}

// runs splits the indices where ok holds into maximal consecutive runs.
func runs(n int, ok func(i int) bool) [][2]int {
	var out [][2]int
	start := -1
	for i := 0; i <= n; i++ {
		if i < n && ok(i) {
			if start < 0 {
				start = i
			}
			continue
		}
		if start >= 0 {
			out = append(out, [2]int{start, i})
			start = -1
		}
	}
	return out
}

func lineOf(xys plotter.XYs, col color.Color, width float64, dashes ...vg.Length) (*plotter.Line, error) {
	l, err := plotter.NewLine(xys)
	if err != nil {
		return nil, err
	}
	l.LineStyle = draw.LineStyle{Color: col, Width: vg.Points(width), Dashes: dashes}
	return l, nil
}

// bandPolygon is the area between lo and hi over x.
func bandPolygon(x, lo, hi []float64, col color.Color) (*plotter.Polygon, error) {
	ring := make(plotter.XYs, 0, 2*len(x))
	for i := range x {
		ring = append(ring, plotter.XY{X: x[i], Y: hi[i]})
	}
	for i := len(x) - 1; i >= 0; i-- {
		ring = append(ring, plotter.XY{X: x[i], Y: lo[i]})
	}
	pg, err := plotter.NewPolygon(ring)
	if err != nil {
		return nil, err
	}
	pg.Color = col
	pg.LineStyle.Width = 0
	return pg, nil
}

// bandLine adds to c the band between lo and hi over x in the colour
// band (when x has more than one point), and returns the line of y over x
// in the colour line for the caller to add.
func (c *chart) bandLine(x, y, lo, hi []float64, band, line color.Color, width float64) (*plotter.Line, error) {
	if len(x) > 1 {
		pg, err := bandPolygon(x, lo, hi, band)
		if err != nil {
			return nil, err
		}
		c.p.Add(pg)
	}
	return lineOf(xyOf(x, y), line, width)
}

// swatch is a legend thumbnail: a filled block.
type swatch struct{ col color.Color }

func (s swatch) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	h := (r.Max.Y - r.Min.Y) * 0.8
	mid := (r.Max.Y + r.Min.Y) / 2
	c.FillPolygon(s.col, []vg.Point{{X: r.Min.X, Y: mid - h/2}, {X: r.Max.X, Y: mid - h/2}, {X: r.Max.X, Y: mid + h/2}, {X: r.Min.X, Y: mid + h/2}})
}

// classGlyph draws the phase-line mark of an equilibrium class.
type classGlyph struct{ class, side string }

func (g classGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius
	circle := func() vg.Path {
		p := make(vg.Path, 0, 3)
		p.Move(vg.Point{X: pt.X + r, Y: pt.Y})
		p.Arc(pt, r, 0, 2*math.Pi)
		p.Close()
		return p
	}
	white := color.White
	switch g.class {
	case "stable":
		c.SetColor(sty.Color)
		c.Fill(circle())
	case "unstable":
		c.SetColor(white)
		c.Fill(circle())
		c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(1.4)})
		c.Stroke(circle())
	case "semistable":
		c.SetColor(white)
		c.Fill(circle())
		// Fill the half facing the side it attracts from: the left
		// (lower x) half for "below", the right half for "above".
		start := math.Pi / 2
		if g.side == "above" {
			start = -math.Pi / 2
		}
		h := make(vg.Path, 0, 4)
		h.Move(vg.Point{X: pt.X, Y: pt.Y})
		h.Line(vg.Point{X: pt.X + r*vg.Length(math.Cos(start)), Y: pt.Y + r*vg.Length(math.Sin(start))})
		h.Arc(pt, r, start, math.Pi)
		h.Close()
		c.SetColor(sty.Color)
		c.Fill(h)
		c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(1.4)})
		c.Stroke(circle())
	default:
		c.SetColor(sty.Color)
		s := r * 0.85
		c.Fill(vg.Path{{Type: vg.MoveComp, Pos: vg.Point{X: pt.X - s, Y: pt.Y - s}}, {Type: vg.LineComp, Pos: vg.Point{X: pt.X + s, Y: pt.Y - s}},
			{Type: vg.LineComp, Pos: vg.Point{X: pt.X + s, Y: pt.Y + s}}, {Type: vg.LineComp, Pos: vg.Point{X: pt.X - s, Y: pt.Y + s}}, {Type: vg.CloseComp}})
	}
}

func classColour(class string) color.NRGBA {
	switch class {
	case "stable":
		return colStable
	case "unstable":
		return colUnstable
	case "semistable":
		return colSemi
	}
	return colDegen
}

func classLegend(class, side string) string {
	switch class {
	case "stable":
		return "attracting (stable)"
	case "unstable":
		return "repelling (unstable)"
	case "semistable":
		return "attracting from " + side + " only"
	}
	return "degenerate"
}

// eqMark is a nominal equilibrium to mark on the x axis of a rate plot.
type eqMark struct {
	label, class, side string
	x                  float64
}

// rateBandChart is plot (a): the rate curve at nominal values, the band
// of its 5–95% and 25–75% quantiles over draws with their median, the
// zero line, and each nominal equilibrium marked by class.
func rateBandChart(f *FiguresJSON, symbol, unit string, marks []eqMark) (*chart, error) {
	c := newChart("Rate curve at nominal values and its spread over draws", 16*vg.Centimeter, 9*vg.Centimeter)
	c.p.X.Label.Text = axisLabel(symbol, unit)
	yu := ""
	if unit != "" {
		yu = unit + " per time"
	}
	c.p.Y.Label.Text = axisLabel("d"+symbol+"/dt = f("+symbol+")", yu)
	b := f.Band
	ok := func(i int) bool {
		return b.Q5[i] != nil && b.Q25[i] != nil && b.Q50[i] != nil && b.Q75[i] != nil && b.Q95[i] != nil
	}
	val := func(col []*float64, r [2]int) []float64 {
		out := make([]float64, 0, r[1]-r[0])
		for i := r[0]; i < r[1]; i++ {
			out = append(out, *col[i])
		}
		return out
	}
	bandRuns := runs(len(b.X), ok)
	for pass := 0; pass < 3; pass++ {
		for _, r := range bandRuns {
			x := b.X[r[0]:r[1]]
			var err error
			switch pass {
			case 0:
				var pg *plotter.Polygon
				if pg, err = bandPolygon(x, val(b.Q5, r), val(b.Q95, r), colOuter); err == nil {
					c.p.Add(pg)
				}
			case 1:
				var pg *plotter.Polygon
				if pg, err = bandPolygon(x, val(b.Q25, r), val(b.Q75, r), colInner); err == nil {
					c.p.Add(pg)
				}
			case 2:
				var l *plotter.Line
				if l, err = lineOf(xyOf(x, val(b.Q50, r)), colMedian, 0.9, vg.Points(3), vg.Points(2)); err == nil {
					c.p.Add(l)
				}
			}
			if err != nil {
				return nil, err
			}
		}
	}
	nominal := f.Nominal
	for _, r := range runs(len(nominal.X), func(i int) bool { return nominal.F[i] != nil }) {
		l, err := lineOf(xyOf(nominal.X[r[0]:r[1]], val(nominal.F, r)), colNominal, 1.8)
		if err != nil {
			return nil, err
		}
		c.p.Add(l)
	}
	lo, hi := domainOf(b.X, nominal.X)
	zero, err := lineOf(plotter.XYs{{X: lo, Y: 0}, {X: hi, Y: 0}}, colZero, 0.9, vg.Points(4), vg.Points(2.5))
	if err != nil {
		return nil, err
	}
	c.p.Add(zero)
	c.legend.Add("f at nominal values", legendLine(colNominal, 1.8))
	if len(bandRuns) > 0 {
		c.legend.Add(fmt.Sprintf("median over %d draws", b.Draws), legendLine(colMedian, 0.9, vg.Points(3), vg.Points(2)))
		c.legend.Add("25–75% of draws", swatch{colInner})
		c.legend.Add("5–95% of draws", swatch{colOuter})
	}
	c.legend.Add("f = 0", zero)
	if err := addMarks(c, marks); err != nil {
		return nil, err
	}
	return c, nil
}

func legendLine(col color.Color, width float64, dashes ...vg.Length) plot.Thumbnailer {
	return &plotter.Line{LineStyle: draw.LineStyle{Color: col, Width: vg.Points(width), Dashes: dashes}}
}

func xyOf(x, y []float64) plotter.XYs {
	xys := make(plotter.XYs, len(x))
	for i := range x {
		xys[i] = plotter.XY{X: x[i], Y: y[i]}
	}
	return xys
}

func domainOf(xs ...[]float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		if len(x) > 0 {
			lo, hi = math.Min(lo, x[0]), math.Max(hi, x[len(x)-1])
		}
	}
	if lo > hi {
		return 0, 1
	}
	return lo, hi
}

// addMarks adds one scatter per class present, so that the legend lists
// each class once, and the labels above the marks.
func addMarks(c *chart, marks []eqMark) error {
	if len(marks) == 0 {
		return nil
	}
	type key struct{ class, side string }
	var order []key
	groups := map[key]plotter.XYs{}
	var lx plotter.XYs
	var ls []string
	for _, m := range marks {
		k := key{m.class, m.side}
		if _, ok := groups[k]; !ok {
			order = append(order, k)
		}
		groups[k] = append(groups[k], plotter.XY{X: m.x, Y: 0})
		lx = append(lx, plotter.XY{X: m.x, Y: 0})
		ls = append(ls, m.label)
	}
	for _, k := range order {
		s, err := plotter.NewScatter(groups[k])
		if err != nil {
			return err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: classColour(k.class), Radius: vg.Points(4), Shape: classGlyph{k.class, k.side}}
		c.p.Add(s)
		c.legend.Add(classLegend(k.class, k.side), s)
	}
	labels, err := plotter.NewLabels(plotter.XYLabels{XYs: lx, Labels: ls})
	if err != nil {
		return err
	}
	for i := range labels.TextStyle {
		labels.TextStyle[i] = text.Style{Font: font.From(plotFont, 8), Color: colInk, XAlign: draw.XCenter, Handler: c.p.TextHandler}
	}
	labels.Offset = vg.Point{Y: vg.Points(7)}
	c.p.Add(labels)
	return nil
}

// histogramChart draws counts on bins with a vertical zero line and an
// optional marked value (the nominal slope, or a safe limit).
func histogramChart(title, xLabel string, edges []float64, counts []int64, countLabel string, markAt *float64, markLabel string, zero bool) (*chart, error) {
	c := newChart(title, 16*vg.Centimeter, 7*vg.Centimeter)
	c.p.X.Label.Text = xLabel
	c.p.Y.Label.Text = "draws"
	if len(counts) == 0 || len(edges) != len(counts)+1 {
		return c, nil
	}
	bins := make([]plotter.HistogramBin, len(counts))
	top := 0.0
	for i, k := range counts {
		bins[i] = plotter.HistogramBin{Min: edges[i], Max: edges[i+1], Weight: float64(k)}
		top = math.Max(top, float64(k))
	}
	h := &plotter.Histogram{Bins: bins, Width: edges[1] - edges[0], FillColor: colHist,
		LineStyle: draw.LineStyle{Color: color.White, Width: vg.Points(0.4)}}
	c.p.Add(h)
	c.legend.Add(countLabel, swatch{colHist})
	if top == 0 {
		top = 1
	}
	if zero {
		z, err := lineOf(plotter.XYs{{X: 0, Y: 0}, {X: 0, Y: top * 1.05}}, colZero, 1.1, vg.Points(4), vg.Points(2.5))
		if err != nil {
			return nil, err
		}
		c.p.Add(z)
		c.legend.Add("f' = 0", z)
	}
	if markAt != nil {
		m, err := lineOf(plotter.XYs{{X: *markAt, Y: 0}, {X: *markAt, Y: top * 1.05}}, colNominal, 1.6)
		if err != nil {
			return nil, err
		}
		c.p.Add(m)
		c.legend.Add(markLabel, m)
	}
	return c, nil
}

// barItem is one bar of a ranking chart: a value with an optional interval
// and an optional second mark.
type barItem struct {
	label         string
	value         float64
	lo, hi, other *float64
}

// whiskers draws horizontal interval lines with end caps at y = 0, 1, ….
type whiskers struct {
	lo, hi []float64
	ys     []float64
}

func (w *whiskers) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	sty := draw.LineStyle{Color: colInk, Width: vg.Points(0.9)}
	cap := vg.Points(3)
	for i := range w.ys {
		y := trY(w.ys[i])
		x0, x1 := trX(w.lo[i]), trX(w.hi[i])
		c.StrokeLine2(sty, x0, y, x1, y)
		c.StrokeLine2(sty, x0, y-cap, x0, y+cap)
		c.StrokeLine2(sty, x1, y-cap, x1, y+cap)
	}
}

func (w *whiskers) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = math.Inf(1), math.Inf(-1)
	for i := range w.lo {
		xmin, xmax = math.Min(xmin, w.lo[i]), math.Max(xmax, w.hi[i])
	}
	return xmin, xmax, 0, 0
}

func (w *whiskers) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	y := (r.Min.Y + r.Max.Y) / 2
	sty := draw.LineStyle{Color: colInk, Width: vg.Points(0.9)}
	c.StrokeLine2(sty, r.Min.X+2, y, r.Max.X-2, y)
	c.StrokeLine2(sty, r.Min.X+2, y-3, r.Min.X+2, y+3)
	c.StrokeLine2(sty, r.Max.X-2, y-3, r.Max.X-2, y+3)
}

// diamond is the mark of a second measure beside a bar.
type diamond struct{}

func (diamond) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius
	p := vg.Path{{Type: vg.MoveComp, Pos: vg.Point{X: pt.X, Y: pt.Y + r}}, {Type: vg.LineComp, Pos: vg.Point{X: pt.X + r, Y: pt.Y}},
		{Type: vg.LineComp, Pos: vg.Point{X: pt.X, Y: pt.Y - r}}, {Type: vg.LineComp, Pos: vg.Point{X: pt.X - r, Y: pt.Y}}, {Type: vg.CloseComp}}
	c.SetColor(color.White)
	c.Fill(p)
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(1.2)})
	c.Stroke(p)
}

// barsChart is plot (c): the ranking as horizontal bars, first at the
// top, with intervals and a second mark where given.
func barsChart(title, measure, intervalLabel, otherLabel string, bars []barItem) (*chart, error) {
	n := len(bars)
	c := newChart(title, 16*vg.Centimeter, vg.Length(2.6+0.75*float64(max(n, 1)))*vg.Centimeter)
	c.p.X.Label.Text = measure
	if n == 0 {
		return c, nil
	}
	vals := make(plotter.Values, n)
	names := make([]string, n)
	w := &whiskers{}
	var other plotter.XYs
	for i, b := range bars {
		j := n - 1 - i // first bar at the top
		vals[j] = b.value
		names[j] = b.label
		if b.lo != nil && b.hi != nil {
			w.lo, w.hi, w.ys = append(w.lo, *b.lo), append(w.hi, *b.hi), append(w.ys, float64(j))
		}
		if b.other != nil {
			other = append(other, plotter.XY{X: *b.other, Y: float64(j)})
		}
	}
	bc, err := plotter.NewBarChart(vals, vg.Points(11))
	if err != nil {
		return nil, err
	}
	bc.Horizontal = true
	bc.Color = colBar
	bc.LineStyle.Width = 0
	c.p.Add(bc)
	c.p.NominalY(names...)
	// Every ranking measure is a share or a distance between 0 and 1.
	c.p.X.Min = math.Min(0, c.p.X.Min)
	c.p.X.Max = math.Max(1, c.p.X.Max)
	c.legend.Add(measure, swatch{colBar})
	if len(w.ys) > 0 {
		c.p.Add(w)
		c.legend.Add(intervalLabel, w)
	}
	if len(other) > 0 {
		s, err := plotter.NewScatter(other)
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: colInk, Radius: vg.Points(3.5), Shape: diamond{}}
		c.p.Add(s)
		c.legend.Add(otherLabel, s)
	}
	return c, nil
}

// series is one running estimate for the convergence plot.
type series struct {
	label string
	draws []float64
	k, n  []int64
}

// convergenceChart is plot (e): each probability's running estimate
// against the number of draws (log scale), with its 95% interval.
func convergenceChart(ss []series) (*chart, error) {
	c := newChart("Running estimates as draws were added", 16*vg.Centimeter, 8*vg.Centimeter)
	c.p.X.Label.Text = "draws (log scale)"
	c.p.Y.Label.Text = "probability"
	c.p.X.Scale = plot.LogScale{}
	c.p.X.Tick.Marker = plot.LogTicks{Prec: -1}
	c.p.Y.Min, c.p.Y.Max = 0, 1
	for i, s := range ss {
		col := colSeries[i%len(colSeries)]
		var est, lo, hi, xs []float64
		for j := range s.draws {
			if s.n[j] <= 0 || s.draws[j] <= 0 {
				continue
			}
			pr := agg.Proportion{K: s.k[j], N: s.n[j]}
			l, h := pr.Interval(0.95)
			xs, est, lo, hi = append(xs, s.draws[j]), append(est, pr.Estimate()), append(lo, l), append(hi, h)
		}
		if len(xs) == 0 {
			continue
		}
		l, err := c.bandLine(xs, est, lo, hi, translucent(col, 0x38), col, 1.5)
		if err != nil {
			return nil, err
		}
		pts, err := plotter.NewScatter(xyOf(xs, est))
		if err != nil {
			return nil, err
		}
		pts.GlyphStyle = draw.GlyphStyle{Color: col, Radius: vg.Points(1.8), Shape: draw.CircleGlyph{}}
		c.p.Add(l, pts)
		c.legend.Add(s.label, l, pts)
	}
	c.legend.Add("95% interval", swatch{translucent(colSeries[0], 0x38)})
	return c, nil
}

// curveChart is plot (d), first part, for a sweep: a probability against
// the driver with its 95% interval band.
func curveChart(title, xLabel, label string, x, p, lo, hi []float64) (*chart, error) {
	c := newChart(title, 16*vg.Centimeter, 8*vg.Centimeter)
	c.p.X.Label.Text = xLabel
	c.p.Y.Label.Text = "probability"
	c.p.Y.Min, c.p.Y.Max = 0, 1
	if len(x) == 0 || len(p) != len(x) || len(lo) != len(x) || len(hi) != len(x) {
		return c, nil
	}
	l, err := c.bandLine(x, p, lo, hi, colOuter, colNominal, 1.8)
	if err != nil {
		return nil, err
	}
	c.p.Add(l)
	c.legend.Add(label, l)
	c.legend.Add("95% interval", swatch{colOuter})
	return c, nil
}
