package tests

import (
	"bufio"
	"bytes"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// chacha returns n bytes of ChaCha8 output keyed by key.
func chacha(n int, key byte) []byte {
	rng := rand.New(rand.NewChaCha8([32]byte{'w', 'a', 't', 'c', 'h', key}))
	b := make([]byte, n)
	for i := 0; i < n; i += 8 {
		v := rng.Uint64()
		for k := 0; k < 8 && i+k < n; k++ {
			b[i+k] = byte(v >> (8 * k))
		}
	}
	return b
}

// A generator that turns biased after 8 MiB (from then on a byte is 0
// with probability 1/256 + 0.004): the live audit stops at the first
// checkpoint past the change, 16 MiB (the ones at 1, 2, 4 and 8 MiB see
// unbiased bytes), with exit 3, and the report names the frequency check.
func TestWatchStopsAfterTheChange(t *testing.T) {
	d := chacha(24<<20, 1)
	rng := rand.New(rand.NewPCG(8, 8))
	for i := 8 << 20; i < len(d); i++ {
		if rng.Float64() < 0.004 {
			d[i] = 0
		}
	}
	out := filepath.Join(t.TempDir(), "latest.txt")
	code, _, errs := runBorel(t, d, "watch", "-", "--raw", "--checks", "freq,serial,gap", "-o", out)
	if code != 3 {
		t.Fatalf("exit %d, want 3: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(string(errs)), "\n")
	last := lines[len(lines)-1]
	if !strings.Contains(last, "checkpoint 4: 16.00 MiB read") || !strings.Contains(last, "not consistent") {
		t.Errorf("the run stopped at %q, want checkpoint 4 at 16 MiB, not consistent:\n%s", last, errs)
	}
	for _, l := range lines[:len(lines)-1] {
		if !strings.Contains(l, ": consistent;") {
			t.Errorf("an earlier checkpoint failed: %s", l)
		}
	}
	report, _ := os.ReadFile(out)
	if flat := strings.Join(strings.Fields(string(report)), " "); !strings.Contains(flat, "freq X² k=1") || !strings.Contains(flat, "deviates") || !strings.Contains(flat, "byte 0x00: +") {
		t.Errorf("the report does not name freq and byte 0x00:\n%s", report)
	}
}

// A good generator run to --until 64MiB passes every checkpoint.
func TestWatchGoodGeneratorPasses(t *testing.T) {
	code, _, errs := runBorel(t, chacha(64<<20, 2), "watch", "-", "--raw", "--until", "64MiB", "--format", "json", "-o", filepath.Join(t.TempDir(), "r.json"))
	if code != 0 || !strings.Contains(string(errs), "checkpoint 6: 64.00 MiB read") || strings.Contains(string(errs), "not consistent") {
		t.Errorf("exit %d:\n%s", code, errs)
	}
}

// Resume: a run stopped at 1 MiB with --save and resumed from its saved
// tallies on the input that follows reports exactly what one uninterrupted
// run over the whole input reports (every finding, at the same level).
func TestWatchResumeEqualsOneRun(t *testing.T) {
	d := chacha(2<<20, 3)
	dir := t.TempDir()
	saved := filepath.Join(dir, "saved")
	args := []string{"watch", "-", "--raw", "--word", "32", "--start", "256KiB", "--format", "csv", "-q"}
	// The first run's input ends at 1 MiB (a producer stopped), at its
	// checkpoint 2; it saves its tallies there.
	code, _, errs := runBorel(t, d[:1<<20], append(args, "--save", saved)...)
	if code != 0 {
		t.Fatalf("first part: exit %d: %s", code, errs)
	}
	code, resumed, errs := runBorel(t, d[1<<20:], append(args, "--resume", saved)...)
	if code != 0 {
		t.Fatalf("resumed: exit %d: %s", code, errs)
	}
	code, whole, errs := runBorel(t, d, args...)
	if code != 0 {
		t.Fatalf("whole: exit %d: %s", code, errs)
	}
	rows := func(csv []byte) []string {
		var out []string
		for _, l := range strings.Split(string(csv), "\n") {
			if l != "" && !strings.HasPrefix(l, "#") {
				out = append(out, l)
			}
		}
		return out
	}
	a, b := rows(resumed), rows(whole)
	if len(a) < 100 || len(a) != len(b) {
		t.Fatalf("%d rows resumed, %d whole", len(a), len(b))
	}
	for i := range a {
		if a[i] != b[i] {
			t.Errorf("row %d differs:\nresumed %s\nwhole   %s", i, a[i], b[i])
			break
		}
	}
}

// A slow producer (about 20 KB/s) still gets a status line at each
// checkpoint, as it is reached; when it closes the pipe the run ends with
// a last checkpoint and a report.
func TestWatchSlowProducer(t *testing.T) {
	cmd := exec.Command(borelBin, "watch", "-", "--raw", "--start", "8KiB", "--checks", "freq")
	cmd.Dir = ".."
	stdin, _ := cmd.StdinPipe()
	stderr, _ := cmd.StderrPipe()
	var stdout bytes.Buffer
	cmd.Stdout = &stdout
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	data := chacha(40<<10, 4)
	seen := make(chan string, 16)
	go func() {
		sc := bufio.NewScanner(stderr)
		for sc.Scan() {
			seen <- sc.Text()
		}
		close(seen)
	}()
	began := time.Now()
	var at []time.Duration
	for i := 0; i < len(data); i += 2048 {
		stdin.Write(data[i : i+2048])
		time.Sleep(100 * time.Millisecond)
	drain:
		for {
			select {
			case l := <-seen:
				if strings.Contains(l, "checkpoint") {
					at = append(at, time.Since(began))
				}
			default:
				break drain
			}
		}
	}
	stdin.Close()
	var rest []string
	for l := range seen {
		rest = append(rest, l)
	}
	err := cmd.Wait()
	if err != nil {
		t.Fatalf("exit %v: %s", err, rest)
	}
	// Checkpoints at 8, 16 and 32 KiB arrive while the producer writes
	// (at about 0.4, 0.8 and 1.6 s of its 2 s), the last when it closes.
	if len(at) < 3 {
		t.Errorf("%d status lines while the producer ran (at %v), want the checkpoints at 8, 16 and 32 KiB", len(at), at)
	}
	if len(rest) != 1 || !strings.Contains(rest[0], "checkpoint 3 (ended): 40.0 KiB read") {
		t.Errorf("after the pipe closed: %q", rest)
	}
	if !strings.Contains(stdout.String(), "Verdict for stdin over its 4 views") {
		t.Errorf("no final report on standard output:\n%s", stdout.String())
	}
}

// SIGINT: the run writes the report of what was read, marked as
// interrupted, and exits 130.
func TestWatchInterrupted(t *testing.T) {
	out := filepath.Join(t.TempDir(), "latest.txt")
	cmd := exec.Command(borelBin, "watch", "-", "--raw", "--start", "64KiB", "--checks", "freq,serial", "-o", out)
	cmd.Dir = ".."
	stdin, _ := cmd.StdinPipe()
	stderr, _ := cmd.StderrPipe()
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	stdin.Write(chacha(100<<10, 5)) // a checkpoint at 64 KiB, then the pipe stays open
	lines := make(chan string, 16)
	go func() {
		sc := bufio.NewScanner(stderr)
		for sc.Scan() {
			lines <- sc.Text()
		}
		close(lines)
	}()
	select {
	case l := <-lines:
		if !strings.Contains(l, "checkpoint 0") {
			t.Fatalf("first line %q", l)
		}
	case <-time.After(20 * time.Second):
		t.Fatal("no checkpoint line")
	}
	cmd.Process.Signal(syscall.SIGINT)
	var rest []string
	for l := range lines {
		rest = append(rest, l)
	}
	err := cmd.Wait()
	stdin.Close()
	if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != 130 {
		t.Fatalf("exit %v, want 130: %q", err, rest)
	}
	if len(rest) == 0 || !strings.Contains(rest[len(rest)-1], "(interrupted): ") {
		t.Errorf("status after the signal: %q", rest)
	}
	report, _ := os.ReadFile(out)
	if flat := strings.Join(strings.Fields(string(report)), " "); !strings.Contains(flat, "interrupted by a signal: this report covers what was read up to the last complete chunk") {
		t.Errorf("the report is not marked as interrupted:\n%.600s", report)
	}
}

// The false-alarm rate of a whole live run, over all its checkpoints, is at
// most alpha: 200 seeded runs of good decimal digits, checkpoints at 4096,
// 8192, …, 131072 digits (6 of them, each at alpha/2^(i+1)); the number of
// runs that stop on a false alarm stays within the 99.9% binomial
// interval's upper end for rate 0.01 (the union bound makes the rate at
// most alpha; below it is the price of the bound, not a defect).
func TestCalibrationWatchRuns(t *testing.T) {
	runs := calibrationScale(200)
	failed := 0
	for i := 0; i < runs; i++ {
		rng := rand.New(rand.NewChaCha8([32]byte{'l', 'i', 'v', 'e', byte(i), byte(i >> 8)}))
		d := make([]byte, 131072)
		for j := range d {
			d[j] = '0' + byte(rng.IntN(10))
		}
		code, _, errs := runBorel(t, d, "watch", "-", "--start", "4096", "-q", "--format", "csv")
		switch code {
		case 0:
		case 3:
			failed++
		default:
			t.Fatalf("run %d: exit %d: %s", i, code, errs)
		}
	}
	_, hi := binomialInterval(runs, 0.01, 0.0005)
	if failed > hi {
		t.Errorf("%d of %d live runs raised a false alarm, above the 99.9%% binomial interval's end %d for alpha 0.01", failed, runs, hi)
	}
	t.Logf("%d of %d live runs raised a false alarm at some checkpoint (alpha 0.01; bound %d)", failed, runs, hi)
}
