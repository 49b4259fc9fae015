package reports

import "testing"

// texEscape against the escapes LaTeX's own documentation gives for its
// ten reserved characters (common practice: \&, \%, \$, \#, \_, \{, \},
// \textbackslash{}, \textasciitilde{}, \textasciicircum{}), the text-mode
// commands for < > |, TeX's dashes and quotes, and math mode for the
// symbols our reports use; anything else beyond ASCII is shown, not lost.
func TestTexEscape(t *testing.T) {
	for in, want := range map[string]string{
		`a&b%c$d#e_f{g}h`:   `a\&b\%c\$d\#e\_f\{g\}h`,
		`\ ~ ^`:             `\textbackslash{} \textasciitilde{} \textasciicircum{}`,
		`< > |`:             `\textless{} \textgreater{} \textbar{}`,
		"1–2 — ‘x’ “y”":     `1--2 --- 'x' "y"`,
		"k ≤ 5 ≥ 2 × 3 · √": `k $\le$ 5 $\ge$ 2 $\times$ 3 $\cdot$ $\surd$`,
		"∇²ψ² χ π α":        `$\nabla$$^2$$\psi$$^2$ $\chi$ $\pi$ $\alpha$`,
		"ж":                 `\textsuperscript{[U+0436]}`,
	} {
		if got := texEscape(in); got != want {
			t.Errorf("texEscape(%q) = %q, want %q", in, got, want)
		}
	}
}
