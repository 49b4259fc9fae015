package main

import (
	"encoding/json"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// One input, one verdict: random bytes audited with --raw (bits, bit pairs,
// nibbles, bytes) and random decimals re-expanded with --bases 3,7 get one
// verdict each, whose false-alarm rate over 300 seeded inputs lies within
// the 99.9% binomial interval of Binomial(300, 0.01), [0, 10]
// (tests/calibration_test.go computes it). With each view at alpha on its
// own, --strict failed 3.2% of random byte streams.
func TestInputVerdictCalibration(t *testing.T) {
	if testing.Short() {
		t.Skip("300 audits of 4 views each")
	}
	dir := t.TempDir()
	for _, mode := range []string{"raw", "bases"} {
		counts := map[string]int{}
		anyView := 0
		for i := range 300 {
			var key [32]byte
			key[0], key[1], key[2] = mode[0], byte(i), byte(i>>8)
			rng := rand.New(rand.NewChaCha8(key))
			var data []byte
			args := []string{"audit", "", "--format", "json", "-q", "--workers", "1"}
			if mode == "raw" {
				data = make([]byte, 4096)
				for j := range data {
					data[j] = byte(rng.Uint32())
				}
				args = append(args, "--raw")
			} else {
				data = make([]byte, 20000)
				for j := range data {
					data[j] = '0' + byte(rng.IntN(10))
				}
				args = append(args, "--bases", "3,7", "--from-base", "10")
			}
			path := filepath.Join(dir, "in")
			if err := os.WriteFile(path, data, 0o644); err != nil {
				t.Fatal(err)
			}
			args[1] = path
			code, out, errs := borel(t, "", args...)
			if code != 0 {
				t.Fatalf("%s %d: exit %d %s", mode, i, code, errs)
			}
			var doc struct {
				Inputs []struct{ Verdict string }
				Audits []struct{ Verdict string }
			}
			if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Inputs) != 1 {
				t.Fatalf("%s %d: %v, %d input verdicts", mode, i, err, len(doc.Inputs))
			}
			counts[doc.Inputs[0].Verdict]++
			for _, a := range doc.Audits {
				if a.Verdict != "consistent" {
					anyView++
					break
				}
			}
		}
		for _, v := range []string{"not consistent", "too uniform"} {
			if counts[v] > 10 {
				t.Errorf("%s: %d of 300 input verdicts %q, outside [0, 10]", mode, counts[v], v)
			}
		}
		t.Logf("%s: input verdicts %v; inputs with some view not consistent: %d", mode, counts, anyView)
	}
}
