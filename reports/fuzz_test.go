package reports

import (
	"bytes"
	"testing"
)

// FuzzAppendSection: any document either is refused or gets the section;
// a second run with the same content changes nothing (only the section is
// rewritten), and the bytes before the first marker are kept.
func FuzzAppendSection(f *testing.F) {
	f.Add([]byte("# Paper\n\ntext\n"), "pi", []byte("| a |\n"))
	f.Add([]byte("<!-- borel:begin pi -->\nold\n<!-- borel:end pi -->\ntail\n"), "pi", []byte("new"))
	f.Add([]byte("<!-- borel:end x -->\n"), "x", []byte(""))
	f.Add([]byte("\\begin{document}\n\\end{document}\n% borel:begin a\n% borel:end a\n"), "a", []byte("t"))
	f.Fuzz(func(t *testing.T, doc []byte, name string, content []byte) {
		for _, kind := range []string{KindMarkdown, KindLaTeX, KindHTML} {
			out, err := AppendSection(doc, kind, name, "fuzz", content)
			if err != nil {
				continue
			}
			again, err := AppendSection(out, kind, name, "fuzz", content)
			if err != nil {
				t.Fatalf("%s: the document borel wrote is refused: %v", kind, err)
			}
			if !bytes.Equal(again, out) {
				t.Fatalf("%s: a second identical run changed the document", kind)
			}
			first := bytes.Index(out, []byte("borel:begin"))
			if first >= 0 {
				keep := min(first, len(doc))
				// The marker line starts at most a comment opener before "borel:begin".
				keep = max(0, keep-5)
				if !bytes.Equal(out[:keep], doc[:min(keep, len(doc))]) && bytes.Contains(doc, []byte("borel:begin")) {
					t.Fatalf("%s: bytes before the section changed", kind)
				}
			}
		}
	})
}
