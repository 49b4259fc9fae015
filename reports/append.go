package reports

import (
	"bytes"
	"fmt"
	"regexp"
	"strings"
)

// Section kinds for AppendSection, chosen from the target file's extension.
const (
	KindMarkdown = "md"
	KindLaTeX    = "tex"
	KindHTML     = "html"
)

// KindForPath returns the section kind for a file name, or "" when borel
// cannot append to that kind of file.
func KindForPath(path string) string {
	lower := strings.ToLower(path)
	switch {
	case strings.HasSuffix(lower, ".md"), strings.HasSuffix(lower, ".markdown"):
		return KindMarkdown
	case strings.HasSuffix(lower, ".tex"):
		return KindLaTeX
	case strings.HasSuffix(lower, ".html"), strings.HasSuffix(lower, ".htm"):
		return KindHTML
	}
	return ""
}

var sectionName = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]*$`)

// ValidSectionName reports whether name can label a section.
func ValidSectionName(name string) bool { return sectionName.MatchString(name) }

func markers(kind, name string) (begin, end string) {
	if kind == KindLaTeX {
		return "% borel:begin " + name, "% borel:end " + name
	}
	return "<!-- borel:begin " + name + " -->", "<!-- borel:end " + name + " -->"
}

// A line is a marker candidate when it starts with the comment opener and
// "borel:"; only those are parsed (and a malformed one is an error). Text
// that merely mentions borel:begin is ordinary text.
var (
	texCandidate  = regexp.MustCompile(`^%\s*borel:`)
	htmlCandidate = regexp.MustCompile(`^<!--\s*borel:`)
	texMarker     = regexp.MustCompile(`^%\s*borel:(begin|end)\b\s*(.*?)\s*$`)
	htmlMarker    = regexp.MustCompile(`^<!--\s*borel:(begin|end)\b\s*(.*?)\s*(-->)?\s*$`)
)

func isCandidate(kind, line string) bool {
	if kind == KindLaTeX {
		return texCandidate.MatchString(line)
	}
	return htmlCandidate.MatchString(line)
}

type markerAt struct {
	begin      bool
	name       string
	start, end int // byte range of the whole line, newline included
	line       int
}

// findMarkers lists the marker lines of a document and checks that they
// pair up: every begin has an end with the same name, no nesting, no
// section twice. A document that breaks these rules is an error: borel
// never guesses where a section ends.
func findMarkers(doc []byte, kind, file string) ([]markerAt, error) {
	var out []markerAt
	re := htmlMarker
	if kind == KindLaTeX {
		re = texMarker
	}
	pos, line := 0, 0
	for pos < len(doc) {
		line++
		next := bytes.IndexByte(doc[pos:], '\n')
		stop := len(doc)
		if next >= 0 {
			stop = pos + next + 1
		}
		text := strings.TrimSpace(string(doc[pos:stop]))
		if isCandidate(kind, text) {
			m := re.FindStringSubmatch(text)
			if m == nil || (kind != KindLaTeX && m[3] == "") || !ValidSectionName(m[2]) {
				return nil, fmt.Errorf("%s line %d: a borel marker that cannot be read (%q); fix it by hand, nothing was written", file, line, text)
			}
			out = append(out, markerAt{begin: m[1] == "begin", name: m[2], start: pos, end: stop, line: line})
		}
		pos = stop
	}
	seen := map[string]bool{}
	for i := 0; i < len(out); i += 2 {
		b := out[i]
		if !b.begin {
			return nil, fmt.Errorf("%s line %d: borel:end %s without a borel:begin before it; fix the markers by hand, nothing was written", file, b.line, b.name)
		}
		if i+1 >= len(out) || out[i+1].begin || out[i+1].name != b.name {
			return nil, fmt.Errorf("%s line %d: borel:begin %s has no matching borel:end after it; fix the markers by hand, nothing was written", file, b.line, b.name)
		}
		if seen[b.name] {
			return nil, fmt.Errorf("%s line %d: section %s appears twice; fix the markers by hand, nothing was written", file, b.line, b.name)
		}
		seen[b.name] = true
	}
	return out, nil
}

// AppendSection returns doc with the section name set to content: the bytes
// between the markers of an existing section are replaced and nothing else
// changes; a new section goes before </body> (HTML) or \end{document}
// (LaTeX) when there is one, else at the end. file names the document in
// errors.
func AppendSection(doc []byte, kind, name, file string, content []byte) ([]byte, error) {
	if !ValidSectionName(name) {
		return nil, fmt.Errorf("--section %q: use letters, digits, '.', '_' or '-'", name)
	}
	ms, err := findMarkers(doc, kind, file)
	if err != nil {
		return nil, err
	}
	for _, line := range strings.Split(string(content), "\n") {
		if isCandidate(kind, strings.TrimSpace(line)) {
			return nil, fmt.Errorf("the report holds a line that looks like a borel section marker (%q); nothing was written", strings.TrimSpace(line))
		}
	}
	body := content
	if len(body) > 0 && body[len(body)-1] != '\n' {
		body = append(append([]byte(nil), body...), '\n')
	}
	for i := 0; i < len(ms); i += 2 {
		if ms[i].name == name {
			var out bytes.Buffer
			out.Write(doc[:ms[i].end])
			out.Write(body)
			out.Write(doc[ms[i+1].start:])
			return out.Bytes(), nil
		}
	}
	begin, end := markers(kind, name)
	block := []byte(begin + "\n" + string(body) + end + "\n")
	at := len(doc)
	switch kind {
	case KindHTML:
		if i := bytes.LastIndex(bytes.ToLower(doc), []byte("</body>")); i >= 0 {
			at = i
		}
	case KindLaTeX:
		if i := bytes.LastIndex(doc, []byte(`\end{document}`)); i >= 0 {
			at = i
		}
	}
	var out bytes.Buffer
	out.Write(doc[:at])
	if at > 0 && doc[at-1] != '\n' {
		out.WriteByte('\n')
	}
	out.Write(block)
	out.Write(doc[at:])
	return out.Bytes(), nil
}
