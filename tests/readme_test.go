package tests

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// Every README example shown with its output ("$ borel …" at the top of a
// code block, the output below) runs as shown, and each output line the
// README prints appears in what borel prints today: a line cut with "…" or
// "..." is compared up to the cut, and the report's date line (the time of
// the run) is not compared. An example that reads a file the repository
// does not have runs in a temporary folder with that file made for it
// (digits.txt, the bad-digit example). Before this test the README's
// examples were checked by no one; the demo summary and the π report are
// the parts most likely to drift when a statistic changes.
func TestReadmeExamples(t *testing.T) {
	readme, err := os.ReadFile("../README.md")
	if err != nil {
		t.Fatal(err)
	}
	made := map[string][]byte{"digits.txt": []byte("0123456789\n01234x6789\n")}
	lines := strings.Split(string(readme), "\n")
	examples, compared := 0, 0
	for i := 0; i < len(lines); i++ {
		if !strings.HasPrefix(lines[i], "```") || i+1 >= len(lines) || !strings.HasPrefix(lines[i+1], "$ borel ") {
			continue
		}
		command := strings.TrimPrefix(lines[i+1], "$ borel ")
		var shown []string
		j := i + 2
		for ; j < len(lines) && !strings.HasPrefix(lines[j], "```"); j++ {
			shown = append(shown, lines[j])
		}
		i = j
		args := strings.Fields(command)
		dir := ".."
		for _, a := range args {
			if data, ok := made[a]; ok {
				dir = t.TempDir()
				if err := os.WriteFile(filepath.Join(dir, a), data, 0o644); err != nil {
					t.Fatal(err)
				}
			}
		}
		cmd := exec.Command(borelBin, args...)
		cmd.Dir = dir
		cmd.Env = append(os.Environ(), "SOURCE_DATE_EPOCH=1795000000")
		var out bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &out
		if err := cmd.Run(); err != nil {
			if _, ok := err.(*exec.ExitError); !ok {
				t.Fatal(err)
			}
		}
		examples++
		got := out.String()
		for _, l := range shown {
			l = strings.TrimRight(l, " ")
			if c := strings.IndexAny(l, "…"); c >= 0 {
				l = l[:c]
			}
			if c := strings.Index(l, "..."); c >= 0 {
				l = l[:c]
			}
			l = strings.TrimRight(l, " ")
			if strings.TrimSpace(l) == "" || strings.HasPrefix(strings.TrimSpace(l), "date ") {
				continue
			}
			compared++
			if !strings.Contains(got, l) {
				t.Errorf("README example %q shows\n\t%s\nwhich its output today does not have", command, l)
			}
		}
	}
	if examples < 4 || compared < 30 {
		t.Errorf("only %d README examples and %d output lines compared", examples, compared)
	}
	t.Logf("%d README examples, %d output lines compared", examples, compared)
}
