package reports

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/checks"
)

// texEscape makes text safe in a LaTeX paragraph: the ten special
// characters are escaped, and the non-ASCII symbols borel prints are
// written as LaTeX commands so that pdflatex needs no extra packages.
func texEscape(s string) string {
	var b strings.Builder
	rs := []rune(s)
	for i := 0; i < len(rs); i++ {
		r := rs[i]
		if i+1 < len(rs) && rs[i+1] == '\u0302' { // a letter with a combining hat: q̂, α̂
			base := texEscape(string(r))
			base = strings.TrimSuffix(strings.TrimPrefix(base, "$"), "$")
			b.WriteString(`$\hat{` + base + `}$`)
			i++
			continue
		}
		switch t, ok := texRunes[r]; {
		case ok:
			b.WriteString(t)
		case strings.ContainsRune(`&%$#_{}`, r):
			b.WriteByte('\\')
			b.WriteRune(r)
		case r < 128:
			b.WriteRune(r)
		default:
			b.WriteString(fmt.Sprintf(`\textsuperscript{[U+%04X]}`, r))
		}
	}
	return b.String()
}

// texName escapes a name (a path, most often) and lets LaTeX break it
// after each '/', '.', '_' and '-', and inside any run of more than eight
// other characters: a long path in a caption or a narrow table cell is one
// word otherwise, and ran 121 pt past the text block.
func texName(s string) string {
	var b strings.Builder
	run := 0
	for _, r := range s {
		if r == ' ' {
			run = 0
		} else if run == 8 { // a costly break: taken only when the word cannot fit
			b.WriteString(`\penalty500{}`)
			run = 0
		}
		b.WriteString(texEscape(string(r)))
		run++
		if strings.ContainsRune("/._-", r) {
			b.WriteString(`\allowbreak{}`)
			run = 0
		}
	}
	return b.String()
}

// texRunes is what texEscape writes for characters that LaTeX reserves or
// that its default fonts lack.
var texRunes = map[rune]string{
	'\\': `\textbackslash{}`, '~': `\textasciitilde{}`, '^': `\textasciicircum{}`,
	'<': `\textless{}`, '>': `\textgreater{}`, '|': `\textbar{}`,
	'–': "--", '—': "---", '’': "'", '‘': "'", '“': `"`, '”': `"`,
	'×': `$\times$`, '≤': `$\le$`, '≥': `$\ge$`, '√': `$\surd$`, '·': `$\cdot$`, '²': `$^2$`,
	'ψ': `$\psi$`, '∇': `$\nabla$`, 'π': `$\pi$`, 'χ': `$\chi$`, 'α': `$\alpha$`,
	'−': `$-$`, 'σ': `$\sigma$`, 'μ': `$\mu$`, '≈': `$\approx$`, '∞': `$\infty$`, '±': `$\pm$`, '…': `\ldots{}`,
	'Δ': `$\Delta$`, '→': `$\to$`, 'Σ': `$\Sigma$`, 'τ': `$\tau$`, '∓': `$\mp$`, '₂': `$_2$`,
}

// texStatistic writes a statistic's name in math mode (checks.StatisticName).
func texStatistic(id string) string {
	if n, ok := checks.StatisticName(id); ok {
		return n.TeX
	}
	return texEscape(id)
}

// texP writes a probability (natural log) in math mode with 4 significant
// digits, as a power of ten below 1e-10, never as a bare 0.
func texP(logP float64) string {
	switch {
	case math.IsInf(logP, -1):
		return `$0$ (exact)`
	case logP >= 0:
		return `$1$`
	case logP < math.Log(1e-10):
		return fmt.Sprintf(`$10^{%.2f}$`, logP/math.Ln10)
	}
	s := strconv.FormatFloat(math.Exp(logP), 'g', 4, 64)
	if m, e, ok := strings.Cut(s, "e"); ok {
		exp, _ := strconv.Atoi(e)
		return fmt.Sprintf(`$%s \times 10^{%d}$`, m, exp)
	}
	return "$" + s + "$"
}

func texNumber(s string) string {
	if m, e, ok := strings.Cut(s, "e"); ok {
		exp, _ := strconv.Atoi(e)
		return fmt.Sprintf(`$%s \times 10^{%d}$`, m, exp)
	}
	if s == "–" {
		return "--"
	}
	return "$" + s + "$"
}

// LaTeX writes, per sequence and base, the findings as a longtable with
// booktabs rules (it breaks across pages: a --raw audit's base-2 table of
// 75 rows was a float 329 pt taller than the page, its last rows lost),
// ready to \input into a document whose preamble loads booktabs and
// longtable. The table fits the text block of a standard 11 pt article:
// the finding (check, statistic and parameters) is one paragraph column,
// the three p-values share one header, every number is in math mode, and
// the notes that say where a finding deviates follow the table. Provenance
// goes into comments above each table; the caption states what was audited
// and the verdict.
func LaTeX(w io.Writer, doc Document) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "%% borel %s audit report. Needs \\usepackage{booktabs} and \\usepackage{longtable} in the preamble.\n", doc.Version)
	for _, line := range strings.Split(wrapDisplay(Caution, 90), "\n") {
		fmt.Fprintf(bw, "%% %s\n", line)
	}
	for _, v := range doc.Inputs {
		h, reason := inputHeadline(v)
		// ragged right: a long path in the headline breaks at its slashes
		fmt.Fprintf(bw, "\n\\begin{flushleft}\n\\textbf{%s.} %s\n\\end{flushleft}\n", texName(h), texEscape(reason))
	}
	if len(doc.Results) > 1 { // the side-by-side table first, as a float
		fmt.Fprintln(bw)
		if err := summaryFloat(bw, doc); err != nil {
			return err
		}
	}
	for _, r := range doc.Results {
		fmt.Fprintln(bw)
		for _, p := range provenance(doc, r) {
			fmt.Fprintf(bw, "%% %s: %s\n", p[0], strings.ReplaceAll(p[1], "\n", " "))
		}
		texFindings(bw, r)
		texPosition(bw, r)
	}
	return bw.Flush()
}

// texPosition writes where the sequence sits: the sentences as a list and
// the frequency table (with its caption) as a tabular below them.
func texPosition(w io.Writer, r *audit.Result) {
	lines := positionLines(r)
	if len(lines) == 0 {
		return
	}
	fmt.Fprintf(w, "\\begingroup\\footnotesize\n\\paragraph{%s.}\n\\begin{itemize}\\setlength{\\itemsep}{0pt}\n", texEscape(positionTitle(r)))
	for _, l := range lines {
		fmt.Fprintf(w, "\\item %s\n", texEscape(l))
	}
	fmt.Fprintln(w, `\end{itemize}`)
	header, rows, caption := positionTable(r)
	if len(rows) == 0 {
		if caption != "" {
			fmt.Fprintf(w, "%s.\n", texEscape(caption))
		}
		fmt.Fprintln(w, `\endgroup`)
		return
	}
	fmt.Fprintf(w, "%s:\\\\[0.3em]\n\\begin{tabular}{@{}lrlr@{}}\n\\toprule\n", texEscape(caption))
	esc := func(r []string) string {
		out := make([]string, len(r))
		for i, c := range r {
			out[i] = texEscape(c)
		}
		return strings.Join(out, " & ")
	}
	fmt.Fprintf(w, "%s \\\\\n\\midrule\n", esc(header))
	for _, row := range rows {
		fmt.Fprintf(w, "%s \\\\\n", esc(row))
	}
	fmt.Fprintln(w, `\bottomrule`)
	fmt.Fprintln(w, `\end{tabular}`)
	fmt.Fprintln(w, `\endgroup`)
}

// texFindingsHead is the findings table's header (repeated on each page).
const texFindingsHead = `\toprule
finding & value & df & \multicolumn{3}{c}{$p$-value} & mark \tabularnewline
\cmidrule(lr){4-6}
 & & & upper & lower & adjusted & \tabularnewline
\midrule`

func texFindings(w io.Writer, r *audit.Result) {
	_, _, notes := findingTable(r)
	number := map[string]int{}
	for i, n := range notes {
		number[n] = i + 1
	}
	fmt.Fprintln(w, `\begingroup\footnotesize\setlength{\tabcolsep}{3pt}\setlength{\LTcapwidth}{\linewidth}`)
	fmt.Fprintln(w, `\begin{longtable}{@{}p{0.25\linewidth}rrrrrl@{}}`)
	fmt.Fprintf(w, "\\caption{borel audit of \\texttt{%s} in base %d: %d digits against the %s null, %s adjustment over %d $p$-values, $\\alpha = %s$. Verdict: \\textbf{%s}.}\\tabularnewline\n",
		texName(seqName(r)), r.Base, r.Digits, r.Null.Kind.String(), adjustmentName(string(r.Adjustment)),
		2*len(r.Findings), strconv.FormatFloat(r.Alpha, 'g', -1, 64), texEscape(string(r.Verdict)))
	fmt.Fprintln(w, texFindingsHead)
	fmt.Fprintln(w, `\endfirsthead`)
	fmt.Fprintln(w, `\multicolumn{7}{@{}l}{\emph{(continued)}}\tabularnewline`)
	fmt.Fprintln(w, texFindingsHead)
	fmt.Fprintln(w, `\endhead`)
	fmt.Fprintln(w, `\midrule\multicolumn{7}{r@{}}{\emph{(continued on the next page)}}\tabularnewline`)
	fmt.Fprintln(w, `\endfoot`)
	fmt.Fprintln(w, `\bottomrule`)
	fmt.Fprintln(w, `\endlastfoot`)
	for _, f := range r.Findings {
		label := texEscape(f.Check) + " " + texStatistic(string(f.Statistic))
		if p := findingParams(f.Finding); p != "" {
			label += " " + texEscape(p)
		}
		mark := texEscape(string(f.Mark))
		var refs []string
		for _, n := range f.Notes {
			refs = append(refs, strconv.Itoa(number[n.Text]))
		}
		if len(refs) > 0 {
			mark += "$^{" + strings.Join(refs, ",") + "}$"
		}
		fmt.Fprintf(w, "\\raggedright %s & %s & %s & %s & %s & %s & %s \\tabularnewline\n",
			label, texNumber(formatStat(f.Value)), texNumber(formatDF(f.DF)), texP(f.LogPUpper), texP(f.LogPLower),
			texP(math.Min(f.LogAdjUpper, f.LogAdjLower)), mark)
	}
	fmt.Fprintln(w, `\end{longtable}`)
	if len(notes) > 0 {
		fmt.Fprintln(w, `\begin{list}{}{\setlength{\leftmargin}{1.5em}\setlength{\itemsep}{0pt}\setlength{\labelwidth}{1.2em}}`)
		for i, n := range notes {
			fmt.Fprintf(w, "\\item[$^{%d}$] %s\n", i+1, texEscape(n))
		}
		fmt.Fprintln(w, `\end{list}`)
	}
	fmt.Fprintln(w, `\endgroup`)
}
