package eval

import (
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"strings"
)

// Curve is one ROC curve to draw with WriteROCSVG.
type Curve struct {
	// Name labels the curve in the legend.
	Name string
	// FPR and TPR are the curve's points, as returned by ROC.
	FPR, TPR []float64
	// AUC is shown in the legend; NaN shows "n/a".
	AUC float64
}

// Plot geometry, in SVG user units.
const (
	svgWidth    = 660
	svgHeight   = 440
	plotLeft    = 70
	plotTop     = 50
	plotSize    = 320
	legendLeft  = 420
	legendTop   = 62
	legendStep  = 22
	shadeMaxFPR = 0.1
)

// WriteROCSVG draws the given ROC curves into one self-contained SVG
// document (no external fonts, stylesheets or scripts) and writes it to w.
// The plot has both axes from 0 to 1 with ticks every 0.2, a dashed chance
// diagonal, the region FPR <= 0.1 used by the partial AUC shaded lightly,
// and a legend giving each curve's name and AUC.
//
// It returns ErrBadCurve for a curve with no points, with FPR and TPR of
// different lengths or with a coordinate outside [0, 1] (or NaN), and any
// error from w.
func WriteROCSVG(w io.Writer, curves []Curve, title string) error {
	for i, c := range curves {
		if err := checkPlotCurve(c); err != nil {
			return fmt.Errorf("%w (curve %d %q: %v)", ErrBadCurve, i, c.Name, err)
		}
	}
	p := &svgPrinter{w: w}
	p.printf(`<?xml version="1.0" encoding="UTF-8"?>` + "\n")
	p.printf(`<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" viewBox="0 0 %d %d" role="img" font-family="sans-serif">`+"\n",
		svgWidth, svgHeight, svgWidth, svgHeight)
	p.printf("<title>%s</title>\n", escape(title))
	p.printf(`<rect x="0" y="0" width="%d" height="%d" fill="#ffffff"/>`+"\n", svgWidth, svgHeight)
	p.printf(`<text x="%d" y="30" font-size="16" font-weight="bold" fill="#222222">%s</text>`+"\n", plotLeft, escape(title))

	// Shaded partial-AUC region, grid, ticks and frame.
	p.printf(`<rect x="%s" y="%s" width="%s" height="%d" fill="#f2e6c9" fill-opacity="0.6"/>`+"\n",
		px(0), py(1), num(shadeMaxFPR*plotSize), plotSize)
	for i := 0; i <= 5; i++ {
		v := float64(i) / 5
		label := fmt.Sprintf("%.1f", v)
		p.printf(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#e3e3e3" stroke-width="1"/>`+"\n", px(v), py(0), px(v), py(1))
		p.printf(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#e3e3e3" stroke-width="1"/>`+"\n", px(0), py(v), px(1), py(v))
		p.printf(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#444444" stroke-width="1"/>`+"\n", px(v), py(0), px(v), num(plotTop+plotSize+5))
		p.printf(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#444444" stroke-width="1"/>`+"\n", num(plotLeft-5), py(v), px(0), py(v))
		p.printf(`<text x="%s" y="%s" font-size="11" text-anchor="middle" fill="#333333">%s</text>`+"\n", px(v), num(plotTop+plotSize+18), label)
		p.printf(`<text x="%s" y="%s" font-size="11" text-anchor="end" fill="#333333">%s</text>`+"\n", num(plotLeft-8), num(py0(v)+4), label)
	}
	p.printf(`<rect x="%d" y="%d" width="%d" height="%d" fill="none" stroke="#444444" stroke-width="1"/>`+"\n", plotLeft, plotTop, plotSize, plotSize)
	p.printf(`<text x="%s" y="%d" font-size="13" text-anchor="middle" fill="#222222">false positive rate</text>`+"\n", px(0.5), plotTop+plotSize+40)
	p.printf(`<text x="0" y="0" font-size="13" text-anchor="middle" fill="#222222" transform="translate(%d %s) rotate(-90)">true positive rate</text>`+"\n", plotLeft-42, py(0.5))
	p.printf(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#888888" stroke-width="1" stroke-dasharray="4 4"/>`+"\n", px(0), py(0), px(1), py(1))

	// Curves and legend.
	for i, c := range curves {
		colour, dash := curveStyle(i)
		var pts strings.Builder
		for j := range c.FPR {
			if j > 0 {
				pts.WriteByte(' ')
			}
			pts.WriteString(px(c.FPR[j]) + "," + py(c.TPR[j]))
		}
		p.printf(`<polyline points="%s" fill="none" stroke="%s" stroke-width="2" stroke-linejoin="round"%s/>`+"\n", pts.String(), colour, dash)

		y := legendTop + i*legendStep
		p.printf(`<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="%s" stroke-width="3"%s/>`+"\n", legendLeft, y, legendLeft+26, y, colour, dash)
		p.printf(`<text x="%d" y="%d" font-size="12" fill="#222222">%s</text>`+"\n", legendLeft+34, y+4, escape(legendText(c)))
	}
	y := legendTop + len(curves)*legendStep
	p.printf(`<rect x="%d" y="%d" width="26" height="12" fill="#f2e6c9" stroke="#c9b98f" stroke-width="1"/>`+"\n", legendLeft, y-6)
	p.printf(`<text x="%d" y="%d" font-size="12" fill="#222222">partial AUC region (FPR &#8804; %.1f)</text>`+"\n", legendLeft+34, y+4, shadeMaxFPR)
	y += legendStep
	p.printf(`<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="#888888" stroke-width="1" stroke-dasharray="4 4"/>`+"\n", legendLeft, y, legendLeft+26, y)
	p.printf(`<text x="%d" y="%d" font-size="12" fill="#222222">chance</text>`+"\n", legendLeft+34, y+4)
	p.printf("</svg>\n")
	return p.err
}

// checkPlotCurve reports why c cannot be drawn, or nil.
func checkPlotCurve(c Curve) error {
	if len(c.FPR) == 0 {
		return fmt.Errorf("no points")
	}
	if len(c.FPR) != len(c.TPR) {
		return fmt.Errorf("%d FPR and %d TPR values", len(c.FPR), len(c.TPR))
	}
	for j := range c.FPR {
		if !(c.FPR[j] >= 0 && c.FPR[j] <= 1 && c.TPR[j] >= 0 && c.TPR[j] <= 1) {
			return fmt.Errorf("point %d (%v, %v) outside [0, 1]", j, c.FPR[j], c.TPR[j])
		}
	}
	return nil
}

// curveStyle returns the stroke colour and a dash attribute (possibly
// empty) for curve i.
//
// The colours are a colour-blind-safe palette (Okabe and Ito); after it is
// used up the colours repeat with a different dash pattern.
func curveStyle(i int) (colour, dashAttr string) {
	colours := [...]string{"#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000"}
	dashes := [...]string{"", "7 3", "2 3", "9 3 2 3"}
	colour = colours[i%len(colours)]
	dash := dashes[(i/len(colours))%len(dashes)]
	if dash != "" {
		dashAttr = fmt.Sprintf(` stroke-dasharray="%s"`, dash)
	}
	return colour, dashAttr
}

// legendText is the legend entry of c.
func legendText(c Curve) string {
	if math.IsNaN(c.AUC) || math.IsInf(c.AUC, 0) {
		return c.Name + " (AUC n/a)"
	}
	return fmt.Sprintf("%s (AUC %.3f)", c.Name, c.AUC)
}

// px maps a false positive rate to an x coordinate.
func px(v float64) string { return num(plotLeft + v*plotSize) }

// py maps a true positive rate to a y coordinate.
func py(v float64) string { return num(py0(v)) }

// py0 maps a true positive rate to a y coordinate as a number.
func py0(v float64) float64 { return plotTop + (1-v)*plotSize }

// num formats a coordinate with two decimals.
func num(v float64) string { return fmt.Sprintf("%.2f", v) }

// escape returns s with XML special characters escaped.
func escape(s string) string {
	var b strings.Builder
	_ = xml.EscapeText(&b, []byte(s)) // a strings.Builder never fails
	return b.String()
}

// svgPrinter writes formatted text and keeps the first error.
type svgPrinter struct {
	w   io.Writer
	err error
}

// printf writes to the underlying writer unless an error occurred before.
func (p *svgPrinter) printf(format string, args ...any) {
	if p.err != nil {
		return
	}
	_, p.err = fmt.Fprintf(p.w, format, args...)
}
