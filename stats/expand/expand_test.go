package expand

import (
	"compress/gzip"
	"io"
	"os"
	"strings"
	"testing"
)

func str(d []byte) string {
	var b strings.Builder
	for _, x := range d {
		b.WriteByte('0' + x)
	}
	return b.String()
}

// First 50 decimals after the point, from python3-mpmath 1.2.1 at 80 digits
// (nstr(x, 70)); the same expansions are OEIS A000796 (π), A001113 (e),
// A002193 (√2) and A002194 (√3).
func TestKnownExpansions(t *testing.T) {
	cases := []struct {
		name string
		f    func(int) ([]byte, error)
		want string
	}{
		{"pi", Pi, "14159265358979323846264338327950288419716939937510"},
		{"e", E, "71828182845904523536028747135266249775724709369995"},
		{"sqrt2", func(n int) ([]byte, error) { return Sqrt(2, n) }, "41421356237309504880168872420969807856967187537694"},
		{"sqrt3", func(n int) ([]byte, error) { return Sqrt(3, n) }, "73205080756887729352744634150587236694280525381038"},
	}
	for _, c := range cases {
		d, err := c.f(50)
		if err != nil || str(d) != c.want {
			t.Errorf("%s: %s (%v), want %s", c.name, str(d), err, c.want)
		}
	}
}

// The first 20 000 decimals of π agree with testdata/pi-1e6.txt.gz
// (python3-mpmath 1.2.1; see testdata/README.md).
func TestPiAgainstMpmath(t *testing.T) {
	f, err := os.Open("../../testdata/pi-1e6.txt.gz")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	z, err := gzip.NewReader(f)
	if err != nil {
		t.Fatal(err)
	}
	head := make([]byte, 2+20000)
	if _, err := io.ReadFull(z, head); err != nil {
		t.Fatal(err)
	}
	d, err := Pi(20000)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := str(d), string(head[2:]); got != want {
		for i := range got {
			if got[i] != want[i] {
				t.Fatalf("decimal %d differs: %c vs %c", i+1, got[i], want[i])
			}
		}
	}
}

func TestSqrtRejects(t *testing.T) {
	if _, err := Sqrt(16, 10); err == nil {
		t.Error("sqrt of a perfect square accepted")
	}
	if _, err := Sqrt(0, 10); err == nil {
		t.Error("sqrt 0 accepted")
	}
	if _, err := Pi(MaxDigits + 1); err == nil {
		t.Error("oversized request accepted")
	}
}

// Champernowne's constant: 0.1234567891011121314… (OEIS A033307) in base 10,
// and 0.1 10 11 100 101 110 111… in base 2.
func TestChampernowne(t *testing.T) {
	if got := str(Champernowne(20, 10)); got != "12345678910111213141" {
		t.Errorf("base 10: %s", got)
	}
	if got := str(Champernowne(17, 2)); got != "11011100101110111" {
		t.Errorf("base 2: %s", got)
	}
}
