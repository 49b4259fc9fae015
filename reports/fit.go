package reports

import (
	"fmt"
	"io"
	"strings"

	"github.com/olekukonko/tablewriter/pkg/twwidth"
)

// proseWidth is the column at which text reports wrap their sentences when
// no narrower width is asked for (a log or a pipe keeps its tables whole
// but reads its sentences at a comfortable measure).
const proseWidth = 100

// textTable is one table of a text report, with what the fitting may do
// to it: wrap the cells of the columns that have a wrap width at spaces,
// and, when even that is too wide, print the columns after the first key
// ones below, in a second table that repeats the key columns.
type textTable struct {
	header []string
	rows   [][]string
	right  []bool // right-aligned (numeric) columns
	// wrap is, for each column whose cells may break at spaces, the
	// narrowest it becomes (unless a word in it is longer): below that,
	// names break into a word a line and the table reads worse than one
	// split in two. 0: the cells never break.
	wrap []int
	key  int // leading columns that identify a row (repeated in a continuation)
}

// displayWidth is the number of terminal columns s takes (its widest line).
func displayWidth(s string) int {
	m := 0
	for _, line := range strings.Split(s, "\n") {
		m = max(m, twwidth.Width(line))
	}
	return m
}

// writeFitted renders the first of the candidate layouts that fits in
// width columns: each candidate as a boxed table, then with its wrappable
// cells broken at spaces, then in the compact style (columns two spaces
// apart, no rules but the header's); when none fits, the last candidate is
// split into tables that do. width ≤ 0 means no limit: the first candidate,
// boxed and whole (a pipe or a file gets the full table).
func writeFitted(w io.Writer, width int, candidates ...textTable) error {
	if width <= 0 {
		t := candidates[0]
		return writeTable(w, t.header, t.rows, t.right)
	}
	for _, t := range candidates {
		if boxedWidth(naturalWidths(t)) <= width {
			return writeTable(w, t.header, t.rows, t.right)
		}
	}
	for _, t := range candidates {
		if ws, ok := shrink(t, width, boxedWidth); ok {
			h, rows := wrapCells(t, ws)
			return writeTable(w, h, rows, t.right)
		}
	}
	for _, t := range candidates {
		if ws, ok := shrink(t, width, compactWidth); ok {
			h, rows := wrapCells(t, ws)
			return writeCompact(w, h, rows, t.right, ws)
		}
	}
	return writeSplit(w, width, candidates[len(candidates)-1])
}

// writeSplit prints as many columns after the key ones as fit, then the
// rest in further tables below that repeat the key columns. A continuation
// keeps only the rows that have something in its columns (a column of
// marks, empty for most findings, lists the marked ones only).
func writeSplit(w io.Writer, width int, t textTable) error {
	cols := len(t.header)
	start := t.key
	first := true
	for start < cols {
		end := start + 1
		for end < cols {
			if _, ok := shrink(subTable(t, start, end+1), width, compactWidth); !ok {
				break
			}
			end++
		}
		part := subTable(t, start, end)
		if !first {
			part = dropEmpty(part)
			if len(part.rows) == 0 {
				start = end
				continue
			}
			fmt.Fprintf(w, "  (continued: %s)\n", strings.Join(t.header[start:end], ", "))
		}
		ws, ok := shrink(part, width, compactWidth)
		if !ok { // one column and the key are still too wide: print them whole
			ws = naturalWidths(part)
		}
		h, rows := wrapCells(part, ws)
		if err := writeCompact(w, h, rows, part.right, ws); err != nil {
			return err
		}
		first = false
		start = end
	}
	return nil
}

// subTable keeps the key columns and the columns [from, to).
func subTable(t textTable, from, to int) textTable {
	idx := make([]int, 0, t.key+to-from)
	for i := 0; i < t.key; i++ {
		idx = append(idx, i)
	}
	for i := from; i < to; i++ {
		idx = append(idx, i)
	}
	pick := func(s []string) []string {
		out := make([]string, len(idx))
		for j, i := range idx {
			if i < len(s) {
				out[j] = s[i]
			}
		}
		return out
	}
	sub := textTable{header: pick(t.header), right: make([]bool, len(idx)), wrap: make([]int, len(idx)), key: t.key}
	for j, i := range idx {
		sub.right[j] = i < len(t.right) && t.right[i]
		if i < len(t.wrap) {
			sub.wrap[j] = t.wrap[i]
		}
	}
	for _, r := range t.rows {
		sub.rows = append(sub.rows, pick(r))
	}
	return sub
}

// dropEmpty removes the rows whose cells after the key are all empty.
func dropEmpty(t textTable) textTable {
	out := t
	out.rows = nil
	for _, r := range t.rows {
		for _, c := range r[t.key:] {
			if strings.TrimSpace(c) != "" {
				out.rows = append(out.rows, r)
				break
			}
		}
	}
	return out
}

// naturalWidths is each column's width with nothing wrapped.
func naturalWidths(t textTable) []int {
	ws := make([]int, len(t.header))
	for i, h := range t.header {
		ws[i] = displayWidth(h)
	}
	for _, r := range t.rows {
		for i := range ws {
			if i < len(r) {
				ws[i] = max(ws[i], displayWidth(r[i]))
			}
		}
	}
	return ws
}

// minWidths is each column's narrowest width: a header may break at its
// spaces in every column; the cells of wrappable columns break at theirs,
// down to their wrap width or their longest word (others keep their widest
// cell).
func minWidths(t textTable) []int {
	ws := make([]int, len(t.header))
	natural := naturalWidths(t)
	for i, h := range t.header {
		ws[i] = longestWord(h)
		if wraps(t, i) {
			ws[i] = max(ws[i], min(natural[i], t.wrap[i]))
		}
	}
	for _, r := range t.rows {
		for i := range ws {
			if i >= len(r) {
				continue
			}
			if wraps(t, i) {
				ws[i] = max(ws[i], longestWord(r[i]))
			} else {
				ws[i] = max(ws[i], displayWidth(r[i]))
			}
		}
	}
	return ws
}

func wraps(t textTable, i int) bool { return i < len(t.wrap) && t.wrap[i] > 0 }

func longestWord(s string) int {
	m := 0
	for _, f := range strings.Fields(s) {
		m = max(m, twwidth.Width(f))
	}
	return m
}

// boxedWidth and compactWidth are a table's total width for its column
// widths: a boxed table pads each cell by one space and draws a rule
// between and around the columns; the compact one indents by one and
// leaves two spaces between columns.
func boxedWidth(ws []int) int {
	total := 1
	for _, w := range ws {
		total += w + 3
	}
	return total
}

func compactWidth(ws []int) int {
	total := 1
	for i, w := range ws {
		total += w
		if i > 0 {
			total += 2
		}
	}
	return total
}

// shrink narrows the columns with the most room to spare (natural width
// over narrowest), one column at a time, until the table fits width;
// ok is false when even the narrowest widths do not fit.
func shrink(t textTable, width int, total func([]int) int) ([]int, bool) {
	ws := naturalWidths(t)
	lo := minWidths(t)
	for total(ws) > width {
		best := -1
		for i := range ws {
			if ws[i] > lo[i] && (best < 0 || ws[i]-lo[i] > ws[best]-lo[best]) {
				best = i
			}
		}
		if best < 0 {
			return ws, false
		}
		ws[best]--
	}
	return ws, true
}

// wrapCells breaks the header and the wrappable cells to the widths.
func wrapCells(t textTable, ws []int) ([]string, [][]string) {
	h := make([]string, len(t.header))
	for i, s := range t.header {
		h[i] = wrapDisplay(s, ws[i])
	}
	rows := make([][]string, len(t.rows))
	for j, r := range t.rows {
		rows[j] = make([]string, len(r))
		for i, s := range r {
			if i < len(ws) && wraps(t, i) {
				s = wrapDisplay(s, ws[i])
			}
			rows[j][i] = s
		}
	}
	return h, rows
}

// writeCompact renders a table without box rules: a one-space indent,
// columns two spaces apart, and a rule of '─' under the header.
func writeCompact(w io.Writer, header []string, rows [][]string, right []bool, ws []int) error {
	var b strings.Builder
	line := func(cells []string) {
		lines := 1
		split := make([][]string, len(ws))
		for i := range ws {
			c := ""
			if i < len(cells) {
				c = cells[i]
			}
			split[i] = strings.Split(c, "\n")
			lines = max(lines, len(split[i]))
		}
		for l := 0; l < lines; l++ {
			var out strings.Builder
			out.WriteByte(' ')
			for i, cw := range ws {
				if i > 0 {
					out.WriteString("  ")
				}
				s := ""
				if l < len(split[i]) {
					s = split[i][l]
				}
				pad := strings.Repeat(" ", max(0, cw-twwidth.Width(s)))
				if i < len(right) && right[i] {
					out.WriteString(pad + s)
				} else {
					out.WriteString(s + pad)
				}
			}
			b.WriteString(strings.TrimRight(out.String(), " "))
			b.WriteByte('\n')
		}
	}
	line(header)
	var rule strings.Builder
	rule.WriteByte(' ')
	for i, cw := range ws {
		if i > 0 {
			rule.WriteString("  ")
		}
		rule.WriteString(strings.Repeat("─", cw))
	}
	b.WriteString(rule.String())
	b.WriteByte('\n')
	for _, r := range rows {
		line(r)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// wrapDisplay breaks text into lines of at most width terminal columns at
// spaces (a word longer than the width keeps its own line).
func wrapDisplay(s string, width int) string {
	var b strings.Builder
	line := 0
	for i, word := range strings.Fields(s) {
		ww := twwidth.Width(word)
		if i > 0 && line+1+ww > width {
			b.WriteByte('\n')
			line = 0
		} else if i > 0 {
			b.WriteByte(' ')
			line++
		}
		b.WriteString(word)
		line += ww
	}
	return b.String()
}

// hanging writes label and text with the text wrapped to width columns and
// its continuation lines indented under its first word.
func hanging(w io.Writer, width int, label, text string) {
	hangingPad(w, width, label, strings.Repeat(" ", twwidth.Width(label)), text)
}

// hangingPad is hanging with the continuation lines indented by pad.
func hangingPad(w io.Writer, width int, label, pad, text string) {
	room := max(20, width-twwidth.Width(label))
	lines := strings.Split(wrapDisplay(text, room), "\n")
	fmt.Fprintf(w, "%s%s\n", label, lines[0])
	if len(lines) > 1 {
		rest := wrapDisplay(strings.Join(lines[1:], " "), max(20, width-twwidth.Width(pad)))
		for _, l := range strings.Split(rest, "\n") {
			fmt.Fprintf(w, "%s%s\n", pad, l)
		}
	}
}

// WrapText breaks each paragraph of s (paragraphs are separated by blank
// lines) into lines of at most width columns (proseWidth when width ≤ 0 or
// wider than that).
func WrapText(s string, width int) string {
	width = textMeasure(width)
	paras := strings.Split(s, "\n\n")
	for i, p := range paras {
		paras[i] = wrapDisplay(p, width)
	}
	return strings.Join(paras, "\n\n")
}

// textMeasure is the column sentences wrap at for a report width.
func textMeasure(width int) int {
	if width <= 0 || width > proseWidth {
		return proseWidth
	}
	return width
}
