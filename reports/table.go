package reports

import (
	"io"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/renderer"
	"github.com/olekukonko/tablewriter/tw"
)

// writeTable renders a plain-text table. It is the only place that touches
// tablewriter (v1): header text is printed as given (the library would
// upper-case it and strip punctuation by default), numbers are right-aligned,
// and cells never wrap.
func writeTable(w io.Writer, header []string, rows [][]string, rightAlign []bool) error {
	align := make([]tw.Align, len(header))
	for i := range align {
		align[i] = tw.AlignLeft
		if i < len(rightAlign) && rightAlign[i] {
			align[i] = tw.AlignRight
		}
	}
	t := tablewriter.NewTable(w,
		tablewriter.WithRenderer(renderer.NewBlueprint(tw.Rendition{
			Symbols: tw.NewSymbols(tw.StyleLight),
			Settings: tw.Settings{
				Separators: tw.Separators{BetweenColumns: tw.On, BetweenRows: tw.Off},
				Lines:      tw.Lines{ShowHeaderLine: tw.On},
			},
		})),
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeaderAlignment(tw.AlignLeft),
		tablewriter.WithRowAlignmentConfig(tw.CellAlignment{PerColumn: align}),
		tablewriter.WithRowAutoWrap(tw.WrapNone),
		tablewriter.WithHeaderAutoWrap(tw.WrapNone),
		tablewriter.WithTrimSpace(tw.Off),
	)
	t.Header(toAny(header)...)
	for _, r := range rows {
		if err := t.Append(toAny(r)...); err != nil {
			return err
		}
	}
	return t.Render()
}

func toAny(s []string) []any {
	out := make([]any, len(s))
	for i, v := range s {
		out[i] = v
	}
	return out
}
