package reduce

import (
	"encoding/json"
	"math"
	"testing"

	"gtpack.example/gtpack/ingest"
)

// arrayOf makes a rows x cols array (indexes from first) with the phase
// phase(r, c) and amplitude 0 dB.
func arrayOf(rows, cols, first int, phase func(r, c int) float64) []ingest.Element {
	var els []ingest.Element
	for r := range rows {
		for c := range cols {
			els = append(els, ingest.Element{Row: r + first, Col: c + first, PhaseDeg: phase(r, c)})
		}
	}
	return els
}

// checker is +1/-1 in a checkerboard: on an even-sized grid it sums to zero
// against 1, row and col, so a least-squares plane does not absorb it and
// the residual rms is exactly its amplitude.
func checker(r, c int) float64 {
	if (r+c)%2 == 0 {
		return 1
	}
	return -1
}

func TestElementsRuzeLoss(t *testing.T) {
	// Ruze (J. Ruze, Proc. IEEE 54, 1966): loss = 10*log10(exp(-sigma^2)) =
	// -4.3429*sigma^2 dB, sigma in radians. By hand:
	//   sigma = 10 deg = 0.174533 rad, sigma^2 = 0.0304617, loss = -0.132294 dB
	//   sigma =  5 deg = 0.087266 rad, sigma^2 = 0.0076154, loss = -0.033073 dB
	//   sigma = 20 deg = 0.349066 rad, sigma^2 = 0.1218470, loss = -0.529175 dB
	cases := []struct{ sigmaDeg, lossDB float64 }{
		{10, -0.132294},
		{5, -0.033073},
		{20, -0.529175},
	}
	for _, c := range cases {
		// A plane (offset 30, 12 deg per row, -7 deg per column) plus a
		// checkerboard of +-sigma: the residual rms is sigma.
		els := arrayOf(6, 8, 0, func(r, col int) float64 {
			return 30 + 12*float64(r) - 7*float64(col) + c.sigmaDeg*checker(r, col)
		})
		st := AnalyseElements(els, nil)
		if math.Abs(st.RMSResidualDeg-c.sigmaDeg) > 1e-9 {
			t.Errorf("sigma %g: rms residual = %.12f", c.sigmaDeg, st.RMSResidualDeg)
		}
		if math.Abs(st.PhaseLossDB-c.lossDB) > 1e-6 {
			t.Errorf("sigma %g: Ruze loss = %.6f dB, want %.6f", c.sigmaDeg, st.PhaseLossDB, c.lossDB)
		}
		if math.Abs(st.RowSlopeDeg-12) > 1e-9 || math.Abs(st.ColSlopeDeg+7) > 1e-9 {
			t.Errorf("sigma %g: plane slopes %g, %g; want 12, -7", c.sigmaDeg, st.RowSlopeDeg, st.ColSlopeDeg)
		}
		if st.Flagged {
			t.Errorf("sigma %g: flagged without a tolerance", c.sigmaDeg)
		}
	}
}

func TestElementsSingleSpike(t *testing.T) {
	// A 3x3 array on a plane with the centre element 45 deg off. Least
	// squares (worked by hand): the centre has zero leverage on the slopes
	// (centred coordinates), so the plane's offset rises by 45/9 = 5 deg;
	// residuals are 40 deg at the centre and -5 deg at the eight others;
	// rms = sqrt((40^2 + 8*5^2)/9) = sqrt(1800/9) = sqrt(200) = 14.142136 deg.
	els := arrayOf(3, 3, 1, func(r, c int) float64 {
		v := -20 + 33*float64(r) + 51*float64(c)
		if r == 1 && c == 1 {
			v += 45
		}
		return v
	})
	st := AnalyseElements(els, nil)
	if math.Abs(st.RMSResidualDeg-math.Sqrt(200)) > 1e-9 {
		t.Errorf("rms = %.9f, want %.9f", st.RMSResidualDeg, math.Sqrt(200))
	}
	if len(st.Worst) != 5 {
		t.Fatalf("%d worst elements, want 5", len(st.Worst))
	}
	w := st.Worst[0]
	if w.Row != 2 || w.Col != 2 || math.Abs(w.ResidualDeg-40) > 1e-9 {
		t.Errorf("worst = %+v, want row 2 col 2 residual 40", w)
	}
	// Ties at -5 deg are listed by row, then column (1-based indexes here).
	if st.Worst[1].Row != 1 || st.Worst[1].Col != 1 || math.Abs(st.Worst[1].ResidualDeg+5) > 1e-9 {
		t.Errorf("second worst = %+v, want row 1 col 1 residual -5", st.Worst[1])
	}
	if st.Rows != 3 || st.Cols != 3 || st.FirstRow != 1 || st.FirstCol != 1 {
		t.Errorf("grid %dx%d from (%d,%d)", st.Rows, st.Cols, st.FirstRow, st.FirstCol)
	}
	if math.Abs(st.ResidualPhaseDeg[1][1]-40) > 1e-9 || !st.Present[1][1] {
		t.Errorf("heat map centre = %g present %v", st.ResidualPhaseDeg[1][1], st.Present[1][1])
	}
	// Tolerance: rms 14.14 deg exceeds 10 but not 15.
	for _, c := range []struct {
		tol  float64
		flag bool
	}{{10, true}, {15, false}} {
		tol := c.tol
		if got := AnalyseElements(els, &tol).Flagged; got != c.flag {
			t.Errorf("tolerance %g: flagged %v, want %v", tol, got, c.flag)
		}
	}
}

func TestElementsSteeredWrapping(t *testing.T) {
	// A steered array whose phase gradient wraps through +-180 deg many
	// times (general knowledge: a linear phase progression is the steering
	// of a uniform array; the file stores it wrapped). The plane must come
	// out exact and the residual near zero; with a checkerboard of +-6 deg
	// on top, the rms must be 6 deg.
	cases := []struct {
		name       string
		row, col   float64 // steering step per row and per column, deg
		perturbDeg float64
	}{
		{"steep both ways", 100, 65, 0},
		{"near 180 per row", 170, -35, 0},
		{"negative steps", -140, -95, 0},
		{"with checkerboard", 100, 65, 6},
	}
	for _, c := range cases {
		els := arrayOf(8, 8, 0, func(r, col int) float64 {
			return wrapDeg(17 + c.row*float64(r) + c.col*float64(col) + c.perturbDeg*checker(r, col))
		})
		st := AnalyseElements(els, nil)
		if math.Abs(st.RMSResidualDeg-c.perturbDeg) > 1e-9 {
			t.Errorf("%s: rms = %.12f, want %g", c.name, st.RMSResidualDeg, c.perturbDeg)
		}
		if math.Abs(st.RowSlopeDeg-c.row) > 1e-9 || math.Abs(st.ColSlopeDeg-c.col) > 1e-9 {
			t.Errorf("%s: slopes %g, %g; want %g, %g", c.name, st.RowSlopeDeg, st.ColSlopeDeg, c.row, c.col)
		}
	}
}

func TestElementsTaper(t *testing.T) {
	// eta = |sum a|^2 / (N*sum a^2), a = 10^(dB/20) (standard array theory):
	//  - uniform (every element -3 dB): eta = 1, loss 0 dB;
	//  - two levels, a = 1, 1, 0.5, 0.5 (0, 0, -6.0206, -6.0206 dB):
	//    sum a = 3, sum a^2 = 2.5, eta = 9/(4*2.5) = 0.9, loss = 10*log10(0.9) = -0.457575 dB;
	//  - 1-D triangle 1, 2, 1 (0, 6.0206, 0 dB): sum a = 4, sum a^2 = 6,
	//    eta = 16/18 = 0.888889, loss = -0.511525 dB.
	half := 20 * math.Log10(0.5)
	two := 20 * math.Log10(2)
	cases := []struct {
		name   string
		ampsDB []float64
		eta    float64
		lossDB float64
	}{
		{"uniform", []float64{-3, -3, -3, -3, -3, -3}, 1, 0},
		{"two levels", []float64{0, 0, half, half}, 0.9, -0.457575},
		{"triangle", []float64{0, two, 0}, 16.0 / 18, -0.511525},
	}
	for _, c := range cases {
		var els []ingest.Element
		for i, a := range c.ampsDB {
			els = append(els, ingest.Element{Row: 0, Col: i, AmplitudeDB: a, PhaseDeg: 10})
		}
		st := AnalyseElements(els, nil)
		if math.Abs(st.TaperEfficiency-c.eta) > 1e-12 {
			t.Errorf("%s: eta = %.12f, want %.12f", c.name, st.TaperEfficiency, c.eta)
		}
		if math.Abs(st.TaperLossDB-c.lossDB) > 1e-6 {
			t.Errorf("%s: taper loss = %.6f, want %.6f", c.name, st.TaperLossDB, c.lossDB)
		}
		if st.RMSResidualDeg > 1e-9 {
			t.Errorf("%s: rms %g on a flat phase", c.name, st.RMSResidualDeg)
		}
	}
}

func TestElementsOddInput(t *testing.T) {
	if AnalyseElements(nil, nil) != nil {
		t.Error("no elements: want nil")
	}
	nan := []ingest.Element{{Row: 0, Col: 0, PhaseDeg: math.NaN()}}
	if AnalyseElements(nan, nil) != nil {
		t.Error("only a NaN element: want nil")
	}
	one := AnalyseElements([]ingest.Element{{Row: 4, Col: 7, PhaseDeg: 123}}, nil)
	if one == nil || one.RMSResidualDeg != 0 || one.Elements != 1 || one.Rows != 1 || one.Cols != 1 {
		t.Errorf("one element: %+v", one)
	}
	// A duplicate position: the first one counts. A missing element leaves
	// a hole in the Present mask.
	els := arrayOf(2, 2, 0, func(r, c int) float64 { return 5 })
	els = append(els[:3], ingest.Element{Row: 0, Col: 0, PhaseDeg: 90})
	st := AnalyseElements(els, nil)
	if st.Elements != 3 || st.RMSResidualDeg > 1e-9 || st.Present[1][1] || !st.Present[0][0] {
		t.Errorf("duplicate/missing: %+v", st)
	}
	// Far-flung indexes: no heat map, but the statistics are still there.
	far := []ingest.Element{{Row: 0, Col: 0}, {Row: 1 << 30, Col: 1 << 30, PhaseDeg: 10}, {Row: 0, Col: 1, PhaseDeg: 3}}
	st = AnalyseElements(far, nil)
	if st.Rows != 0 || st.Cols != 0 || len(st.ResidualPhaseDeg) != 0 || st.Elements != 3 {
		t.Errorf("far-flung: rows %d cols %d elements %d", st.Rows, st.Cols, st.Elements)
	}
}

// FuzzAnalyseElements checks that any element table gives an analysis that
// does not panic and encodes as JSON (no NaN or infinity).
func FuzzAnalyseElements(f *testing.F) {
	f.Add([]byte{0, 0, 10, 20, 0, 1, 200, 100, 1, 0, 5, 250})
	f.Fuzz(func(t *testing.T, data []byte) {
		var els []ingest.Element
		for i := 0; i+3 < len(data); i += 4 {
			els = append(els, ingest.Element{
				Row:         int(int8(data[i])),
				Col:         int(int8(data[i+1])),
				AmplitudeDB: float64(int8(data[i+2])),
				PhaseDeg:    float64(data[i+3]) * 7.3,
			})
		}
		tol := 5.0
		st := AnalyseElements(els, &tol)
		if st == nil {
			if len(els) > 0 {
				t.Fatal("nil analysis of finite elements")
			}
			return
		}
		if _, err := json.Marshal(st); err != nil {
			t.Fatalf("not encodable: %v", err)
		}
		if st.RMSResidualDeg < 0 || st.RMSResidualDeg > 180 || st.TaperEfficiency <= 0 || st.TaperEfficiency > 1+1e-12 {
			t.Fatalf("out of range: rms %g eta %g", st.RMSResidualDeg, st.TaperEfficiency)
		}
	})
}

// BenchmarkAnalyseElements is a 64 x 64 steered array.
func BenchmarkAnalyseElements(b *testing.B) {
	els := arrayOf(64, 64, 1, func(r, c int) float64 {
		return wrapDeg(100*float64(r) + 65*float64(c) + 3*checker(r, c))
	})
	for b.Loop() {
		AnalyseElements(els, nil)
	}
}
