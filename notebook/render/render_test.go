package render_test

import (
	"bytes"
	"path/filepath"
	"strings"
	"testing"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"

	"cleave/internal/testutil"
	"cleave/notebook/render"
)

func convert(t *testing.T, src string, opts ...render.Option) string {
	t.Helper()
	md := goldmark.New(goldmark.WithExtensions(extension.GFM, render.Blocks(opts...)))
	var b bytes.Buffer
	if err := md.Convert([]byte(src), &b); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// A block with every kind of line: results with uncertainties and units, a record, a
// warning, a failed line, a comment, a plot, inside a list and a quote too.
func TestGolden(t *testing.T) {
	src := "# CD-1\n\n```cleave\n" +
		"# density from the Hall slope\n" +
		"hall = hall_density(d, 0.05 T .. 0.5 T)  #~ n = (2.600024 ± 0.000037)e11 cm^-2, electrons\n" +
		"mu = mobility(rho, hall.n) -> cm^2/(V s)  #~ 1.23 ± 0.05e6 cm^2/(V s)\n" +
		"\n" +
		"tq = quantum_lifetime(d, 0.2 T .. 0.8 T, m, n)  #~ tau_q = 1.52 ± 0.04 ps, dingle_temperature 0.80 ± 0.02 K; warning: 2 extrema dropped (amplitude below 2σ)\n" +
		"E = fermi_energy(n)  #~ error: 1:5: missing argument m (was: 9.3 meV)\n" +
		"p = plot(d, \"rxx\", n = hall.n)  #~ plot plots/CD-1/rxx.svg sha256:0123456789ab\n" +
		"psi2_0 = 3\n" +
		"```\n\n" +
		"- in a list:\n\n  ```cleave\n  x = 3 T  #~ 3.0000 T\n  ```\n\n> ```cleave\n> y = 2 K  #~ 2.0000 K\n> ```\n\n" +
		"```go\nfmt.Println(\"not a calc block\") // #~ stays code\n```\n"
	got := convert(t, src)
	testutil.GoldenString(t, filepath.Join("testdata", "block.html"), got)
	mapped := convert(t, src, render.WithImageURL(func(p string) (string, bool) { return "../figures/" + p, true }))
	if !strings.Contains(mapped, `src="../figures/plots/CD-1/rxx.svg"`) {
		t.Errorf("WithImageURL not applied:\n%s", mapped)
	}
	hidden := convert(t, src, render.WithImageURL(func(string) (string, bool) { return "", false }))
	if strings.Contains(hidden, "<img") || !strings.Contains(hidden, "plot plots/CD-1/rxx.svg") {
		t.Errorf("a refused picture should leave the text only:\n%s", hidden)
	}
}

// Nothing from a block reaches the page unescaped, and a result can never choose where a
// picture comes from beyond a plots/…/….svg path.
func TestHostile(t *testing.T) {
	src := "```cleave\n" +
		"<script>alert(1)</script> = 3  #~ <img src=x onerror=alert(1)>\n" +
		"a = 1  #~ plot javascript:alert(1) sha256:0123456789ab\n" +
		"b = 1  #~ plot plots/x/\"onerror=alert(1).svg sha256:0123456789ab\n" +
		"c = 1  #~ plot plots/../../etc.svg sha256:0123456789ab\n" +
		"d = 1  #~ 3 <b>T</b>; warning: <i>x</i>\n" +
		"```\n"
	got := convert(t, src)
	for _, bad := range []string{"<script", "<img src=x", "href=\"javascript", "src=\"javascript", "<b>", "<i>", "onerror=alert(1).svg\""} {
		if strings.Contains(got, bad) {
			t.Errorf("%q survived:\n%s", bad, got)
		}
	}
	if strings.Contains(got, "<img") {
		t.Errorf("a picture from a hostile result:\n%s", got)
	}
	evil := convert(t, "```cleave\np = 1  #~ plot plots/a/b.svg sha256:0123456789ab\n```\n",
		render.WithImageURL(func(string) (string, bool) { return "javascript:alert(1)", true }))
	if strings.Contains(evil, "javascript") {
		t.Errorf("an unsafe mapped address survived:\n%s", evil)
	}
}

func TestMarkup(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"3.0000 T", `<span class="cleave-num">3.0000</span> <span class="cleave-unit">T</span>`},
		{"(2.60 ± 0.04)e11 cm^-2", `(<span class="cleave-num">2.60</span> <span class="cleave-unc">± 0.04</span>)<span class="cleave-num">e11</span> <span class="cleave-unit">cm^-2</span>`},
		{"1.2e6 cm^2/(V s), electrons", `<span class="cleave-num">1.2e6</span> <span class="cleave-unit">cm^2/(V s)</span>, electrons`},
		{"-0.5 meV", `<span class="cleave-num">-0.5</span> <span class="cleave-unit">meV</span>`},
		{`"a<b"`, `&#34;a&lt;b&#34;`},
		{"2 subband(s) below E_F", `<span class="cleave-num">2</span> subband(s) below E_F`},
		{"psi2_0", `psi2_0`},
	} {
		if got := render.Markup(c.in); got != c.want {
			t.Errorf("Markup(%q)\n got %s\nwant %s", c.in, got, c.want)
		}
	}
}
