package reduce

import "testing"

// BenchmarkReduceUnit reduces one unit of 16 beams with 1,601 points each (pre and post
// reference measurements, one noise-density trace per beam). Target: under 5 ms per unit.
func BenchmarkReduceUnit(b *testing.B) {
	thetas := make([]float64, 16)
	for i := range thetas {
		thetas[i] = float64(i) * 4 // 0 to 60 deg
	}
	in := synthInput(synthOptions{points: 1601, thetas: thetas})
	u := ReduceUnit(in)
	if len(u.Beams) != 16 || len(u.Beams[15].GTdBPerK) != 1601 || len(u.Problems) != 0 {
		b.Fatalf("benchmark unit is not fully reduced: %d beams, problems:\n%s", len(u.Beams), problemText(u))
	}
	b.ReportAllocs()
	for b.Loop() {
		ReduceUnit(in)
	}
}
