package main

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

const someDigits = "14159265358979323846264338327950288419716939937510"

// A symlink is followed and its target replaced; a dangling one gets its
// target created; the link stays a link (before: it was replaced by a
// regular file and its target left old). --append follows links too.
func TestOutputThroughSymlinks(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "target.txt")
	os.WriteFile(target, []byte("old"), 0o644)
	link := filepath.Join(dir, "link.txt")
	os.Symlink("target.txt", link)
	if code, _, errs := borel(t, "", "digits", "pi", "--count", "20", "-q", "-o", link); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if st, _ := os.Lstat(link); st.Mode()&os.ModeSymlink == 0 {
		t.Error("the symlink was replaced by a file")
	}
	if data, _ := os.ReadFile(target); !strings.HasPrefix(string(data), "14159") {
		t.Errorf("the link's target holds %q", data)
	}
	dangling := filepath.Join(dir, "dangling.txt")
	os.Symlink("new.txt", dangling)
	if code, _, errs := borel(t, "", "digits", "pi", "--count", "20", "-q", "-o", dangling); code != 0 {
		t.Fatalf("dangling: exit %d: %s", code, errs)
	}
	if data, err := os.ReadFile(filepath.Join(dir, "new.txt")); err != nil || !strings.HasPrefix(string(data), "14159") {
		t.Errorf("the dangling link's target: %q, %v", data, err)
	}
	if st, _ := os.Lstat(dangling); st.Mode()&os.ModeSymlink == 0 {
		t.Error("the dangling symlink was replaced by a file")
	}
	doc := filepath.Join(dir, "paper.md")
	os.WriteFile(doc, []byte("# Paper\n"), 0o644)
	mdLink := filepath.Join(dir, "linked.md")
	os.Symlink("paper.md", mdLink)
	if code, _, errs := borel(t, someDigits, "audit", "-", "-q", "--append", mdLink); code != 0 {
		t.Fatalf("append: exit %d: %s", code, errs)
	}
	if st, _ := os.Lstat(mdLink); st.Mode()&os.ModeSymlink == 0 {
		t.Error("--append made the link a copy")
	}
	if data, _ := os.ReadFile(doc); !strings.Contains(string(data), "borel audit") {
		t.Error("--append through a link left the document unchanged")
	}
}

// A FIFO is written in place: its reader gets the report, and it stays a
// FIFO (before: it was replaced by a regular file and the reader got
// nothing).
func TestOutputToFIFO(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("no FIFO here: %v", err)
	}
	got := make(chan []byte)
	go func() {
		f, err := os.Open(fifo)
		if err != nil {
			got <- nil
			return
		}
		data, _ := io.ReadAll(f)
		f.Close()
		got <- data
	}()
	if code, _, errs := borel(t, "", "digits", "pi", "--count", "30", "-q", "-o", fifo); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if data := <-got; !bytes.HasPrefix(data, []byte("14159")) {
		t.Errorf("the FIFO's reader got %q", data)
	}
	if st, _ := os.Lstat(fifo); st.Mode()&os.ModeNamedPipe == 0 {
		t.Error("the FIFO was replaced")
	}
}

// A character device (the null device, made with mknod: root only) is
// written in place and stays a device.
func TestOutputToDevice(t *testing.T) {
	dev := filepath.Join(t.TempDir(), "null")
	if err := syscall.Mknod(dev, syscall.S_IFCHR|0o666, 1<<8|3); err != nil {
		t.Skipf("mknod needs root: %v", err)
	}
	if code, _, errs := borel(t, "", "digits", "pi", "--count", "1000", "-q", "-o", dev); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if st, _ := os.Lstat(dev); st.Mode()&os.ModeCharDevice == 0 {
		t.Error("the device was replaced by a regular file")
	}
}

// An output that cannot be written is refused before any digit is read.
func TestUnwritableOutputFailsFirst(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "a-file")
	os.WriteFile(file, []byte("x"), 0o644)
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"audit", "-", "-o", filepath.Join(dir, "nodir", "out.txt")}, "does not exist"},
		{[]string{"audit", "-", "-o", dir}, "is a folder"},
		{[]string{"audit", "-", "--plots", file}, "is a file, not a folder"},
		{[]string{"audit", "-", "--plots", filepath.Join(file, "sub")}, "is a file, not a folder"},
		{[]string{"tally", "-", "--offset", "0", "--max-block", "2", "-o", filepath.Join(dir, "nodir", "s.shard")}, "does not exist"},
		{[]string{"digits", "pi", "--count", "10", "-o", filepath.Join(dir, "nodir", "d.txt")}, "does not exist"},
	} {
		var out, errb bytes.Buffer
		code := run(c.args, failingReader{t}, &out, &errb)
		if code != exitUsage || !strings.Contains(errb.String(), c.want) {
			t.Errorf("%v: exit %d, %q", c.args, code, errb.String())
		}
	}
}

// failingReader fails the test if the pass reads it.
type failingReader struct{ t *testing.T }

func (r failingReader) Read([]byte) (int, error) {
	r.t.Error("the input was read before the output was checked")
	return 0, io.EOF
}

// Plots are named after the input's base name, never a hidden file.
func TestPlotNames(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "..", filepath.Base(dir)+"-in", ".hidden.txt")
	os.MkdirAll(filepath.Dir(in), 0o755)
	os.WriteFile(in, []byte(strings.Repeat(someDigits, 40)), 0o644)
	plots := filepath.Join(dir, "plots")
	if code, _, errs := borel(t, "", "audit", in, "-q", "--plots", plots); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	entries, _ := os.ReadDir(plots)
	if len(entries) == 0 {
		t.Fatal("no plots")
	}
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") || strings.HasPrefix(e.Name(), "-") || !strings.HasPrefix(e.Name(), "hidden.txt-base10-") {
			t.Errorf("plot file %q", e.Name())
		}
	}
}
