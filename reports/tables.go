package reports

import (
	"encoding/csv"
	"fmt"
	"html/template"
	"io"
	"strings"
)

// Sheet is what the small commands (borel dimension) print: a title, a few
// lines of results, and captioned tables of text cells, in every report
// format but JSON (whose documents carry numbers, not cells: each command
// writes its own).
type Sheet struct {
	Title  string
	Lines  []string // results in sentences, one a line
	Tables []SheetTable
	Notes  []string // after the tables
	// Figures are SVG drawings for the HTML page (the other formats leave
	// them to --plots files).
	Figures []Figure
}

// SheetTable is one captioned table.
type SheetTable struct {
	Caption string
	Header  []string
	Rows    [][]string
	Right   []bool // right-aligned (numeric) columns
}

// WriteSheet renders the sheet in the named format: text, md, csv, tex or
// html.
func WriteSheet(w io.Writer, format string, s Sheet) error {
	switch format {
	case "text":
		return sheetText(w, s)
	case "md":
		return sheetMarkdown(w, s)
	case "csv":
		return sheetCSV(w, s)
	case "tex":
		return sheetLaTeX(w, s)
	case "html":
		return sheetHTML(w, s)
	}
	return fmt.Errorf("reports: no sheet renderer for format %q", format)
}

func sheetText(w io.Writer, s Sheet) error {
	fmt.Fprintln(w, s.Title)
	for _, l := range s.Lines {
		fmt.Fprintln(w, WrapText("  "+l, 100))
	}
	for _, t := range s.Tables {
		fmt.Fprintf(w, "\n%s\n", WrapText(t.Caption, 100))
		if err := writeTable(w, t.Header, t.Rows, t.Right); err != nil {
			return err
		}
	}
	for _, n := range s.Notes {
		fmt.Fprintln(w, WrapText(n, 100))
	}
	return nil
}

func sheetMarkdown(w io.Writer, s Sheet) error {
	fmt.Fprintf(w, "## %s\n\n", mdCell(s.Title))
	for _, l := range s.Lines {
		fmt.Fprintf(w, "- %s\n", mdCell(l))
	}
	for _, t := range s.Tables {
		fmt.Fprintf(w, "\n%s\n\n", mdCell(t.Caption))
		mdTable(w, t.Header, t.Rows, t.Right)
	}
	for _, n := range s.Notes {
		fmt.Fprintf(w, "\n%s\n", mdCell(n))
	}
	return nil
}

// sheetCSV writes each table as a CSV block after comment lines with the
// title, the results and its caption; blocks are separated by an empty line.
func sheetCSV(w io.Writer, s Sheet) error {
	fmt.Fprintf(w, "# %s\n", s.Title)
	for _, l := range s.Lines {
		fmt.Fprintf(w, "# %s\n", l)
	}
	for i, t := range s.Tables {
		if i > 0 {
			fmt.Fprintln(w)
		}
		fmt.Fprintf(w, "# %s\n", t.Caption)
		cw := csv.NewWriter(w)
		cw.Write(t.Header)
		for _, r := range t.Rows {
			cw.Write(r)
		}
		cw.Flush()
		if err := cw.Error(); err != nil {
			return err
		}
	}
	for _, n := range s.Notes {
		fmt.Fprintf(w, "# %s\n", n)
	}
	return nil
}

// sheetLaTeX writes the results as an itemized list and each table as a
// booktabs tabular in a table float with its caption.
func sheetLaTeX(w io.Writer, s Sheet) error {
	fmt.Fprintf(w, "%% %s. Needs \\usepackage{booktabs}.\n", s.Title)
	fmt.Fprintf(w, "\\paragraph{%s}\n", texEscape(s.Title))
	if len(s.Lines) > 0 {
		fmt.Fprintln(w, `\begin{itemize}`)
		for _, l := range s.Lines {
			fmt.Fprintf(w, "\\item %s\n", texEscape(l))
		}
		fmt.Fprintln(w, `\end{itemize}`)
	}
	for _, t := range s.Tables {
		fmt.Fprintln(w, `\begin{table}[htbp]`)
		fmt.Fprintln(w, `\centering\small`)
		cols := ""
		for i := range t.Header {
			if i < len(t.Right) && t.Right[i] {
				cols += "r"
			} else {
				cols += "l"
			}
		}
		fmt.Fprintf(w, "\\begin{tabular}{@{}%s@{}}\n\\toprule\n", cols)
		cells := func(r []string) string {
			out := make([]string, len(r))
			for i, c := range r {
				out[i] = texEscape(c)
			}
			return strings.Join(out, " & ")
		}
		fmt.Fprintf(w, "%s \\\\\n\\midrule\n", cells(t.Header))
		for _, r := range t.Rows {
			fmt.Fprintf(w, "%s \\\\\n", cells(r))
		}
		fmt.Fprintln(w, `\bottomrule`)
		fmt.Fprintln(w, `\end{tabular}`)
		fmt.Fprintf(w, "\\caption{%s}\n", texEscape(t.Caption))
		fmt.Fprintln(w, `\end{table}`)
	}
	for _, n := range s.Notes {
		fmt.Fprintf(w, "\n%s\n", texEscape(n))
	}
	return nil
}

var sheetTemplate = template.Must(template.New("sheet").Parse(`<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>{{.Title}}</title>
` + pageStyle + htmlStyle + `
</head><body><section class="borel-report">
<h2>{{.Title}}</h2>
{{if .Lines}}<ul>{{range .Lines}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{range .Figures}}<figure>{{.SVG}}<figcaption>{{.Title}}</figcaption></figure>
{{end}}{{range .Tables}}<table>
<caption style="caption-side: top; text-align: left; padding-bottom: 0.4em">{{.Caption}}</caption>
<tr>{{range .Header}}<th>{{.}}</th>{{end}}</tr>
{{$right := .Right}}{{range .Rows}}<tr>{{range $i, $c := .}}<td{{if and (lt $i (len $right)) (index $right $i)}} class="n"{{end}}>{{$c}}</td>{{end}}</tr>
{{end}}</table>
{{end}}{{range .Notes}}<p>{{.}}</p>{{end}}
</section></body></html>
`))

func sheetHTML(w io.Writer, s Sheet) error {
	type fig struct {
		Title string
		SVG   template.HTML
	}
	var figs []fig
	for _, f := range s.Figures {
		svg, err := f.SVG()
		if err != nil {
			return err
		}
		figs = append(figs, fig{f.Title, inlineSVG(svg)})
	}
	return sheetTemplate.Execute(w, struct {
		Sheet
		Figures []fig
	}{s, figs})
}
