package expand

import (
	"bytes"
	"sync"
	"testing"
)

// A computation reports its phases in order, each fraction in [0, 1] and
// never decreasing within a phase; the series and the digits reach 1 (their
// work is counted exactly: binary splitting's nodes against splitCost, the
// conversion's leaves against the digit count). The digits are the same
// with and without a meter.
func TestMeterPhases(t *testing.T) {
	saved := meterInterval
	defer func() { meterInterval = saved }()
	meterInterval = 0
	for _, name := range []string{"pi", "ln2", "e", "sqrt2"} {
		src, err := ParseSource(name)
		if err != nil {
			t.Fatal(err)
		}
		var mu sync.Mutex
		var phases []string
		last := map[string]float64{}
		metered := src.WithMeter(func(phase string, done float64) {
			mu.Lock()
			defer mu.Unlock()
			if len(phases) == 0 || phases[len(phases)-1] != phase {
				phases = append(phases, phase)
				last[phase] = 0
			}
			if done < last[phase] || done < 0 || done > 1 {
				t.Errorf("%s %s: fraction %g after %g", name, phase, done, last[phase])
			}
			last[phase] = done
		})
		got, err := metered.Digits(100_000, 0, 10)
		if err != nil {
			t.Fatal(err)
		}
		want, _ := src.Digits(100_000, 0, 10)
		if !bytes.Equal(got, want) {
			t.Errorf("%s: the meter changed the digits", name)
		}
		if phases[len(phases)-1] != "digit check" || phases[len(phases)-2] != "digits" || last["digits"] != 1 {
			t.Errorf("%s: phases %v, digits reached %g", name, phases, last["digits"])
		}
		if name != "sqrt2" && (phases[0] != "series" || last["series"] != 1) {
			t.Errorf("%s: phases %v, series reached %g", name, phases, last["series"])
		}
		t.Logf("%s: %v", name, phases)
	}
}
