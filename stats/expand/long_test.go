package expand

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"os"
	"testing"
	"time"
)

// TestConstantsLong computes π, e, √2 and ln 2 to 3·10^7 and 10^8 decimals,
// each size a computation of its own, and compares them by SHA-256 and
// their last 50 digits with Debian's python3-mpmath 1.2.1 (gmpy backend;
// testdata/constants-1e8.json, made by the script in testdata/README.md).
// It also reads the hexadecimal digits of π at 25·10^6, where the former
// overflow of the Chudnovsky terms made them wrong: 0a306cfa7cdf (mpmath,
// pi_fixed). About 15 minutes and 7 GB on two cores; run it with
//
//	BOREL_LONG=1 go test -run Long -timeout 2h -v ./stats/expand
//
// bench/constants.sh measures the time and peak memory of each run as a
// process of its own.
func TestConstantsLong(t *testing.T) {
	if os.Getenv("BOREL_LONG") == "" {
		t.Skip("set BOREL_LONG=1 to compute four constants to 10^8 decimals (about 15 minutes)")
	}
	data, err := os.ReadFile("../../testdata/constants-1e8.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Constants map[string]map[string]any
	}
	if err := json.Unmarshal(data, &ref); err != nil {
		t.Fatal(err)
	}
	src, _ := ParseSource("pi")
	if d, err := src.Digits(12, 24999999, 16); err != nil || text(d) != "0a306cfa7cdf" {
		t.Errorf("π hexadecimal digits 25000000..25000011: %s (%v), want 0a306cfa7cdf", text(d), err)
	}
	for _, name := range []string{"pi", "e", "sqrt2", "ln2"} {
		for _, n := range []string{"30000000", "100000000"} {
			want := ref.Constants[name]
			src, err := ParseSource(name)
			if err != nil {
				t.Fatal(err)
			}
			count := map[string]int{"30000000": 30_000_000, "100000000": 100_000_000}[n]
			start := time.Now()
			d, checks, err := src.CheckedDigits(count, 0, 10)
			if err != nil {
				t.Errorf("%s to %s decimals: %v", name, n, err)
				continue
			}
			s := text(d)
			sum := sha256.Sum256([]byte(s))
			if hex.EncodeToString(sum[:]) != want["sha256_"+n] || s[len(s)-50:] != want["last50_"+n] {
				t.Errorf("%s to %s decimals: SHA-256 %x, last digits %s; mpmath %s, …%s", name, n, sum, s[len(s)-50:], want["sha256_"+n], want["last50_"+n])
			}
			t.Logf("%s, %s decimals: %.1f s, same digits as mpmath; %s", name, n, time.Since(start).Seconds(), checks[0])
		}
	}
}
