package stats

import (
	"math"
	"sort"
)

// HolmLog returns Holm's (1979) step-down adjusted p-values, in natural logs,
// for the natural-log p-values logP (same order as the input):
//
//	p̃_(i) = max_{j ≤ i} min(1, (m - j + 1) p_(j)),   p_(1) ≤ … ≤ p_(m).
//
// Rejecting every hypothesis with p̃ ≤ α controls the family-wise error rate at
// α under any dependence between the tests, which is why borel uses it for
// verdicts. Conventions match R's p.adjust(method = "holm").
// Reference: Holm, Scand. J. Statist. 6 (1979) 65–70.
func HolmLog(logP []float64) []float64 {
	m := len(logP)
	order := sortedOrder(logP)
	adj := make([]float64, m)
	running := math.Inf(-1)
	for rank, i := range order {
		v := math.Min(0, logP[i]+math.Log(float64(m-rank)))
		running = math.Max(running, v)
		adj[i] = running
	}
	return adj
}

// BHLog returns Benjamini–Hochberg (1995) step-up adjusted p-values in natural
// logs:
//
//	p̃_(i) = min_{j ≥ i} min(1, m p_(j) / j).
//
// It controls the false discovery rate under independence or positive
// regression dependence; borel offers it for exploratory ranking, not for
// verdicts. Conventions match R's p.adjust(method = "BH").
// Reference: Benjamini & Hochberg, JRSS B 57 (1995) 289–300.
func BHLog(logP []float64) []float64 {
	m := len(logP)
	order := sortedOrder(logP)
	adj := make([]float64, m)
	running := 0.0
	for rank := m - 1; rank >= 0; rank-- {
		i := order[rank]
		v := math.Min(0, logP[i]+math.Log(float64(m))-math.Log(float64(rank+1)))
		running = math.Min(running, v)
		adj[i] = running
	}
	return adj
}

// sortedOrder returns the indices of x in ascending order of value (stable,
// so ties keep input order).
func sortedOrder(x []float64) []int {
	idx := make([]int, len(x))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return x[idx[a]] < x[idx[b]] })
	return idx
}
