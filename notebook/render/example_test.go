package render_test

import (
	"bytes"
	"fmt"

	"github.com/yuin/goldmark"

	"cleave/notebook/render"
)

// Any program that renders Markdown with goldmark shows calc blocks as tables by adding the
// extension.
func ExampleBlocks() {
	md := goldmark.New(goldmark.WithExtensions(render.Blocks()))
	src := []byte("## Density\n\n```cleave\nn = 2.6e11 cm^-2  #~ 2.6000e11 cm^-2\nmu = mobility(x)  #~ error: 1:15: unknown name \"x\"\n```\n")
	var out bytes.Buffer
	if err := md.Convert(src, &out); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Print(out.String())
	// Output:
	// <h2>Density</h2>
	// <div class="cleave-block"><table>
	// <tr class="cleave-code"><td class="cleave-in"><code>n = 2.6e11 cm^-2</code></td><td class="cleave-out"><span class="cleave-num">2.6000e11</span> <span class="cleave-unit">cm^-2</span></td></tr>
	// <tr class="cleave-code cleave-error"><td class="cleave-in"><code>mu = mobility(x)</code></td><td class="cleave-out"><span class="cleave-err">error: 1:15: unknown name &#34;x&#34;</span></td></tr>
	// </table></div>
}
