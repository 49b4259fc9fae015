package reports

import "io"

// A Format is one way borel writes a report: the full report of every
// result, the side-by-side comparison of several (nil: the full report
// serves), and the fragment that --append-style embedding puts into a
// document of that kind (nil: the format cannot be embedded).
type Format struct {
	Name       string
	Report     func(w io.Writer, doc Document) error
	Comparison func(w io.Writer, doc Document) error
	Fragment   func(w io.Writer, doc Document) error
}

// formats is the one registry of renderers, in the order help lists them.
var formats = []Format{
	{Name: "text", Report: Text, Comparison: comparisonText},
	{Name: "md", Report: Markdown, Comparison: comparisonMarkdown, Fragment: Markdown},
	{Name: "csv", Report: CSV, Comparison: comparisonCSV},
	{Name: "json", Report: JSON},
	{Name: "tex", Report: LaTeX, Comparison: comparisonLaTeX, Fragment: LaTeX},
	{Name: "html", Report: HTML, Fragment: HTMLFragment},
}

// FormatNames returns the names of the formats, in the registry's order.
func FormatNames() []string {
	names := make([]string, len(formats))
	for i, f := range formats {
		names[i] = f.Name
	}
	return names
}

// Renderer returns the format of the given name (a section kind, KindMarkdown
// and so on, is a format name too).
func Renderer(name string) (Format, bool) {
	for _, f := range formats {
		if f.Name == name {
			return f, true
		}
	}
	return Format{}, false
}
