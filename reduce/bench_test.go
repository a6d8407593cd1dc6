package reduce

import (
	"testing"

	"gtpack.example/gtpack/ingest"
)

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

// BenchmarkReducePhysics is the part of BenchmarkReduceUnit this file's package owns alone:
// range loss, the 16 beams (grid, gain, G/T, noise statistics, budgets) and the limits,
// without the scan and element diagnostics.
func BenchmarkReducePhysics(b *testing.B) {
	thetas := make([]float64, 16)
	for i := range thetas {
		thetas[i] = float64(i) * 4
	}
	in := synthInput(synthOptions{points: 1601, thetas: thetas})
	gain, gt := stationTerms(in.Station, func(*ingest.Problem) {})
	b.ReportAllocs()
	for b.Loop() {
		rl, _, _ := ComputeRangeLoss(in.Reference, in.Data.RangePre, in.Data.RangePost)
		ctx := &beamContext{run: in.Run, rl: rl, referenceK: 2, haveStation: true, receiverMatch: 0.03,
			methodTolDB: 0.3, stationGain: gain, stationGT: gt, ambientK: 295.95, ambientOK: true}
		beams := make([]Beam, len(in.Run.Beams))
		for i := range beams {
			beams[i], _ = reduceBeam(ctx, &in.Run.Beams[i], &in.Data.Beams[i])
		}
		res, _ := EvaluateLimits(in.Spec, beams)
		if len(res) != 16 {
			b.Fatalf("%d limit results, want 16", len(res))
		}
	}
}
