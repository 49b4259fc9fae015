package reports

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"borel/stats/checks"
)

// texEscape makes text safe in a LaTeX paragraph: the ten special
// characters are escaped, and the non-ASCII symbols borel prints are
// written as LaTeX commands so that pdflatex needs no extra packages.
func texEscape(s string) string {
	var b strings.Builder
	for _, r := range s {
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

// texRunes is what texEscape writes for characters that LaTeX reserves or
// that its default fonts lack.
var texRunes = map[rune]string{
	'\\': `\textbackslash{}`, '~': `\textasciitilde{}`, '^': `\textasciicircum{}`,
	'<': `\textless{}`, '>': `\textgreater{}`, '|': `\textbar{}`,
	'–': "--", '—': "---", '’': "'", '‘': "'", '“': `"`, '”': `"`,
	'×': `$\times$`, '≤': `$\le$`, '≥': `$\ge$`, '√': `$\surd$`, '·': `$\cdot$`, '²': `$^2$`,
	'ψ': `$\psi$`, '∇': `$\nabla$`, 'π': `$\pi$`, 'χ': `$\chi$`, 'α': `$\alpha$`,
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

// LaTeX writes one table environment per sequence and base: a tabular with
// booktabs rules, ready to \input into a document whose preamble loads
// booktabs. Provenance goes into comments above each table and the caption
// states what was audited and the verdict.
func LaTeX(w io.Writer, doc Document) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "%% borel %s audit report. Needs \\usepackage{booktabs} in the preamble.\n", doc.Version)
	for _, line := range strings.Split(wrapDisplay(Caution, 90), "\n") {
		fmt.Fprintf(bw, "%% %s\n", line)
	}
	for _, v := range doc.Inputs {
		h, reason := inputHeadline(v)
		fmt.Fprintf(bw, "\n\\paragraph{%s.} %s\n", texEscape(h), texEscape(reason))
	}
	if len(doc.Results) > 1 { // the side-by-side table first, as a float like the others
		fmt.Fprintln(bw)
		fmt.Fprintln(bw, `\begin{table}[htbp]`)
		fmt.Fprintln(bw, `\centering\scriptsize`)
		if err := summaryTabular(bw, doc); err != nil {
			return err
		}
		fmt.Fprintln(bw, `\caption{borel: the audits side by side (verdict, smallest adjusted $p$-value and the finding it comes from, dimension estimate and its interval; the entropy deficit is 1 minus the dimension).}`)
		fmt.Fprintln(bw, `\end{table}`)
	}
	for _, r := range doc.Results {
		fmt.Fprintln(bw)
		for _, p := range provenance(doc, r) {
			fmt.Fprintf(bw, "%% %s: %s\n", p[0], strings.ReplaceAll(p[1], "\n", " "))
		}
		fmt.Fprintln(bw, `\begin{table}[htbp]`)
		fmt.Fprintln(bw, `\centering\small`)
		fmt.Fprintln(bw, `\begin{tabular}{lllrrrrrl}`)
		fmt.Fprintln(bw, `\toprule`)
		fmt.Fprintln(bw, `check & statistic & parameter & value & df & $p$ upper & $p$ lower & adjusted & mark \\`)
		fmt.Fprintln(bw, `\midrule`)
		for _, f := range r.Findings {
			param := texEscape(findingParams(f.Finding))
			fmt.Fprintf(bw, "%s & %s & %s & %s & %s & %s & %s & %s & %s \\\\\n",
				texEscape(f.Check), texStatistic(f.Statistic), param, texNumber(formatStat(f.Value)),
				texNumber(formatDF(f.DF)), texP(f.LogPUpper), texP(f.LogPLower),
				texP(math.Min(f.LogAdjUpper, f.LogAdjLower)), texEscape(f.Mark))
		}
		fmt.Fprintln(bw, `\bottomrule`)
		fmt.Fprintln(bw, `\end{tabular}`)
		fmt.Fprintf(bw, "\\caption{borel audit of \\texttt{%s} in base %d: %d digits against the %s null, %s adjustment over %d $p$-values, $\\alpha = %s$. Verdict: \\textbf{%s}.}\n",
			texEscape(r.Source.Name), r.Base, r.Digits, r.Null.Kind.String(), adjustmentName(r.Adjustment),
			2*len(r.Findings), strconv.FormatFloat(r.Alpha, 'g', -1, 64), texEscape(r.Verdict))
		fmt.Fprintln(bw, `\end{table}`)
	}
	return bw.Flush()
}
