// Package report writes telegrapher's outputs: plots (gonum/plot), the HTML report,
// CSV tables and COMTRADE files. Every file is written to a temporary name beside its
// target and renamed into place, so a failed run never leaves a half-written file.
package report

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// WriteFileAtomic writes data to path through a temporary file in the same folder,
// renamed into place only when complete. An error is an *fs.PathError naming path
// (never the temporary file, a name the user did not give).
func WriteFileAtomic(path string, data []byte) error {
	fail := func(err error) error {
		var pe *fs.PathError
		var le *os.LinkError
		switch {
		case errors.As(err, &pe):
			err = pe.Err
		case errors.As(err, &le):
			err = le.Err
		}
		return &fs.PathError{Op: "write", Path: path, Err: err}
	}
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fail(err)
	}
	tmp := f.Name()
	_, werr := f.Write(data)
	cerr := f.Close()
	if werr == nil {
		werr = cerr
	}
	if werr == nil {
		werr = os.Chmod(tmp, 0o644)
	}
	if werr == nil {
		werr = os.Rename(tmp, path)
	}
	if werr != nil {
		os.Remove(tmp)
		return fail(werr)
	}
	return nil
}

// PlotFormat returns "png" or "svg" from a file name's extension, or an error naming
// the flag that gave it.
func PlotFormat(path, flagName string) (string, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".png":
		return "png", nil
	case ".svg":
		return "svg", nil
	}
	return "", fmt.Errorf("--%s %s: the file name must end in .png or .svg", flagName, path)
}

// SavePlot renders p at the given size to path (PNG or SVG by its extension),
// atomically.
func SavePlot(p *plot.Plot, w, h vg.Length, path string) error {
	format, err := PlotFormat(path, "plot")
	if err != nil {
		return err
	}
	b, err := RenderPlot(p, w, h, format)
	if err != nil {
		return err
	}
	return WriteFileAtomic(path, b)
}

// RenderPlot renders p to bytes in "png" or "svg".
func RenderPlot(p *plot.Plot, w, h vg.Length, format string) ([]byte, error) {
	wt, err := p.WriterTo(w, h, format)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if _, err := wt.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// RenderStacked renders plots stacked in one column as one figure of width w and
// panel height h each, in "png" or "svg".
func RenderStacked(plots []*plot.Plot, w, h vg.Length, format string) ([]byte, error) {
	if len(plots) == 0 {
		return nil, fmt.Errorf("report: no plots to render")
	}
	c, dc, err := whitePage(w, h*vg.Length(len(plots)), format, 96)
	if err != nil {
		return nil, err
	}
	rows := make([][]*plot.Plot, len(plots))
	for i, p := range plots {
		rows[i] = []*plot.Plot{p}
	}
	tiles := draw.Tiles{Rows: len(plots), Cols: 1, PadTop: vg.Points(6), PadBottom: vg.Points(6),
		PadLeft: vg.Points(6), PadRight: vg.Points(12), PadY: vg.Points(18)}
	cs := plot.Align(rows, tiles, dc)
	for i, p := range plots {
		p.Draw(cs[i][0])
	}
	return canvasBytes(c)
}

// whitePage returns a canvas of w by h in "png" (at dpi) or "svg", painted white (for
// PNG viewers with dark backgrounds), and its drawing area.
func whitePage(w, h vg.Length, format string, dpi int) (vg.CanvasWriterTo, draw.Canvas, error) {
	var c vg.CanvasWriterTo
	switch format {
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(dpi))}
	case "svg":
		c = vgsvg.New(w, h)
	default:
		return nil, draw.Canvas{}, fmt.Errorf("report: unknown plot format %q", format)
	}
	dc := draw.New(c)
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	return c, dc, nil
}

// canvasBytes writes a finished canvas out as bytes.
func canvasBytes(c vg.CanvasWriterTo) ([]byte, error) {
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// SaveStacked renders plots stacked in one column (RenderStacked) to path, PNG or SVG
// by its extension, atomically.
func SaveStacked(plots []*plot.Plot, w, h vg.Length, path string) error {
	format, err := PlotFormat(path, "plot")
	if err != nil {
		return err
	}
	b, err := RenderStacked(plots, w, h, format)
	if err != nil {
		return err
	}
	return WriteFileAtomic(path, b)
}
