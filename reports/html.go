package reports

import (
	"bytes"
	"fmt"
	"html/template"
	"io"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

type htmlAudit struct {
	Title, Verdict, VerdictClass, Reason string
	Anchor                               string // the id the contents link to
	Provenance                           [][2]string
	Header                               []string
	Rows                                 [][]string
	Notes                                []string
	Skips                                []string
	EntropyHeader                        []string
	EntropyRows                          [][]string
	EntropyNote                          string
	PositionTitle, PositionCaption       string
	PositionLines                        []string
	PositionHeader                       []string
	PositionRows                         [][]string
	AuditNotes                           []string
	Figures                              []htmlFigure
}

type htmlInput struct{ Headline, Reason, Class string }

type htmlFigure struct {
	Title string
	SVG   template.HTML
}

// pageStyle sets a whole page's measure (a fragment leaves it to its host).
const pageStyle = `<style>body { margin: 2em auto; max-width: 70em; } @media print { body { max-width: none; } }</style>`

const htmlStyle = `<style>
.borel-report { font-family: system-ui, sans-serif; color: #111; line-height: 1.4; }
.borel-report h2 { font-size: 1.25em; margin-top: 2em; border-bottom: 1px solid #999; }
.borel-report table { border-collapse: collapse; margin: 0.8em 0; font-size: 0.9em; }
.borel-report th, .borel-report td { padding: 0.2em 0.6em; border-bottom: 1px solid #ddd; text-align: left; }
.borel-report td.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.borel-report th { border-bottom: 2px solid #333; }
.borel-report .verdict { font-weight: bold; padding: 0.1em 0.5em; border: 2px solid #333; }
.borel-report .not-consistent { background: #f2d0c8; } .borel-report .too-uniform { background: #d6dff2; }
.borel-report .consistent { background: #dcefd8; } .borel-report .nothing-tested { background: #e8e8e8; }
.borel-report .mark { font-weight: bold; }
.borel-report figure { margin: 1.5em 0; } .borel-report figcaption { font-size: 0.9em; color: #333; }
.borel-report .caution { margin-top: 2em; padding: 0.8em; border-left: 4px solid #333; background: #f3f3f3; }
</style>`

var htmlTemplates = template.Must(template.New("html").Funcs(template.FuncMap{"inc": func(i int) int { return i + 1 }}).Parse(`
{{define "body"}}<section class="borel-report">
{{range .Inputs}}<h2><span class="verdict {{.Class}}">{{.Headline}}</span></h2>
<p>{{.Reason}}</p>
{{end}}{{if .SummaryRows}}<h2>Side by side</h2>
<table>
<tr>{{range .SummaryHeader}}<th>{{.}}</th>{{end}}</tr>
{{range .SummaryRows}}<tr>{{range $i, $c := .}}<td{{if or (eq $i 1) (eq $i 2) (eq $i 4) (eq $i 6) (eq $i 7) (eq $i 8)}} class="n"{{end}}>{{$c}}</td>{{end}}</tr>
{{end}}</table>
{{range .DocFigures}}<figure>{{.SVG}}<figcaption>{{.Title}}</figcaption></figure>
{{end}}<p>Contents:</p><ol>{{range .Audits}}<li><a href="#{{.Anchor}}">{{.Title}}</a>: {{.Verdict}}</li>{{end}}</ol>
{{end}}{{range .Audits}}
<h2 id="{{.Anchor}}">{{.Title}}: <span class="verdict {{.VerdictClass}}">{{.Verdict}}</span></h2>
<p>{{.Reason}}</p>
<table>{{range .Provenance}}<tr><th scope="row">{{index . 0}}</th><td>{{index . 1}}</td></tr>{{end}}</table>
<table>
<tr>{{range .Header}}<th>{{.}}</th>{{end}}</tr>
{{range .Rows}}<tr>{{range $i, $c := .}}<td{{if and (ge $i 3) (le $i 7)}} class="n"{{end}}{{if eq $i 8}} class="mark"{{end}}>{{$c}}</td>{{end}}</tr>
{{end}}</table>
<p><small><em>p upper</em>: chance of a statistic at least this large (deviation); <em>p lower</em>: at most this small (fit too good); <em>adjusted</em>: the smaller of the two after adjustment over the whole family.</small></p>
{{range $i, $n := .Notes}}<p><small>[{{inc $i}}] {{$n}}</small></p>{{end}}
{{if .Skips}}<p>Not run:</p><ul>{{range .Skips}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{if .EntropyRows}}<p>Entropy profile (nats):</p>
<table><tr>{{range .EntropyHeader}}<th>{{.}}</th>{{end}}</tr>
{{range .EntropyRows}}<tr>{{range .}}<td class="n">{{.}}</td>{{end}}</tr>{{end}}</table>
<p><small>{{.EntropyNote}}</small></p>{{end}}
{{if .PositionLines}}<p>{{.PositionTitle}}:</p><ul>{{range .PositionLines}}<li>{{.}}</li>{{end}}</ul>
{{if .PositionRows}}<table><caption style="caption-side: top; text-align: left">{{.PositionCaption}}</caption>
<tr>{{range .PositionHeader}}<th>{{.}}</th>{{end}}</tr>
{{range .PositionRows}}<tr>{{range $i, $c := .}}<td{{if or (eq $i 1) (eq $i 3)}} class="n"{{end}}>{{$c}}</td>{{end}}</tr>{{end}}</table>
{{else if .PositionCaption}}<p>{{.PositionCaption}}.</p>{{end}}{{end}}
{{if .AuditNotes}}<p>Notes:</p><ul>{{range .AuditNotes}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{range .Figures}}<figure>{{.SVG}}<figcaption>{{.Title}}</figcaption></figure>
{{end}}
{{end}}
<p class="caution">{{.Caution}}</p>
<p><small>Generated by borel {{.Version}} on {{.Date}}.</small></p>
</section>{{end}}
{{define "page"}}<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>borel audit report</title>
{{.Style}}
` + pageStyle + `
</head>
<body>
<h1 style="font-family: system-ui, sans-serif">borel audit report</h1>
{{template "body" .}}
</body>
</html>
{{end}}
{{define "fragment"}}{{.Style}}
{{template "body" .}}
{{end}}`))

// inlineSVG strips the XML prolog so the SVG can sit inside HTML.
func inlineSVG(svg []byte) template.HTML {
	s := string(svg)
	if i := strings.Index(s, "<svg"); i > 0 {
		s = s[i:]
	}
	return template.HTML(s) // produced by gonum/plot from our own numbers, not user text
}

type htmlDoc struct {
	Inputs                 []htmlInput
	SummaryHeader          []string // the side-by-side table, for two results or more
	SummaryRows            [][]string
	Audits                 []htmlAudit
	DocFigures             []htmlFigure // across bases
	Caution, Version, Date string
	Style                  template.HTML
}

// HTML writes one self-contained page: no scripts, no network, the plots as
// inline SVG.
func HTML(w io.Writer, doc Document) error { return htmlRender(w, doc, "page") }

// HTMLFragment writes the report as a <section> (with its own scoped
// style) to place inside an existing page.
func HTMLFragment(w io.Writer, doc Document) error { return htmlRender(w, doc, "fragment") }

func htmlRender(w io.Writer, doc Document, name string) error {
	pg := htmlDoc{Caution: Caution, Version: doc.Version, Date: doc.Created.UTC().Format("2006-01-02 15:04 UTC"),
		Style: template.HTML(htmlStyle)}
	for _, v := range doc.Inputs {
		h, reason := inputHeadline(v)
		pg.Inputs = append(pg.Inputs, htmlInput{Headline: h, Reason: reason, Class: strings.ReplaceAll(string(v.Verdict), " ", "-")})
	}
	if len(doc.Results) > 1 {
		pg.SummaryHeader, pg.SummaryRows = summaryRows(doc)
	}
	docFigs, err := DocumentFigures(doc)
	if err != nil {
		return err
	}
	for _, f := range docFigs {
		svg, err := f.SVG()
		if err != nil {
			return err
		}
		pg.DocFigures = append(pg.DocFigures, htmlFigure{Title: f.Title, SVG: inlineSVG(svg)})
	}
	for i, r := range doc.Results {
		a, err := htmlAuditOf(doc, r)
		if err != nil {
			return err
		}
		a.Anchor = fmt.Sprintf("borel-audit-%d", i+1)
		pg.Audits = append(pg.Audits, a)
	}
	var buf bytes.Buffer
	if err := htmlTemplates.ExecuteTemplate(&buf, name, pg); err != nil {
		return err
	}
	_, err = w.Write(buf.Bytes())
	return err
}

func htmlAuditOf(doc Document, r *audit.Result) (htmlAudit, error) {
	a := htmlAudit{Title: "borel audit of " + seqName(r) + " in base " + itoa(r.Base), Verdict: string(r.Verdict),
		VerdictClass: strings.ReplaceAll(string(r.Verdict), " ", "-"), Reason: verdictReason(r), Provenance: provenance(doc, r),
		AuditNotes: checks.NoteTexts(r.Notes)}
	a.Header, a.Rows, a.Notes = findingTable(r)
	for _, s := range r.Skips {
		a.Skips = append(a.Skips, s.Check+" "+formatParams(s.Params)+": "+s.Reason)
	}
	a.EntropyHeader, a.EntropyRows = entropyTable(r)
	if r.Entropy != nil {
		a.EntropyNote = "dimension = entropy rate / ln " + itoa(r.Base) + "; the null's Besicovitch–Eggleston dimension is " + formatDim(r.Entropy.NullDimension) +
			"; the last column is the likelihood-ratio test of a Markov chain of order k-2 against k-1 (Anderson & Goodman 1957)."
		a.PositionTitle, a.PositionLines = positionTitle(r), positionLines(r)
		a.PositionHeader, a.PositionRows, a.PositionCaption = positionTable(r)
	}
	figs, err := Figures(r)
	if err != nil {
		return a, err
	}
	for _, f := range figs {
		svg, err := f.SVG()
		if err != nil {
			return a, err
		}
		a.Figures = append(a.Figures, htmlFigure{Title: f.Title, SVG: inlineSVG(svg)})
	}
	return a, nil
}

func itoa(i int) string { return strconv.Itoa(i) }
