package html

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Plot sizes, points (the SVG's user units).
const (
	plotWidth  = 5 * vg.Inch
	plotHeight = 3.4 * vg.Inch
)

// newPlot returns a plot with Joinery's look: sans-serif text (the
// Liberation Sans metrics gonum/plot bundles, shown in the page with
// any metric-compatible font), axis labels that carry units, a light
// grid.
func newPlot(title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	sans := func(f *font.Font) { f.Variant = "Sans" }
	sans(&p.Title.TextStyle.Font)
	sans(&p.X.Label.TextStyle.Font)
	sans(&p.Y.Label.TextStyle.Font)
	sans(&p.X.Tick.Label.Font)
	sans(&p.Y.Tick.Label.Font)
	sans(&p.Legend.TextStyle.Font)
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(11)
	p.X.Label.Text = xLabel
	p.Y.Label.Text = yLabel
	p.X.Label.TextStyle.Font.Size = vg.Points(10)
	p.Y.Label.TextStyle.Font.Size = vg.Points(10)
	p.X.Tick.Label.Font.Size = vg.Points(9)
	p.Y.Tick.Label.Font.Size = vg.Points(9)
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	p.Legend.Top = true
	p.Legend.ThumbnailWidth = vg.Points(14)
	g := plotter.NewGrid()
	g.Vertical.Color = color.Gray{Y: 225}
	g.Horizontal.Color = color.Gray{Y: 225}
	p.Add(g)
	return p
}

// renderPlot draws p as inline SVG: gonum/plot's SVG (vgsvg, fonts not
// embedded) with its XML prelude replaced by a root element of our own
// carrying id, class and label, and its font names replaced by a list of
// metric-compatible families ending in the generic sans-serif. vgsvg's
// output holds nothing that varies between runs (checked by the tests),
// so the result is deterministic.
func renderPlot(p *plot.Plot, id, label string) ([]byte, error) {
	c := vgsvg.NewWith(vgsvg.UseWH(plotWidth, plotHeight))
	p.Draw(draw.New(c))
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("html: plot %s: %w", id, err)
	}
	b := buf.Bytes()
	// vgsvg writes: <?xml ...?>, a comment, <svg ... > then the body.
	start := bytes.Index(b, []byte("<svg"))
	if start < 0 {
		return nil, errors.New("html: plot " + id + ": no svg element in gonum/plot's output")
	}
	end := bytes.IndexByte(b[start:], '>')
	if end < 0 {
		return nil, errors.New("html: plot " + id + ": unterminated svg element")
	}
	body := b[start+end+1:]
	var w Writer
	w.Raw("<svg xmlns=\"http://www.w3.org/2000/svg\"")
	w.Attr("id", id)
	w.Raw(" class=\"plot\"")
	w.Attr("viewBox", fmt.Sprintf("0 0 %g %g", plotWidth.Points(), plotHeight.Points()))
	w.Attr("width", fmt.Sprintf("%g", plotWidth.Points()*4/3))
	w.Attr("height", fmt.Sprintf("%g", plotHeight.Points()*4/3))
	w.Raw(" role=\"img\"")
	w.Attr("aria-label", label)
	w.Raw(">")
	out := append(w.b, body...)
	for _, f := range []string{"Liberation Sans", "Liberation Serif", "Liberation Mono"} {
		out = bytes.ReplaceAll(out, []byte("font-family:"+f+";"), []byte("font-family:'Liberation Sans',Arimo,Arial,Helvetica,sans-serif;"))
	}
	return out, nil
}

// glyphShape is the shape of a dot in a scatter plot.
type glyphShape int8

const (
	square glyphShape = iota
	triangle
	diamond
)

// dots is a scatter plot drawn as one path: points that fall on the same
// quarter point of the canvas are drawn once, so that thousands of
// welds with equal values cost one glyph.
type dots struct {
	xy    plotter.XYs
	shape glyphShape
	color color.Color
	size  vg.Length // half width of a glyph
	// hidden counts the points outside the plot's range (set by Plot).
	hidden int
}

var (
	_ plot.Plotter     = (*dots)(nil)
	_ plot.DataRanger  = (*dots)(nil)
	_ plot.Thumbnailer = (*dots)(nil)
)

func newDots(xy plotter.XYs, shape glyphShape, hex string) *dots {
	return &dots{xy: xy, shape: shape, color: rgb(hex), size: vg.Points(2.2)}
}

func (d *dots) glyph(path *vg.Path, x, y vg.Length) {
	s := d.size
	switch d.shape {
	case triangle:
		path.Move(vg.Point{X: x, Y: y + 1.2*s})
		path.Line(vg.Point{X: x + 1.1*s, Y: y - 0.7*s})
		path.Line(vg.Point{X: x - 1.1*s, Y: y - 0.7*s})
	case diamond:
		path.Move(vg.Point{X: x, Y: y + 1.3*s})
		path.Line(vg.Point{X: x + 1.3*s, Y: y})
		path.Line(vg.Point{X: x, Y: y - 1.3*s})
		path.Line(vg.Point{X: x - 1.3*s, Y: y})
	default:
		path.Move(vg.Point{X: x - s, Y: y - s})
		path.Line(vg.Point{X: x + s, Y: y - s})
		path.Line(vg.Point{X: x + s, Y: y + s})
		path.Line(vg.Point{X: x - s, Y: y + s})
	}
	path.Close()
}

// Plot draws the dots.
func (d *dots) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var path vg.Path
	seen := map[[2]int64]bool{}
	d.hidden = 0
	for _, q := range d.xy {
		if q.X < p.X.Min || q.X > p.X.Max || q.Y < p.Y.Min || q.Y > p.Y.Max {
			d.hidden++
			continue
		}
		x, y := trX(q.X), trY(q.Y)
		k := [2]int64{int64(math.Round(4 * x.Points())), int64(math.Round(4 * y.Points()))}
		if seen[k] {
			continue
		}
		seen[k] = true
		d.glyph(&path, x, y)
	}
	if len(path) == 0 {
		return
	}
	c.SetColor(d.color)
	c.Fill(path)
}

// DataRange returns the range of the points.
func (d *dots) DataRange() (xmin, xmax, ymin, ymax float64) { return plotter.XYRange(d.xy) }

// Thumbnail draws one glyph for the legend.
func (d *dots) Thumbnail(c *draw.Canvas) {
	var path vg.Path
	d.glyph(&path, (c.Min.X+c.Max.X)/2, (c.Min.Y+c.Max.Y)/2)
	c.SetColor(d.color)
	c.Fill(path)
}

// bars is a histogram drawn as one filled path and one outline: bins
// of equal width from lo, counts per bin.
type bars struct {
	lo, width float64
	counts    []int
	fill      color.Color
}

var (
	_ plot.Plotter     = (*bars)(nil)
	_ plot.DataRanger  = (*bars)(nil)
	_ plot.Thumbnailer = (*bars)(nil)
)

func (b *bars) path(c draw.Canvas, p *plot.Plot) vg.Path {
	trX, trY := p.Transforms(&c)
	var path vg.Path
	for i, n := range b.counts {
		if n == 0 {
			continue
		}
		x0, x1 := trX(b.lo+float64(i)*b.width), trX(b.lo+float64(i+1)*b.width)
		y0, y1 := trY(0), trY(float64(n))
		path.Move(vg.Point{X: x0, Y: y0})
		path.Line(vg.Point{X: x1, Y: y0})
		path.Line(vg.Point{X: x1, Y: y1})
		path.Line(vg.Point{X: x0, Y: y1})
		path.Close()
	}
	return path
}

// Plot draws the bars.
func (b *bars) Plot(c draw.Canvas, p *plot.Plot) {
	path := b.path(c, p)
	if len(path) == 0 {
		return
	}
	c.SetColor(b.fill)
	c.Fill(path)
	c.SetLineStyle(draw.LineStyle{Color: color.Gray{Y: 60}, Width: vg.Points(0.4)})
	c.Stroke(path)
}

// DataRange returns the bins' range and 0 to the largest count.
func (b *bars) DataRange() (xmin, xmax, ymin, ymax float64) {
	top := 0
	for _, n := range b.counts {
		top = max(top, n)
	}
	return b.lo, b.lo + float64(len(b.counts))*b.width, 0, float64(top)
}

// Thumbnail draws a filled square for the legend.
func (b *bars) Thumbnail(c *draw.Canvas) {
	pts := []vg.Point{{X: c.Min.X, Y: c.Min.Y}, {X: c.Min.X, Y: c.Max.Y}, {X: c.Max.X, Y: c.Max.Y}, {X: c.Max.X, Y: c.Min.Y}}
	c.FillPolygon(b.fill, c.ClipPolygonY(pts))
}

// line returns a line through pts, in a colour, solid or dashed.
func line(pts plotter.XYs, hex string, dashed bool, width float64) (*plotter.Line, error) {
	l, err := plotter.NewLine(pts)
	if err != nil {
		return nil, fmt.Errorf("html: %w", err)
	}
	l.Color = rgb(hex)
	l.Width = vg.Points(width)
	if dashed {
		l.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
	}
	return l, nil
}

// curve samples f over [x0, x1] at n+1 points.
func curve(f func(float64) float64, x0, x1 float64, n int) plotter.XYs {
	pts := make(plotter.XYs, n+1)
	for i := range pts {
		x := x0 + (x1-x0)*float64(i)/float64(n)
		pts[i] = plotter.XY{X: x, Y: f(x)}
	}
	return pts
}
