package site_test

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"cleave/internal/testutil"
	"cleave/notebook/compute"
	"cleave/notebook/site"
)

// notebookCopy copies a test notebook into a temporary folder and brings its results up to
// date as `cleave calc` would (the site shows the results the files hold).
func notebookCopy(t *testing.T, src string) string {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "nb")
	if err := os.CopyFS(dir, os.DirFS(src)); err != nil {
		t.Fatal(err)
	}
	if _, err := (compute.WorkTree{Root: dir}).Check(compute.CheckOptions{Write: true, NoCache: true}); err != nil {
		t.Fatal(err)
	}
	return dir
}

var (
	tagPattern = regexp.MustCompile(`<[a-zA-Z][^>]*>`)
	eventAttr  = regexp.MustCompile(`\son[a-z]+\s*=`)
	urlAttr    = regexp.MustCompile(`\s(href|src|action|formaction|xlink:href)\s*=\s*"([^"]*)"`)
)

func TestGolden(t *testing.T) {
	dir := notebookCopy(t, filepath.Join("testdata", "nb"))
	s, err := site.Build(dir, site.Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := []string{"_cleave/icon.svg", "_cleave/search-index.js", "_cleave/search.js", "_cleave/style.css", "cooldowns/C1.html", "cooldowns/plots/C1/fan.svg",
		"devices/D1.html", "index.html", "kinds/cooldown.html", "kinds/device.html", "kinds/mask.html", "kinds/piece.html", "kinds/process.html",
		"kinds/wafer.html", "masks/M1.html", "masks/plots/M1/bar.svg", "notes/plan.html", "pieces/W1-A.html", "wafers/W1.html"}
	if got := strings.Join(s.Paths(), "\n"); got != strings.Join(want, "\n") {
		t.Fatalf("files:\n%s\nwant:\n%s", got, strings.Join(want, "\n"))
	}
	for _, p := range []string{"index.html", "kinds/wafer.html", "wafers/W1.html", "devices/D1.html", "cooldowns/C1.html", "masks/M1.html", "notes/plan.html", "_cleave/search-index.js"} {
		testutil.Golden(t, filepath.Join("testdata", "golden", strings.ReplaceAll(p, "/", "_")), s.Files[p])
	}
	// Same notebook, same bytes.
	again, err := site.Build(dir, site.Options{})
	if err != nil {
		t.Fatal(err)
	}
	for p, b := range s.Files {
		if string(again.Files[p]) != string(b) {
			t.Errorf("%s differs between two builds", p)
		}
	}
	// The cooldown's page leads to its device, the device's to its wafer and mask.
	if c := string(s.Files["cooldowns/C1.html"]); !strings.Contains(c, `href="../devices/D1.html"`) || !strings.Contains(c, `href="../wafers/W1.html"`) {
		t.Errorf("cooldown page lacks its lineage")
	}
	if w := string(s.Files["wafers/W1.html"]); !strings.Contains(w, "2.6000e11 cm^-2") || !strings.Contains(w, `href="../cooldowns/C1.html"`) {
		t.Errorf("wafer table lacks the cooldown's density:\n%s", w)
	}
	out := filepath.Join(t.TempDir(), "site")
	if err := s.Write(out); err != nil {
		t.Fatal(err)
	}
	if err := s.Write(out); err != nil {
		t.Fatalf("writing over a site written before: %v", err)
	}
	if err := s.Write(dir); err == nil {
		t.Error("wrote a site over the notebook")
	}
}

// A hostile entry: raw HTML with script and event attributes, javascript: and data: links and
// images, an SVG with script beside it and a fake plot file with script named by a forged
// result region. None of it reaches the site.
func TestHostileEntry(t *testing.T) {
	dir := notebookCopy(t, filepath.Join("testdata", "nb"))
	evil := "---\nid: X1\nkind: wafer\ntitle: <script>alert('title')</script>\nby: \"<img src=x onerror=alert(1)>\"\n---\n" +
		"# Evil <script>alert(1)</script>\n\n<div onclick=\"alert(2)\">click</div>\n\n<script>alert(3)</script>\n\n" +
		"[js](javascript:alert(4)) [JS](JaVaScRiPt:alert(5)) [data](data:text/html;base64,PHNjcmlwdD5hbGVydCg2KTwvc2NyaXB0Pg==)\n\n" +
		"![img](data:image/svg+xml;base64,PHN2ZyBvbmxvYWQ9YWxlcnQoNyk+) ![svg](evil.svg) ![up](../../../etc/passwd.png)\n\n" +
		"<a href=\"javascript:alert(8)\">raw</a> <img src=x onerror=alert(9)> <svg onload=alert(10)></svg>\n\n" +
		"[vb](vbscript:msgbox) [file](file:///etc/passwd) [proto](//evil.example/x) <javascript:alert(11)>\n\n" +
		"```cleave\nfake = 1  #~ plot plots/X1/fake.svg sha256:0123456789ab\n```\n\n![fake](plots/X1/fake.svg)\n\n" +
		"```html\n<script>alert(12)</script>\n```\n"
	if err := os.WriteFile(filepath.Join(dir, "wafers", "X1.md"), []byte(evil), 0o644); err != nil {
		t.Fatal(err)
	}
	svg := `<svg xmlns="http://www.w3.org/2000/svg" onload="alert(13)"><script>alert(14)</script></svg>`
	os.WriteFile(filepath.Join(dir, "wafers", "evil.svg"), []byte(svg), 0o644)
	os.MkdirAll(filepath.Join(dir, "wafers", "plots", "X1"), 0o755)
	os.WriteFile(filepath.Join(dir, "wafers", "plots", "X1", "fake.svg"), []byte(svg), 0o644)
	s, err := site.Build(dir, site.Options{})
	if err != nil {
		t.Fatal(err)
	}
	ownScript := regexp.MustCompile(`<script src="(\.\./)*_cleave/(search-index|search)\.js"></script>`)
	for p, b := range s.Files {
		text := ownScript.ReplaceAllString(string(b), "")
		if strings.HasSuffix(p, ".js") {
			continue // our own scripts; the index is JSON, checked below
		}
		// Markup only: text may say "javascript:" once escaped, a tag or an attribute may not.
		for _, tag := range tagPattern.FindAllString(text, -1) {
			low := strings.ToLower(tag)
			if strings.HasPrefix(low, "<script") || strings.HasPrefix(low, "<svg") && strings.HasSuffix(p, ".html") || strings.HasPrefix(low, "<iframe") || strings.HasPrefix(low, "<object") {
				t.Errorf("%s: tag %s survived", p, tag)
			}
			if eventAttr.MatchString(low) {
				t.Errorf("%s: event attribute in %s", p, tag)
			}
			for _, m := range urlAttr.FindAllStringSubmatch(low, -1) {
				u := m[2]
				if strings.Contains(u, ":") && !strings.HasPrefix(u, "https:") && !strings.HasPrefix(u, "http:") && !strings.HasPrefix(u, "mailto:") || strings.HasPrefix(u, "//") {
					t.Errorf("%s: address %q in %s", p, u, tag)
				}
			}
		}
		if strings.Contains(text, "<script>alert") || strings.Contains(text, "<div onclick") {
			t.Errorf("%s: raw HTML survived", p)
		}
	}
	for p := range s.Files {
		if strings.Contains(p, "evil") || strings.Contains(p, "fake") || strings.Contains(p, "passwd") {
			t.Errorf("%s was copied into the site", p)
		}
	}
	idx := string(s.Files["_cleave/search-index.js"])
	if strings.Contains(idx, "<script") || strings.Contains(idx, "</script") {
		t.Errorf("the search index carries a script tag unescaped")
	}
	page := string(s.Files["wafers/X1.html"])
	if !strings.Contains(page, "&lt;script&gt;alert(&#39;title&#39;)&lt;/script&gt;") {
		t.Errorf("the title is not shown escaped:\n%s", page)
	}
}
