package site

import (
	"bytes"
	"html/template"
	"sort"
	"strings"
	"sync"

	"cleave/notebook"
)

const head = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="referrer" content="no-referrer">
<title>{{.Title}}</title>
<link rel="stylesheet" href="{{.Base}}_cleave/style.css">
<link rel="icon" href="{{.Base}}_cleave/icon.svg">
</head>
<body>
<header class="top"><a href="{{.Base}}index.html">notebook</a>
<nav>{{range kinds}}<a href="{{$.Base}}kinds/{{.}}.html">{{plural .}}</a>{{end}}</nav>
<div id="search" data-base="{{.Base}}"><input type="search" placeholder="search ids, titles, fields" aria-label="search"><ul></ul></div>
</header>
<main>
`

const foot = `</main>
<script src="{{.Base}}_cleave/search-index.js"></script>
<script src="{{.Base}}_cleave/search.js"></script>
{{if .Live}}<script src="/_cleave/live.js"></script>{{end}}
</body>
</html>
`

var funcs = template.FuncMap{"plural": plural, "kinds": func() []string {
	var out []string
	for _, k := range notebook.Kinds() {
		out = append(out, string(k))
	}
	return out
}}

var pageTmpl = sync.OnceValue(func() *template.Template {
	return template.Must(template.New("page").Funcs(funcs).Parse(head + `<h1>{{if .Kind}}<span class="kind">{{.Kind}}</span>{{end}}{{.Title}}</h1>
<p class="path">{{.Path}}</p>
{{if or .Ancestors .Children}}<nav class="lineage" aria-label="lineage">
{{if .Ancestors}}<div class="ancestors">from: {{range $i, $a := .Ancestors}}{{if $i}} · {{end}}<a href="{{$a.URL}}" data-id="{{$a.ID}}"><span class="kind">{{$a.Kind}}</span>{{$a.ID}}</a>{{end}}</div>{{end}}
{{if .Children}}<div class="children">below: <ul>{{range .Children}}<li><a href="{{.URL}}" data-id="{{.ID}}"><span class="kind">{{.Kind}}</span>{{.ID}}</a>{{if .Title}} — {{.Title}}{{end}}</li>{{end}}</ul></div>{{end}}
</nav>{{end}}
{{if .Fields}}<table class="fields">{{range .Fields}}<tr><td>{{.Name}}</td><td>{{if .Block}}<pre class="yaml">{{.Value}}</pre>{{else}}{{.Value}}{{end}}</td></tr>
{{end}}</table>{{end}}
{{with .Wafer}}<h2>Devices and their key results</h2>
<table class="wafer"><tr><th>device</th><th>cooldown</th><th>illumination</th><th>T</th><th>n (Hall)</th><th>n (SdH)</th><th>mobility</th></tr>
{{range .Rows}}<tr><td>{{if .Device.URL}}<a href="{{.Device.URL}}">{{.Device.ID}}</a>{{end}}</td><td>{{if .Cooldown.URL}}<a href="{{.Cooldown.URL}}">{{.Cooldown.ID}}</a>{{end}}</td><td>{{.Illumination}}</td><td>{{.T}}</td><td>{{.NH}}</td><td>{{.NSdH}}</td><td>{{.Mu}}</td></tr>
{{end}}</table>{{end}}
<article class="body">
{{.Body}}
</article>
` + foot))
})

type indexPage struct {
	Base, Title string
	Live        bool
	Kinds       []kindCount
	Rows        []link
	Notes       []link
	Kind        string
}

type kindCount struct {
	Kind  string
	Count int
}

var indexTmpl = sync.OnceValue(func() *template.Template {
	return template.Must(template.New("index").Funcs(funcs).Parse(head + `<h1>{{.Title}}</h1>
{{if .Kinds}}<ul class="kinds">{{range .Kinds}}<li><a href="kinds/{{.Kind}}.html">{{plural .Kind}}</a> ({{.Count}})</li>{{end}}</ul>{{end}}
{{if .Rows}}<table class="entries"><tr><th>id</th><th>title</th></tr>
{{range .Rows}}<tr><td><a href="{{.URL}}" data-id="{{.ID}}">{{.ID}}</a></td><td>{{.Title}}</td></tr>
{{end}}</table>{{end}}
{{if .Notes}}<h2>Notes</h2><ul>{{range .Notes}}<li><a href="{{.URL}}">{{.Title}}</a></li>{{end}}</ul>{{end}}
` + foot))
})

// waferTable is the table on a wafer's page: each device below it with the cooldowns that
// measured it and their key results as the notebook stores them.
type waferTable struct{ Rows []waferRow }

type waferRow struct {
	Device, Cooldown link
	Illumination, T  string
	NH, NSdH, Mu     string
}

func (st *build) waferTable(from string, w *notebook.Entry) *waferTable {
	t := &waferTable{}
	for _, d := range st.nb.Descendants(w.ID) {
		if d.Kind != notebook.KindDevice {
			continue
		}
		dl := st.linkTo(from, d)
		n := 0
		for _, c := range st.nb.Children(d) {
			if c.Kind != notebook.KindCooldown {
				continue
			}
			row := waferRow{Device: dl, Cooldown: st.linkTo(from, c)}
			if n > 0 {
				row.Device = link{}
			}
			row.Illumination, _ = c.Text("illumination")
			row.T, _ = c.Text("base_temperature")
			if f := c.File(); f != nil {
				row.NH = calcValue(f, "n_H")
				row.NSdH = calcValue(f, "n_SdH")
				row.Mu = calcValue(f, "mu")
			}
			t.Rows = append(t.Rows, row)
			n++
		}
		if n == 0 {
			t.Rows = append(t.Rows, waferRow{Device: dl})
		}
	}
	return t
}

// indexes writes the index page and one index per kind.
func (st *build) indexes() error {
	byKind := map[notebook.Kind][]link{}
	var notes []link
	for _, f := range st.nb.Files {
		url := pageURL(f.Path)
		if f.Entry == nil {
			notes = append(notes, link{URL: url, Title: f.Path})
			continue
		}
		l := link{URL: url, ID: f.Entry.ID, Kind: string(f.Entry.Kind)}
		l.Title, _ = f.Entry.Text("title")
		byKind[f.Entry.Kind] = append(byKind[f.Entry.Kind], l)
	}
	var kinds []kindCount
	for _, k := range notebook.Kinds() {
		kinds = append(kinds, kindCount{Kind: string(k), Count: len(byKind[k])})
	}
	var buf bytes.Buffer
	if err := indexTmpl().Execute(&buf, indexPage{Title: "Notebook", Live: st.b.Opt.Live, Kinds: kinds, Notes: notes}); err != nil {
		return err
	}
	st.put("index.html", buf.Bytes())
	for _, k := range notebook.Kinds() {
		rows := byKind[k]
		sort.Slice(rows, func(i, j int) bool {
			return rows[i].ID < rows[j].ID || rows[i].ID == rows[j].ID && rows[i].URL < rows[j].URL
		})
		for i := range rows {
			rows[i].URL = "../" + rows[i].URL
		}
		buf.Reset()
		title := plural(string(k))
		title = strings.ToUpper(title[:1]) + title[1:]
		if err := indexTmpl().Execute(&buf, indexPage{Base: "../", Title: title, Live: st.b.Opt.Live, Rows: rows, Kind: string(k)}); err != nil {
			return err
		}
		st.put("kinds/"+string(k)+".html", buf.Bytes())
	}
	return nil
}

// plural is the plural of a kind's name.
func plural(k string) string {
	if strings.HasSuffix(k, "s") {
		return k + "es"
	}
	return k + "s"
}
