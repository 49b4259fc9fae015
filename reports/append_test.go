package reports

import (
	"bytes"
	"strings"
	"testing"
)

func TestAppendSectionKeepsOtherBytes(t *testing.T) {
	before := "# Paper\r\n\nSome text with trailing spaces   \n"
	after := "\n## Later\n\nMore text.\n"
	doc := []byte(before + after)
	// Insert at the end, then replace, then check nothing else moved.
	out, err := AppendSection(doc, KindMarkdown, "pi", "paper.md", []byte("| a |\n| --- |\n| 1 |"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(out, doc) || !strings.Contains(string(out), "<!-- borel:begin pi -->\n| a |") {
		t.Fatalf("insert:\n%s", out)
	}
	// Put text after the section too, then replace the section.
	out = append(out, []byte("Closing words.\n")...)
	again, err := AppendSection(out, KindMarkdown, "pi", "paper.md", []byte("new table\n"))
	if err != nil {
		t.Fatal(err)
	}
	want := string(doc) + "<!-- borel:begin pi -->\nnew table\n<!-- borel:end pi -->\nClosing words.\n"
	if string(again) != want {
		t.Errorf("replace:\n%q\nwant\n%q", again, want)
	}
	// A second section leaves the first alone.
	two, err := AppendSection(again, KindMarkdown, "e", "paper.md", []byte("e table\n"))
	if err != nil || !strings.HasPrefix(string(two), want) {
		t.Errorf("second section: %v\n%s", err, two)
	}
}

func TestAppendSectionPlacement(t *testing.T) {
	tex := []byte("\\documentclass{article}\n\\begin{document}\nHello.\n\\end{document}\n")
	out, err := AppendSection(tex, KindLaTeX, "results", "p.tex", []byte("\\begin{table}...\\end{table}\n"))
	if err != nil || !strings.Contains(string(out), "% borel:end results\n\\end{document}\n") {
		t.Errorf("tex: %v\n%s", err, out)
	}
	html := []byte("<html><body>\n<p>x</p>\n</body></html>\n")
	out, err = AppendSection(html, KindHTML, "r1", "p.html", []byte("<section>t</section>"))
	if err != nil || !strings.Contains(string(out), "<!-- borel:end r1 -->\n</body></html>") {
		t.Errorf("html: %v\n%s", err, out)
	}
}

func TestAppendSectionRefusesBrokenMarkers(t *testing.T) {
	cases := map[string]string{
		"end first":  "a\n<!-- borel:end x -->\n",
		"no end":     "<!-- borel:begin x -->\nb\n",
		"mismatch":   "<!-- borel:begin x -->\n<!-- borel:end y -->\n",
		"nested":     "<!-- borel:begin x -->\n<!-- borel:begin y -->\n<!-- borel:end y -->\n<!-- borel:end x -->\n",
		"twice":      "<!-- borel:begin x -->\n<!-- borel:end x -->\n<!-- borel:begin x -->\n<!-- borel:end x -->\n",
		"unreadable": "<!-- borel:begin x\n",
		"bad name":   "<!-- borel:begin a b -->\n<!-- borel:end a b -->\n",
	}
	for name, doc := range cases {
		if _, err := AppendSection([]byte(doc), KindMarkdown, "x", "paper.md", []byte("t")); err == nil || !strings.Contains(err.Error(), "nothing was written") {
			t.Errorf("%s: err %v", name, err)
		}
	}
	if _, err := AppendSection(nil, KindMarkdown, "bad name", "p.md", nil); err == nil {
		t.Error("section name with a space accepted")
	}
}

// Text that mentions the markers (this README does, in prose and in code
// spans) is not a marker: only lines that start with the comment opener and
// "borel:" are.
func TestAppendIgnoresMentions(t *testing.T) {
	doc := []byte("Run it: the markers are `<!-- borel:begin NAME -->` and borel:end.\n% borel:begin is LaTeX's\n")
	out, err := AppendSection(doc, KindMarkdown, "r", "README.md", []byte("table\n"))
	if err != nil || !bytes.HasPrefix(out, doc) {
		t.Errorf("a document that mentions the markers: %v", err)
	}
	if _, err := AppendSection(nil, KindMarkdown, "r", "p.md", []byte("x\n<!-- borel:end r -->\n")); err == nil {
		t.Error("content holding a marker line was accepted")
	}
}
