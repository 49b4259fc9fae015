package tests

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// The library from another module: a scratch module outside the
// repository requires github.com/borel-audit/borel (with a local replace,
// only because the repository is not published yet), runs the library's
// Examples, and its own go test — ChaCha8 passes audittest.Consistent, a
// raw 64-bit LCG fails it with a message that gives the seed, the length
// and the findings that decided. Offline: the module cache holds what the
// repository builds with.
func TestLibraryFromAnotherModule(t *testing.T) {
	goTool, err := exec.LookPath("go")
	if err != nil {
		t.Skip("no go command")
	}
	repo, _ := filepath.Abs("..")
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "go.mod"), []byte("module example.com/scratch\n\ngo 1.26\n\nrequire github.com/borel-audit/borel v0.0.0\n\nreplace github.com/borel-audit/borel => "+repo+"\n"), 0o644)
	os.WriteFile(filepath.Join(dir, "gen_test.go"), []byte(`package scratch

import (
	"math/rand/v2"
	"testing"

	"github.com/borel-audit/borel/stats/audit"
	"github.com/borel-audit/borel/stats/audit/audittest"
)

type lcg struct{ x uint64 }

func (g *lcg) Uint64() uint64 { g.x = g.x*6364136223846793005 + 1442695040888963407; return g.x }

func TestChaCha8(t *testing.T) {
	audittest.Consistent(t, rand.NewChaCha8([32]byte{42}), 1<<20, "ChaCha8 key {42}", audit.Options{})
}

func TestWeakLCG(t *testing.T) {
	audittest.Consistent(t, &lcg{x: 1}, 1<<20, "seed 1", audit.Options{})
}
`), 0o644)
	env := append(os.Environ(), "GOFLAGS=-mod=mod", "GOPROXY=off", "GOSUMDB=off")
	run := func(args ...string) (string, error) {
		cmd := exec.Command(goTool, args...)
		cmd.Dir, cmd.Env = dir, env
		out, err := cmd.CombinedOutput()
		return string(out), err
	}
	if out, err := run("mod", "tidy"); err != nil {
		t.Skipf("the scratch module cannot resolve offline here: %v\n%s", err, out)
	}
	if out, err := run("test", "-count=1", "-run", "Example", "github.com/borel-audit/borel/stats/audit"); err != nil || !strings.Contains(out, "ok") {
		t.Errorf("the library's examples from the scratch module: %v\n%s", err, out)
	}
	if out, err := run("test", "-count=1", "-run", "TestChaCha8", "."); err != nil {
		t.Errorf("ChaCha8 failed the gate: %v\n%s", err, out)
	}
	out, err := run("test", "-count=1", "-run", "TestWeakLCG", ".")
	if err == nil {
		t.Fatalf("the weak generator passed the gate:\n%s", out)
	}
	for _, want := range []string{"1048576 bytes (seed 1) are not consistent with independent uniform bytes", "smallest adjusted p", ": deviates"} {
		if !strings.Contains(out, want) {
			t.Errorf("the failure message lacks %q:\n%s", want, out)
		}
	}
}
