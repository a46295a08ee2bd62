package chart

import (
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Font sizes, in points: large enough to read at arm's length from a laptop
// screen turned down for the night.
const (
	titleSize  = 13
	labelSize  = 12
	tickSize   = 11
	legendSize = 11
	noteSize   = 10.5
)

// sans is the typeface of every text (Liberation Sans, which gonum/plot
// ships).
var sans = font.Font{Typeface: "Liberation", Variant: "Sans"}

// textStyle returns a text style of the given size and colour.
func textStyle(size vg.Length, c color.Color) text.Style {
	return text.Style{Color: c, Font: font.From(sans, size), Handler: plot.DefaultTextHandler}
}

// newPlot returns a plot with arcfit's fonts: a title, axis labels with
// their units, tick labels and a legend, all in the sans typeface, and a
// light grid-free frame.
func newPlot(title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = font.From(sans, titleSize)
	p.Title.Padding = 6
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = font.From(sans, labelSize)
		ax.Tick.Label.Font = font.From(sans, tickSize)
		ax.Label.Padding = 4
	}
	p.X.Label.Text, p.Y.Label.Text = xLabel, yLabel
	p.Legend.TextStyle.Font = font.From(sans, legendSize)
	p.Legend.ThumbnailWidth = 22
	p.Legend.Padding = 2
	return p
}

// Colours (color.RGBA is alpha-premultiplied, so translucent ones are
// color.NRGBA). The model palette is distinct for the common forms of colour
// blindness (blue, orange, bluish green, vermilion, reddish purple, sky
// blue, yellow, grey).
var (
	black      = color.Gray{Y: 0}
	darkGrey   = color.Gray{Y: 80}
	midGrey    = color.Gray{Y: 140}
	lightGrey  = color.Gray{Y: 200}
	targetRed  = color.RGBA{R: 200, G: 20, B: 20, A: 255}
	moonBlue   = color.RGBA{R: 40, G: 70, B: 170, A: 255}
	windowFill = color.NRGBA{R: 60, G: 170, B: 60, A: 60}
	windowLine = color.RGBA{R: 20, G: 120, B: 20, A: 255}
	fovColour  = color.RGBA{R: 20, G: 120, B: 20, A: 255}
	cloudDot   = color.NRGBA{R: 70, G: 70, B: 150, A: 110}
	// paper is the white, nearly opaque box behind text over the data.
	paper      = color.NRGBA{R: 255, G: 255, B: 255, A: 230}
	flagColour = color.RGBA{R: 213, G: 94, B: 0, A: 255}

	modelPalette = []color.Color{
		color.RGBA{R: 0, G: 114, B: 178, A: 255},
		color.RGBA{R: 230, G: 159, B: 0, A: 255},
		color.RGBA{R: 0, G: 158, B: 115, A: 255},
		color.RGBA{R: 213, G: 94, B: 0, A: 255},
		color.RGBA{R: 204, G: 121, B: 167, A: 255},
		color.RGBA{R: 86, G: 180, B: 233, A: 255},
		color.RGBA{R: 180, G: 160, B: 0, A: 255},
		color.Gray{Y: 100},
	}
)

// modelColour returns the palette colour of the i-th model.
func modelColour(i int) color.Color { return modelPalette[i%len(modelPalette)] }

// lineStyle returns a solid line of width w points, or dashed with the
// given dash and gap lengths.
func lineStyle(c color.Color, w vg.Length, dashes ...vg.Length) draw.LineStyle {
	return draw.LineStyle{Color: c, Width: w, Dashes: dashes}
}
