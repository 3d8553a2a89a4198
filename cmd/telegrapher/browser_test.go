package main

import (
	"context"
	"fmt"
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
