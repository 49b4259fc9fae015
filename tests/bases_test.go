package tests

import (
	"bytes"
	"encoding/json"
	"strconv"
	"strings"
	"testing"
)

type acrossReport struct {
	Audits []struct {
		Base    int      `json:"base"`
		Digits  int64    `json:"digits"`
		Verdict string   `json:"verdict"`
		Notes   []string `json:"notes"`
		Source  struct {
			Format string `json:"format"`
		} `json:"source"`
	} `json:"audits"`
}

func across(t *testing.T, stdin []byte, args ...string) acrossReport {
	t.Helper()
	code, out, errs := runBorel(t, stdin, append(args, "--format", "json", "-q")...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	var r acrossReport
	if err := json.Unmarshal(out, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

// α_{2,3} is 2-normal (Bailey & Crandall 2002) and provably not 6-normal
// (Bailey & Borwein 2012): its first 3·10^5 base-6 digits must be "not
// consistent". In base 2 its overlapping blocks fit too well ("too uniform");
// bases 3 and 10 show nothing at this length (computed with scipy 1.10 / mpmath 1.2, exact integers).
func TestStonehamAcrossBases(t *testing.T) {
	r := across(t, nil, "audit", "--source", "stoneham:2,3", "--count", "300000", "--bases", "2,3,6,10")
	want := map[int]string{2: "too uniform", 3: "consistent", 6: "not consistent", 10: "consistent"}
	for _, a := range r.Audits {
		if a.Verdict != want[a.Base] || a.Digits != 300000 {
			t.Errorf("base %d: %q on %d digits, want %q", a.Base, a.Verdict, a.Digits, want[a.Base])
		}
	}
	if len(r.Audits) != 4 {
		t.Fatalf("%d audits", len(r.Audits))
	}
}

// π across bases: consistent in each; bases 2 and 16 are noted as powers of 2.
func TestPiAcrossBases(t *testing.T) {
	r := across(t, nil, "audit", "--source", "pi", "--count", "100000", "--bases", "2,3,7,10,16")
	for _, a := range r.Audits {
		if a.Verdict != "consistent" {
			t.Errorf("pi in base %d: %q", a.Base, a.Verdict)
		}
		if (a.Base == 2 || a.Base == 16) && !strings.Contains(strings.Join(a.Notes, " "), "powers of 2") {
			t.Errorf("base %d: no note that 2 and 16 are powers of 2", a.Base)
		}
	}
}

// A decimal file re-expanded exactly into other bases: the digit counts are
// what rebase determines, and rebase agrees with digits.
func TestFileAcrossBasesAndRebase(t *testing.T) {
	in := smallInput(t) // "3." and 20 000 decimals of π
	r := across(t, in, "audit", "-", "--from-base", "10", "--bases", "3,10")
	if len(r.Audits) != 2 || r.Audits[1].Digits != 20000 || r.Audits[0].Digits < 41900 || r.Audits[0].Digits > 41921 {
		t.Errorf("audits %+v", r.Audits)
	}
	code, rebased, errs := runBorel(t, in, "rebase", "--from", "10", "--to", "3", "-")
	if code != 0 || !strings.Contains(string(errs), "20000 base-10 digits determine") {
		t.Fatalf("rebase: exit %d %s", code, errs)
	}
	int3, frac3, _ := strings.Cut(strings.TrimSpace(string(rebased)), ".")
	if int3 != "10" { // 3 = 10 in base 3
		t.Errorf("integer part in base 3: %q", int3)
	}
	_, direct, _ := runBorel(t, nil, "digits", "pi", "--base", "3", "--count", "41900", "-q")
	if !strings.HasPrefix(frac3, strings.TrimSpace(string(direct))[:41000]) {
		t.Errorf("rebase and digits disagree")
	}
	// Round trip 10 → 3 → 10 recovers a prefix of the decimals.
	_, back, _ := runBorel(t, rebased, "rebase", "--from", "3", "--to", "10", "-", "-q")
	b := strings.TrimSpace(string(back))
	if !strings.HasPrefix(string(in), b) || len(b) < 2+19990 {
		t.Errorf("round trip kept %d characters", len(b))
	}
}

// The pipeline of issue 3's "done": digits in base 7 straight into an audit.
func TestDigitsIntoAudit(t *testing.T) {
	code, digits, errs := runBorel(t, nil, "digits", "pi", "--base", "7", "--count", "100000")
	if code != 0 || !strings.Contains(string(errs), "100000 digits of pi in base 7") || len(digits) != 100001 {
		t.Fatalf("digits: exit %d, %d bytes, %s", code, len(digits), errs)
	}
	code, out, errs := runBorel(t, digits, "audit", "--base", "7", "-")
	if code != 0 || !bytes.Contains(out, []byte("in base 7: CONSISTENT")) {
		t.Errorf("audit: exit %d %s", code, errs)
	}
}

// Raw bytes are audited as bits, bit pairs, nibbles and bytes by default;
// a defect visible only in bits (a stuck low bit) is seen there.
func TestRawRegroupings(t *testing.T) {
	data := make([]byte, 200_000)
	for i := range data {
		data[i] = byte(uint64(i)*2654435761>>7) | 1 // low bit always 1
	}
	r := across(t, data, "audit", "-", "--raw")
	if len(r.Audits) != 4 {
		t.Fatalf("%d audits, want 4", len(r.Audits))
	}
	formats := []string{}
	for _, a := range r.Audits {
		formats = append(formats, a.Source.Format)
		if a.Verdict != "not consistent" {
			t.Errorf("base %d: %q", a.Base, a.Verdict)
		}
	}
	if strings.Join(formats, ",") != "bits,bit pairs,nibbles,bytes" {
		t.Errorf("formats %v", formats)
	}
}

func TestBasesErrors(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"audit", "-", "--raw", "--bases", "2,10"}, "a byte stream regroups exactly into bases 2, 4, 16 and 256"},
		{[]string{"audit", "--source", "pi", "--bases", "2,3", "--null", "0.5,0.5"}, "a frequency vector fixes one base"},
		{[]string{"audit", "--source", "tau"}, `unknown source "tau"`},
		{[]string{"audit", "--source", "pi", "somefile"}, "give no input file"},
		{[]string{"digits", "pi", "--count", "2000000000"}, "of memory, over the bound of"},
		{[]string{"audit", "--source", "e", "--count", "2000000000"}, "of memory, over the bound of"},
		{[]string{"compare", "pi", "--count", "2000000000"}, "of memory, over the bound of"},
		{[]string{"digits", "pi"}, "digits needs --count N, the number of digits"},
		{[]string{"digits", "stoneham:2,4", "--count", "5"}, "coprime"},
		{[]string{"rebase", "--from", "10"}, "rebase needs --from and --to"},
		{[]string{"rebase", "--from", "10", "--to", "40"}, "--to: --base 40 is outside 2..36"},
	}
	for _, c := range cases {
		code, _, errs := runBorel(t, []byte("0123456789"), c.args...)
		if code != 2 || !strings.Contains(string(errs), c.want) {
			t.Errorf("%v: exit %d %q, want 2 and %q", c.args, code, errs, c.want)
		}
	}
}

// --checks runs only the named checks, with the same values as in the full
// battery, and refuses unknown names.
func TestChecksSelection(t *testing.T) {
	in := smallInput(t)
	full := decode(t, func() []byte { _, out, _ := runBorel(t, in, "audit", "-", "--format", "json"); return out }())
	code, out, errs := runBorel(t, in, "audit", "-", "--checks", "freq,gap", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	sel := decode(t, out)
	want := map[string]float64{}
	for _, f := range full.Audits[0].Findings {
		if f.Check == "freq" || f.Check == "gap" {
			want[f.Check+" "+f.Statistic+" "+strings.TrimSpace(fmtParams(f.Params))] = f.Value
		}
	}
	if len(sel.Audits[0].Findings) != len(want) {
		t.Fatalf("%d findings with --checks freq,gap, want %d", len(sel.Audits[0].Findings), len(want))
	}
	for _, f := range sel.Audits[0].Findings {
		if v, ok := want[f.Check+" "+f.Statistic+" "+strings.TrimSpace(fmtParams(f.Params))]; !ok || v != f.Value {
			t.Errorf("%s %s: %v, in the full battery %v", f.Check, f.Statistic, f.Value, v)
		}
	}
	if code, _, errs := runBorel(t, in, "audit", "-", "--checks", "frequency"); code != 2 || !strings.Contains(string(errs), `unknown check "frequency"; the checks are freq, blocks`) {
		t.Errorf("unknown check: exit %d %s", code, errs)
	}
}

func fmtParams(p map[string]int) string {
	s := ""
	for _, k := range []string{"k", "digit", "class"} {
		if v, ok := p[k]; ok {
			s += " " + k + "=" + strconv.Itoa(v)
		}
	}
	return s
}
