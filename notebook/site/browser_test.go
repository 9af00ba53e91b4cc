package site_test

import (
	"context"
	"fmt"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"cleave/notebook/site"
)

// chromium finds Debian's chromium. The test skips only outside CI when there is none; CI
// (.ci/run) installs it, and there a missing browser fails the test.
func chromium(t *testing.T) string {
	t.Helper()
	for _, name := range []string{"chromium", "chromium-browser", "google-chrome"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	if os.Getenv("CI") != "" {
		t.Fatal("no chromium on the PATH: .ci/run installs Debian's chromium package")
	}
	t.Skip("no chromium on the PATH (apt-get install chromium); CI runs this test")
	return ""
}

type pageState struct {
	Images, Drawn, Plots int
	Title                string
}

// In a real headless browser: the pages of a small notebook's site load without console
// errors, every plot is there and drawn, the lineage leads from a cooldown to its device and
// on to its wafer, and the search box finds an id.
func TestBrowser(t *testing.T) {
	exe := chromium(t)
	dir := notebookCopy(t, filepath.Join("testdata", "nb"))
	srv, err := site.NewServer(dir)
	if err != nil {
		t.Fatal(err)
	}
	hs := httptest.NewServer(srv) // loopback
	defer hs.Close()

	opts := append(chromedp.DefaultExecAllocatorOptions[:0:0],
		chromedp.ExecPath(exe), chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU, chromedp.NoFirstRun,
		chromedp.Flag("disable-quic", true), chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true), chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()), chromedp.WindowSize(1200, 900))
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	defer cancelA()
	ctx, cancel := chromedp.NewContext(actx)
	defer cancel()

	var mu sync.Mutex
	var problems []string
	if err := chromedp.Listen(ctx, func(ev any) {
		mu.Lock()
		defer mu.Unlock()
		switch e := ev.(type) {
		case *runtime.EventConsoleAPICalled:
			if e.Type == runtime.ConsoleAPICalledTypeError || e.Type == runtime.ConsoleAPICalledTypeWarning {
				problems = append(problems, fmt.Sprintf("console %s", e.Type))
			}
		case *runtime.EventExceptionThrown:
			problems = append(problems, "exception: "+e.ExceptionDetails.Text)
		case *log.EventEntryAdded:
			if e.Entry.Level == log.EntryLevelError || e.Entry.Level == log.EntryLevelWarning {
				problems = append(problems, fmt.Sprintf("log %s: %s (%s)", e.Entry.Level, e.Entry.Text, e.Entry.URL))
			}
		}
	}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(ctx, log.Enable, cdp.Empty{}); err != nil {
		t.Fatal(err)
	}
	if _, err := chromedp.Call(ctx, runtime.Enable, cdp.Empty{}); err != nil {
		t.Fatal(err)
	}
	// Every page of the site; on each, every image is loaded and has a size on screen.
	plotsSeen := 0
	for _, page := range []string{"index.html", "kinds/cooldown.html", "wafers/W1.html", "pieces/W1-A.html", "masks/M1.html", "devices/D1.html", "cooldowns/C1.html", "notes/plan.html"} {
		var state pageState
		err := chromedp.Do(ctx,
			chromedp.Navigate(hs.URL+"/"+page),
			chromedp.WaitReady(chromedp.CSS("body")))
		if err == nil {
			_, err = chromedp.Run(ctx, chromedp.Poll[bool](`Array.from(document.images).every(i => i.complete)`, chromedp.WithPollingTimeout(20*time.Second)))
		}
		if err == nil {
			state, err = chromedp.Run(ctx, chromedp.Evaluate[pageState](`(() => {
				const imgs = Array.from(document.images);
				const drawn = imgs.filter(i => i.naturalWidth > 0 && i.getBoundingClientRect().width > 0 && getComputedStyle(i).visibility !== "hidden");
				return {Images: imgs.length, Drawn: drawn.length, Plots: document.querySelectorAll("figure.cleave-plot img").length, Title: document.title};
			})()`))
		}
		if err != nil {
			t.Fatalf("%s: %v", page, err)
		}
		if state.Drawn != state.Images {
			t.Errorf("%s: %d of %d images drawn", page, state.Drawn, state.Images)
		}
		plotsSeen += state.Plots
		if state.Title == "" {
			t.Errorf("%s: no title", page)
		}
	}
	if plotsSeen != 2 { // the Hall bar of M1 and the fan of C1
		t.Errorf("%d plots shown, want 2", plotsSeen)
	}
	// From the cooldown to its device, then to its wafer, through the lineage links.
	err = chromedp.Do(ctx,
		chromedp.Navigate(hs.URL+"/cooldowns/C1.html"),
		chromedp.WaitVisible(chromedp.CSS(`nav.lineage a[data-id="D1"]`)),
		chromedp.Click(chromedp.CSS(`nav.lineage a[data-id="D1"]`)),
		chromedp.WaitVisible(chromedp.CSS(`nav.lineage a[data-id="W1"]`)))
	loc, _ := chromedp.Run(ctx, chromedp.Location())
	if err != nil || !strings.HasSuffix(loc, "/devices/D1.html") {
		t.Fatalf("cooldown → device: at %s, %v", loc, err)
	}
	err = chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`nav.lineage a[data-id="W1"]`)), chromedp.WaitVisible(chromedp.CSS(`table.wafer`)))
	loc, _ = chromedp.Run(ctx, chromedp.Location())
	if err != nil || !strings.HasSuffix(loc, "/wafers/W1.html") {
		t.Fatalf("device → wafer: at %s, %v", loc, err)
	}
	// The search box finds an id and leads to its page.
	err = chromedp.Do(ctx,
		chromedp.SendKeys(chromedp.CSS(`#search input`), "C1"),
		chromedp.WaitVisible(chromedp.CSS(`#search li a`)))
	hit, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#search li a`)))
	if err == nil {
		err = chromedp.Do(ctx, chromedp.Click(chromedp.CSS(`#search li a`)), chromedp.WaitVisible(chromedp.CSS(`figure.cleave-plot img`)))
	}
	loc, _ = chromedp.Run(ctx, chromedp.Location())
	if err != nil || !strings.HasPrefix(hit, "C1") || !strings.HasSuffix(loc, "/cooldowns/C1.html") {
		t.Fatalf("search for C1: first hit %q, at %s, %v", hit, loc, err)
	}
	mu.Lock()
	defer mu.Unlock()
	for _, p := range problems {
		t.Errorf("browser: %s", p)
	}
}
