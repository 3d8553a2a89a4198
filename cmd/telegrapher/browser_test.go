package main

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
)

// browserTimeout bounds one page inspection; a cold Chromium start on the shared
// 2-core machine takes a few seconds.
const browserTimeout = 90 * time.Second

// browserPath returns the Chromium to drive, or skips the test when there is none,
// unless TELEGRAPHER_REQUIRE_BROWSER=1 (CI), where a missing browser fails it.
func browserPath(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	if os.Getenv("TELEGRAPHER_REQUIRE_BROWSER") == "1" {
		t.Fatal("no chromium on PATH and TELEGRAPHER_REQUIRE_BROWSER=1")
	}
	t.Skip("no chromium on PATH: skipping the browser test (set TELEGRAPHER_REQUIRE_BROWSER=1 to require it)")
	return ""
}

// pageReport is what a browser saw on a page.
type pageReport struct {
	Broken   []string // images that did not load (their alt text or source)
	Console  []string // console errors, uncaught exceptions, browser log errors
	Missing  []string // wanted element ids not on the page
	Sections int      // number of <section> elements
	Title    string
}

// inspectPage opens the HTML file at path in headless Chromium with no network, waits
// for it to load, and returns what went wrong. With screenshot set, it saves a
// full-page PNG there.
func inspectPage(t *testing.T, path string, wantIDs []string, screenshot string) pageReport {
	t.Helper()
	exe := browserPath(t)
	abs, err := filepath.Abs(path)
	if err != nil {
		t.Fatal(err)
	}
	profile := t.TempDir()
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(exe),
		chromedp.Flag("headless", true),
		chromedp.Flag("no-sandbox", true),
		chromedp.Flag("disable-gpu", true),
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("no-first-run", true),
		chromedp.Flag("no-default-browser-check", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-extensions", true),
		chromedp.Flag("disable-dev-shm-usage", true),
		chromedp.Flag("hide-scrollbars", true),
		chromedp.UserDataDir(profile),
		chromedp.WindowSize(1200, 900),
	}
	ctx, cancel := context.WithTimeout(context.Background(), browserTimeout)
	defer cancel()
	allocCtx, cancelAlloc := chromedp.NewExecAllocator(ctx, opts...)
	defer cancelAlloc()

	var mu sync.Mutex
	var rep pageReport
	listen := func(ev any) {
		mu.Lock()
		defer mu.Unlock()
		switch e := ev.(type) {
		case *runtime.EventConsoleAPICalled:
			if e.Type == runtime.ConsoleAPICalledTypeError || e.Type == runtime.ConsoleAPICalledTypeAssert {
				rep.Console = append(rep.Console, fmt.Sprintf("console.%s: %s", e.Type, consoleArgs(e.Args)))
			}
		case *runtime.EventExceptionThrown:
			rep.Console = append(rep.Console, "exception: "+e.ExceptionDetails.Text+" "+describe(e.ExceptionDetails.Exception))
		case *log.EventEntryAdded:
			if e.Entry.Level == log.EntryLevelError {
				rep.Console = append(rep.Console, fmt.Sprintf("log (%s): %s %s", e.Entry.Source, e.Entry.Text, e.Entry.URL))
			}
		}
	}
	tabCtx, cancelTab := chromedp.NewContext(allocCtx, chromedp.WithListener(listen))
	defer cancelTab()
	defer func() {
		// Chromium's helpers may still write in the profile for a moment after the
		// browser stops; t.TempDir's clean-up retries are not enough on a busy machine.
		cancelTab()
		cancelAlloc()
	}()

	u := url.URL{Scheme: "file", Path: abs}
	if err := chromedp.Do(tabCtx, chromedp.Navigate(u.String())); err != nil {
		t.Fatalf("opening %s in Chromium: %v", u.String(), err)
	}
	// Images decode asynchronously; wait until every one is complete.
	broken, err := chromedp.Run(tabCtx, chromedp.Evaluate[[]string](`
		new Promise(resolve => {
			const check = () => {
				const imgs = Array.from(document.images);
				if (imgs.every(i => i.complete)) {
					resolve(imgs.filter(i => i.naturalWidth === 0).map(i => i.alt || i.src.slice(0, 60)));
				} else {
					setTimeout(check, 50);
				}
			};
			check();
		})`, chromedp.EvalAwaitPromise))
	if err != nil {
		t.Fatalf("reading the images: %v", err)
	}
	ids, err := chromedp.Run(tabCtx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll('[id]')).map(e => e.id)`))
	if err != nil {
		t.Fatal(err)
	}
	nsec, err := chromedp.Run(tabCtx, chromedp.Evaluate[int](`document.querySelectorAll('section').length`))
	if err != nil {
		t.Fatal(err)
	}
	title, err := chromedp.Run(tabCtx, chromedp.Title())
	if err != nil {
		t.Fatal(err)
	}
	if screenshot != "" {
		png, err := chromedp.Run(tabCtx, chromedp.FullScreenshot(100))
		if err != nil {
			t.Fatalf("screenshot: %v", err)
		}
		if err := os.WriteFile(screenshot, png, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	have := map[string]bool{}
	for _, id := range ids {
		have[id] = true
	}
	mu.Lock()
	defer mu.Unlock()
	rep.Broken = broken
	rep.Sections = nsec
	rep.Title = title
	for _, id := range wantIDs {
		if !have[id] {
			rep.Missing = append(rep.Missing, id)
		}
	}
	return rep
}

func consoleArgs(args []*runtime.RemoteObject) string {
	s := ""
	for i, a := range args {
		if i > 0 {
			s += " "
		}
		if len(a.Value) > 0 {
			s += string(a.Value)
		} else {
			s += a.Description
		}
	}
	return s
}

// TestBrowserCheckFindsFaults shows the browser check can fail: a page with a broken
// image, a console error and a missing section is caught on all three counts.
func TestBrowserCheckFindsFaults(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	page := filepath.Join(dir, "bad.html")
	html := `<!DOCTYPE html><html><head><title>bad</title></head><body>
<section id="scan"><img src="missing.svg" alt="scan plot"></section>
<script>console.error("deliberate fault")</script></body></html>`
	if err := os.WriteFile(page, []byte(html), 0o644); err != nil {
		t.Fatal(err)
	}
	rep := inspectPage(t, page, []string{"scan", "energise"}, "")
	if len(rep.Broken) != 1 || rep.Broken[0] != "scan plot" {
		t.Errorf("broken images = %q, want [scan plot]", rep.Broken)
	}
	foundErr := false
	for _, c := range rep.Console {
		if strings.Contains(c, "deliberate fault") {
			foundErr = true
		}
	}
	if !foundErr {
		t.Errorf("console errors %q lack the deliberate one", rep.Console)
	}
	if len(rep.Missing) != 1 || rep.Missing[0] != "energise" {
		t.Errorf("missing = %q, want [energise]", rep.Missing)
	}
}

func describe(o *runtime.RemoteObject) string {
	if o == nil {
		return ""
	}
	return o.Description
}

// TestDemoReportInBrowser opens the demo's report.html from disk in headless Chromium
// (no network) and fails on a broken image, a console error or a missing section.
// TELEGRAPHER_SCREENSHOT=FILE.png keeps a full-page screenshot for a person to look at.
func TestDemoReportInBrowser(t *testing.T) {
	t.Parallel()
	browserPath(t)
	out := demoFolder(t)
	sections := []string{"caution", "inputs", "constants", "scan", "energise", "loading", "switching", "remedies"}
	rep := inspectPage(t, filepath.Join(out, "report.html"), sections, os.Getenv("TELEGRAPHER_SCREENSHOT"))
	if len(rep.Broken) > 0 {
		t.Errorf("broken images: %q", rep.Broken)
	}
	if len(rep.Console) > 0 {
		t.Errorf("console errors: %q", rep.Console)
	}
	if len(rep.Missing) > 0 {
		t.Errorf("missing sections: %q", rep.Missing)
	}
	if rep.Sections != len(sections)-1 {
		t.Errorf("%d sections on the page, want %d", rep.Sections, len(sections)-1)
	}
	if !strings.Contains(rep.Title, "Harrowmere") {
		t.Errorf("page title %q", rep.Title)
	}
}

// mapFillTol is how far, in screen pixels, the painted heat map may stop short of the
// plot's data area: cell edges fall on fractional pixels and are anti-aliased.
const mapFillTol = 3

// TestReportHeatMapFillsAxes opens the report of a study with
// scan.short_circuit_mva_range in headless Chromium, takes a screenshot of the heat map
// figure as the browser draws it, and checks that the coloured map fills the plot's
// data area: from the x axis to the top of the y axis, and from the y axis to the last
// harmonic (the plot leaves a fifth of the width for the legend). The data area is
// found from the axis lines themselves (the longest dark runs of pixels), so the
// check holds whatever the layout. TELEGRAPHER_SCREENSHOT_MAP=FILE.png keeps the image.
func TestReportHeatMapFillsAxes(t *testing.T) {
	t.Parallel()
	browserPath(t)
	dir := t.TempDir()
	studyPath := writeStudy(t, scanStudy) // has [scan] short_circuit_mva_range
	out := filepath.Join(dir, "rep")
	var stdout, stderr strings.Builder
	if code := run([]string{"report", studyPath, "--out", out}, &stdout, &stderr); code != 0 {
		t.Fatalf("report: exit %d: %s", code, stderr.String())
	}
	shot := screenshotImage(t, filepath.Join(out, "report.html"), `img[alt^="heat map"]`)
	if keep := os.Getenv("TELEGRAPHER_SCREENSHOT_MAP"); keep != "" {
		if err := os.WriteFile(keep, shot, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	img, err := png.Decode(bytes.NewReader(shot))
	if err != nil {
		t.Fatal(err)
	}
	axes, ok := dataAreaFromAxes(img)
	if !ok {
		t.Fatalf("no axis lines found in the %v screenshot", img.Bounds())
	}
	wantRight := axes.Min.X + int(float64(axes.Dx())/1.2+0.5)
	// Search the axes up to a little beyond the map's right edge: the legend's colour
	// swatches sit further right, in the room left for them.
	search := axes
	search.Max.X = wantRight + 40
	painted, ok := paletteBox(img, search)
	if !ok {
		t.Fatalf("no heat-map colours inside the axes %v", axes)
	}
	for _, c := range []struct {
		name      string
		got, want int
	}{
		{"top", painted.Min.Y, axes.Min.Y}, {"bottom", painted.Max.Y, axes.Max.Y},
		{"left", painted.Min.X, axes.Min.X}, {"right", painted.Max.X, wantRight},
	} {
		if d := c.got - c.want; d > mapFillTol || d < -mapFillTol {
			t.Errorf("heat map %s edge at %d px, the axes' at %d px (map %v, axes %v)", c.name, c.got, c.want, painted, axes)
		}
	}
}

// screenshotImage opens the page at path in headless Chromium and returns a PNG
// screenshot of the first element matching sel, as drawn.
func screenshotImage(t *testing.T, path, sel string) []byte {
	t.Helper()
	exe := browserPath(t)
	abs, err := filepath.Abs(path)
	if err != nil {
		t.Fatal(err)
	}
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(exe), chromedp.Flag("headless", true), chromedp.Flag("no-sandbox", true),
		chromedp.Flag("disable-gpu", true), chromedp.Flag("no-first-run", true),
		chromedp.Flag("disable-background-networking", true), chromedp.Flag("disable-extensions", true),
		chromedp.Flag("disable-dev-shm-usage", true), chromedp.Flag("hide-scrollbars", true),
		chromedp.UserDataDir(t.TempDir()), chromedp.WindowSize(1200, 900),
	}
	ctx, cancel := context.WithTimeout(context.Background(), browserTimeout)
	defer cancel()
	allocCtx, cancelAlloc := chromedp.NewExecAllocator(ctx, opts...)
	defer cancelAlloc()
	tabCtx, cancelTab := chromedp.NewContext(allocCtx)
	defer cancelTab()
	u := url.URL{Scheme: "file", Path: abs}
	if err := chromedp.Do(tabCtx, chromedp.Navigate(u.String()), chromedp.WaitVisible(chromedp.CSS(sel))); err != nil {
		t.Fatalf("opening %s: %v", u.String(), err)
	}
	buf, err := chromedp.Run(tabCtx, chromedp.Screenshot(chromedp.CSS(sel)))
	if err != nil {
		t.Fatalf("screenshot of %s in %s: %v", sel, u.String(), err)
	}
	cancelTab()
	cancelAlloc()
	return buf
}

// dark reports a dark neutral grey or black pixel: the axis lines, thin black lines
// that the browser anti-aliases to grey (the map's darkest class, #800026, is not
// neutral).
func dark(c color.Color) bool {
	r, g, b, _ := c.RGBA()
	r, g, b = r>>8, g>>8, b>>8
	neutral := max(r, g, b)-min(r, g, b) < 0x10
	return neutral && r < 0xb0
}

// dataAreaFromAxes finds the plot's data area in a screenshot: the y axis is the
// column with the longest vertical run of dark pixels, the x axis the row with the
// longest horizontal one; the area spans the y axis' run vertically and the x axis'
// run horizontally.
func dataAreaFromAxes(img image.Image) (image.Rectangle, bool) {
	b := img.Bounds()
	longest := func(n, m int, at func(i, j int) bool) (best, from, to int) {
		for i := 0; i < n; i++ {
			run := 0
			for j := 0; j < m; j++ {
				if at(i, j) {
					run++
					if run > to-from {
						best, from, to = i, j-run+1, j+1
					}
				} else {
					run = 0
				}
			}
		}
		return
	}
	_, y0, y1 := longest(b.Dx(), b.Dy(), func(i, j int) bool { return dark(img.At(b.Min.X+i, b.Min.Y+j)) })
	_, x0, x1 := longest(b.Dy(), b.Dx(), func(i, j int) bool { return dark(img.At(b.Min.X+j, b.Min.Y+i)) })
	if y1-y0 < b.Dy()/3 || x1-x0 < b.Dx()/3 {
		return image.Rectangle{}, false
	}
	return image.Rect(b.Min.X+x0, b.Min.Y+y0, b.Min.X+x1, b.Min.Y+y1), true
}

// mapColours are the heat map's colour classes (report.gainBins), as drawn.
var mapColours = [][3]uint8{
	{0xf7, 0xfb, 0xff}, {0xc6, 0xdb, 0xef}, {0x6b, 0xae, 0xd6}, {0xfe, 0xd9, 0x76},
	{0xfd, 0x8d, 0x3c}, {0xe3, 0x1a, 0x1c}, {0x80, 0x00, 0x26},
}

// paletteBox is the bounding box of the pixels within area that have a heat-map
// colour (within 2 per channel).
func paletteBox(img image.Image, area image.Rectangle) (image.Rectangle, bool) {
	box := image.Rectangle{Min: area.Max, Max: area.Min}
	found := false
	for y := area.Min.Y; y < area.Max.Y; y++ {
		for x := area.Min.X; x < area.Max.X; x++ {
			r, g, b, _ := img.At(x, y).RGBA()
			for _, c := range mapColours {
				near := func(v uint32, w uint8) bool { d := int(v>>8) - int(w); return d >= -2 && d <= 2 }
				if near(r, c[0]) && near(g, c[1]) && near(b, c[2]) {
					found = true
					box.Min.X, box.Min.Y = min(box.Min.X, x), min(box.Min.Y, y)
					box.Max.X, box.Max.Y = max(box.Max.X, x+1), max(box.Max.Y, y+1)
					break
				}
			}
		}
	}
	return box, found
}
