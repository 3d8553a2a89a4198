// Package report writes telegrapher's outputs: plots (gonum/plot), the HTML report,
// CSV tables and COMTRADE files. Every file is written to a temporary name beside its
// target and renamed into place, so a failed run never leaves a half-written file.
package report

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
)

// WriteFileAtomic writes data to path through a temporary file in the same folder,
// renamed into place only when complete.
func WriteFileAtomic(path string, data []byte) error {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return err
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
		return werr
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
