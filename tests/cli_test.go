// Package tests runs the built borel command end to end: golden files of
// its reports, and checks of what the reports say against published values.
// Run "go test ./tests -update" to rewrite the golden files after a change
// that is meant to alter the output; review the diff before committing.
package tests

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/borel-audit/borel/stats/expand"
)

var update = flag.Bool("update", false, "rewrite the golden files")

var borelBin string

func TestMain(m *testing.M) {
	flag.Parse()
	dir, err := os.MkdirTemp("", "borel-e2e-")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	borelBin = filepath.Join(dir, "borel")
	build := exec.Command("go", "build", "-o", borelBin, "../cmd/borel")
	build.Stderr = os.Stderr
	if err := build.Run(); err != nil {
		fmt.Fprintln(os.Stderr, "building borel:", err)
		os.Exit(1)
	}
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}

// runBorel runs the binary from the repository root.
func runBorel(t *testing.T, stdin []byte, args ...string) (int, []byte, []byte) {
	t.Helper()
	cmd := exec.Command(borelBin, args...)
	cmd.Dir = ".."
	cmd.Env = append(os.Environ(), "SOURCE_DATE_EPOCH=1795000000") // a fixed report date for golden files
	cmd.Stdin = bytes.NewReader(stdin)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err := cmd.Run()
	code := 0
	if ee, ok := err.(*exec.ExitError); ok {
		code = ee.ExitCode()
	} else if err != nil {
		t.Fatal(err)
	}
	return code, out.Bytes(), errb.Bytes()
}

func golden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("testdata", "golden", name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./tests -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		os.WriteFile(path+".got", got, 0o644)
		t.Errorf("%s differs from the golden file; see %s.got (go test ./tests -update rewrites it)", name, path)
	}
}

func digitsText(d []byte) []byte {
	out := make([]byte, len(d))
	for i, x := range d {
		out[i] = "0123456789abcdefghijklmnopqrstuvwxyz"[x]
	}
	return out
}

func TestGoldenReports(t *testing.T) {
	vec := expand.IID(60_000, []float64{0.2, 0.3, 0.5}, rand.New(rand.NewPCG(3, 2026)))
	rawBytes := make([]byte, 200_000)
	var seed [32]byte
	copy(seed[:], "borel golden raw")
	rand.NewChaCha8(seed).Read(rawBytes)
	cases := []struct {
		golden string
		stdin  []byte
		args   []string
	}{
		{"pi-1e6.txt", nil, []string{"audit", "testdata/pi-1e6.txt.gz"}},
		{"pi-1e6.json", nil, []string{"audit", "testdata/pi-1e6.txt.gz", "--format", "json"}},
		{"vector-stdin.txt", digitsText(vec), []string{"audit", "-", "--base", "3", "--null", "0.2,0.3,0.5"}},
		{"fitted-stdin.json", digitsText(vec), []string{"audit", "-", "--base", "3", "--null", "fitted", "--format", "json"}},
		{"raw.txt", rawBytes, []string{"audit", "-", "--raw"}},
		{"bits.txt", rawBytes, []string{"audit", "-", "--bits", "--max-block", "8"}},
		{"demo.txt", nil, []string{"demo"}},
	}
	for _, c := range cases {
		code, out, errs := runBorel(t, c.stdin, c.args...)
		if code != 0 {
			t.Errorf("%s: exit %d: %s", c.golden, code, errs)
			continue
		}
		golden(t, c.golden, out)
	}
}

type report struct {
	Schema        string `json:"schema"`
	SchemaVersion int    `json:"schema_version"`
	Audits        []struct {
		Base     int     `json:"base"`
		Digits   int64   `json:"digits"`
		Verdict  string  `json:"verdict"`
		MaxBlock int     `json:"max_block"`
		Alpha    float64 `json:"alpha"`
		Source   struct {
			IntegerPart string `json:"integer_part_dropped"`
			Compressed  bool   `json:"compressed"`
			SHA256      string `json:"sha256"`
		} `json:"source"`
		Findings []struct {
			Check     string         `json:"check"`
			Statistic string         `json:"statistic"`
			Params    map[string]int `json:"params"`
			Value     float64        `json:"value"`
			DF        float64        `json:"df"`
			PUpper    float64        `json:"p_upper"`
			Log10Up   *float64       `json:"log10_p_upper"`
			Log10Low  *float64       `json:"log10_p_lower"`
			AdjUpper  float64        `json:"adjusted_p_upper"`
			AdjLower  float64        `json:"adjusted_p_lower"`
		} `json:"findings"`
	} `json:"audits"`
	Caution string `json:"caution"`
}

func decode(t *testing.T, data []byte) report {
	t.Helper()
	var r report
	if err := json.Unmarshal(data, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

// The JSON report of π's first 10^6 decimals against published values:
// X² = 5.5091 with p 0.7879 (the published counts) and ∇ψ²_3 = 863.80 on 900 df
// (computed with scipy 1.10 / mpmath 1.2).
func TestPiReportContent(t *testing.T) {
	code, out, errs := runBorel(t, nil, "audit", "testdata/pi-1e6.txt.gz", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	r := decode(t, out)
	if r.Schema != "borel-audit" || r.SchemaVersion != 1 || len(r.Audits) != 1 || !strings.Contains(r.Caution, "not a proof of normality") {
		t.Fatalf("document header: %+v", r)
	}
	a := r.Audits[0]
	// The provenance hash is of the bytes read: the compressed file here
	// (GNU coreutils sha256sum testdata/pi-1e6.txt.gz gives the same).
	raw, _ := os.ReadFile("../testdata/pi-1e6.txt.gz")
	if sum := sha256.Sum256(raw); a.Source.SHA256 != hex.EncodeToString(sum[:]) {
		t.Errorf("source sha256 %q", a.Source.SHA256)
	}
	if a.Verdict != "consistent" || a.Digits != 1_000_000 || a.Base != 10 || a.MaxBlock != 5 ||
		a.Source.IntegerPart != "3" || !a.Source.Compressed {
		t.Errorf("audit header: %+v", a)
	}
	found := 0
	for _, f := range a.Findings {
		switch {
		case f.Check == "freq" && f.Statistic == "X2":
			found++
			if math.Abs(f.Value-5.5091) > 1e-4 || math.Abs(f.PUpper-0.7879) > 1e-4 || f.DF != 9 {
				t.Errorf("freq X² = %.4f p %.4f df %g; want 5.5091, 0.7879, 9", f.Value, f.PUpper, f.DF)
			}
		case f.Check == "serial" && f.Statistic == "dpsi2" && f.Params["k"] == 3:
			found++
			if math.Abs(f.Value-863.80) > 0.01 || f.DF != 900 {
				t.Errorf("∇ψ²_3 = %.2f on %g df; want 863.80 on 900", f.Value, f.DF)
			}
		}
		if f.AdjUpper < f.PUpper*(1-1e-12) || f.Log10Up == nil || f.Log10Low == nil {
			t.Errorf("%s %s: adjusted p %g below raw %g, or log10 missing", f.Check, f.Statistic, f.AdjUpper, f.PUpper)
		}
	}
	if found != 2 {
		t.Errorf("expected findings missing (%d of 2)", found)
	}
}

// Reading the same digits from a file, from stdin, compressed or not, gives
// the same findings (the source description aside).
func TestStdinFileAndGzipAgree(t *testing.T) {
	_, fromFile, _ := runBorel(t, nil, "audit", "testdata/pi-1e6.txt.gz", "--format", "json")
	gz, err := os.ReadFile("../testdata/pi-1e6.txt.gz")
	if err != nil {
		t.Fatal(err)
	}
	_, fromStdin, _ := runBorel(t, gz, "audit", "-", "--format", "json", "--max-block", "5")
	a, b := decode(t, fromFile), decode(t, fromStdin)
	if len(a.Audits[0].Findings) != len(b.Audits[0].Findings) {
		t.Fatalf("%d vs %d findings", len(a.Audits[0].Findings), len(b.Audits[0].Findings))
	}
	for i := range a.Audits[0].Findings {
		fa, fb := a.Audits[0].Findings[i], b.Audits[0].Findings[i]
		if fa.Value != fb.Value || fa.DF != fb.DF || fa.PUpper != fb.PUpper {
			t.Errorf("finding %d differs: %+v vs %+v", i, fa, fb)
		}
	}
}

// A periodic sequence exits 3 under --strict; a tiny p-value is carried as
// its log10 in the JSON, never as a bare 0.
func TestPeriodicStrictAndLogP(t *testing.T) {
	periodic := bytes.Repeat([]byte("0123456789"), 10_000)
	code, out, _ := runBorel(t, periodic, "audit", "-", "--strict", "--format", "json")
	if code != 3 {
		t.Errorf("exit %d, want 3", code)
	}
	r := decode(t, out)
	if r.Audits[0].Verdict != "not consistent" {
		t.Errorf("verdict %q", r.Audits[0].Verdict)
	}
	tiny := false
	for _, f := range r.Audits[0].Findings {
		if f.Log10Up != nil && *f.Log10Up < -400 {
			tiny = true
			if f.PUpper != 0 {
				t.Errorf("p %g with log10 %g", f.PUpper, *f.Log10Up)
			}
		}
	}
	if !tiny {
		t.Error("no finding below 1e-400 carried as log10")
	}
}

// Bytes read with --raw and the same bytes read with --bits: the
// non-overlapping 8-bit blocks, aligned at bit 0, are the bytes, so the two
// X² statistics are the same number.
func TestBitsBlocksEqualBytes(t *testing.T) {
	data := make([]byte, 100_000)
	rand.NewChaCha8([32]byte{9}).Read(data)
	_, rawOut, _ := runBorel(t, data, "audit", "-", "--raw", "--base", "256", "--format", "json")
	_, bitsOut, _ := runBorel(t, data, "audit", "-", "--bits", "--max-block", "8", "--format", "json")
	var byteX2, block8 float64
	for _, f := range decode(t, rawOut).Audits[0].Findings {
		if f.Check == "freq" && f.Statistic == "X2" {
			byteX2 = f.Value
		}
	}
	for _, f := range decode(t, bitsOut).Audits[0].Findings {
		if f.Check == "blocks" && f.Params["k"] == 8 {
			block8 = f.Value
		}
	}
	if byteX2 == 0 || math.Abs(byteX2-block8) > 1e-9*byteX2 {
		t.Errorf("byte X² %v, 8-bit block X² %v: want equal", byteX2, block8)
	}
}
