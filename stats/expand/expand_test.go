package expand

import (
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
