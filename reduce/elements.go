package reduce

import (
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"

	"gtpack.example/gtpack/ingest"
)

// elementWorstCount is how many elements furthest from the fitted plane the
// analysis lists.
const elementWorstCount = 5

// AnalyseElements analyses an array's element state (method.md section 9):
//
//   - the best-fit plane a + b*row + c*col (the steering gradient) is
//     removed from the phases, and the residuals, wrapped to (-180, 180]
//     around the plane, give the rms phase error sigma; the predicted gain
//     loss is 10*log10(exp(-sigma^2)) = -4.343*sigma^2 dB, sigma in radians
//     (J. Ruze, Proc. IEEE 54, 1966). sigma is the rms over the N elements
//     (no degrees-of-freedom correction: Ruze's sigma is the spread of the
//     errors, and N is large);
//   - the amplitude taper efficiency |sum a|^2/(N*sum a^2), a the linear
//     (voltage) amplitudes 10^(dB/20), and its loss 10*log10(eta) dB
//     (floored at -300 dB);
//   - the five elements furthest from the plane, and the residuals as a
//     Rows x Cols heat map with a Present mask. The heat map is left out
//     (Rows = Cols = 0) when the rows and columns span more than
//     max(4096, 16*N) cells, so that a few far-flung indexes cannot make a
//     huge matrix.
//
// The phase plane is fitted in two steps so that a steering gradient that
// wraps through +-180 deg is handled. First, on the complex phasors
// exp(j*phase): the gradient per row is the argument of the sum of
// z(r+1,c)*conj(z(r,c)) over neighbouring pairs (likewise per column), and
// the offset the argument of the sum of the de-steered phasors; this is
// blind to wrapping as long as the true step between neighbours is below
// 180 deg. Then the residuals around that plane, wrapped to (-180, 180],
// are fitted by least squares to a + b*row + c*col (gonum mat) and the
// correction added, twice; the result is the least-squares plane of the
// unwrapped phases. Without neighbouring pairs the first step estimates no
// gradient and the least-squares step alone fits the plane.
//
// Elements whose amplitude or phase is not finite are left out, and a
// second element at the same (row, col) is ignored. Flagged is true when
// toleranceDeg is set and the rms residual exceeds it. nil when no element
// is usable.
func AnalyseElements(els []ingest.Element, toleranceDeg *float64) *ElementState {
	type pos struct{ r, c int }
	seen := map[pos]bool{}
	var use []ingest.Element
	for _, e := range els {
		p := pos{e.Row, e.Col}
		if seen[p] || !projFinite(e.AmplitudeDB) || !projFinite(e.PhaseDeg) {
			continue
		}
		seen[p] = true
		use = append(use, e)
	}
	n := len(use)
	if n == 0 {
		return nil
	}
	minR, maxR, minC, maxC := use[0].Row, use[0].Row, use[0].Col, use[0].Col
	for _, e := range use {
		minR, maxR = min(minR, e.Row), max(maxR, e.Row)
		minC, maxC = min(minC, e.Col), max(maxC, e.Col)
	}
	rows := make([]float64, n)
	cols := make([]float64, n)
	phase := make([]float64, n)
	idx := make(map[pos]int, n)
	for i, e := range use {
		rows[i] = float64(e.Row - minR)
		cols[i] = float64(e.Col - minC)
		phase[i] = e.PhaseDeg
		idx[pos{e.Row, e.Col}] = i
	}

	// Step 1: phasor estimate of the plane.
	var sr, sc complex128
	for i, e := range use {
		zi := cmplx.Rect(1, phase[i]*math.Pi/180)
		if j, ok := idx[pos{e.Row + 1, e.Col}]; ok {
			sr += cmplx.Rect(1, phase[j]*math.Pi/180) * cmplx.Conj(zi)
		}
		if j, ok := idx[pos{e.Row, e.Col + 1}]; ok {
			sc += cmplx.Rect(1, phase[j]*math.Pi/180) * cmplx.Conj(zi)
		}
	}
	var plane [3]float64 // offset, per row, per column; degrees
	if sr != 0 {
		plane[1] = cmplx.Phase(sr) * 180 / math.Pi
	}
	if sc != 0 {
		plane[2] = cmplx.Phase(sc) * 180 / math.Pi
	}
	var s0 complex128
	for i := range use {
		s0 += cmplx.Rect(1, (phase[i]-plane[1]*rows[i]-plane[2]*cols[i])*math.Pi/180)
	}
	if s0 != 0 {
		plane[0] = cmplx.Phase(s0) * 180 / math.Pi
	}

	// Step 2: least-squares refinement on the wrapped residuals.
	residual := func() []float64 {
		r := make([]float64, n)
		for i := range r {
			r[i] = wrapDeg(phase[i] - plane[0] - plane[1]*rows[i] - plane[2]*cols[i])
		}
		return r
	}
	for range 2 {
		d := planeFit(rows, cols, residual())
		for k := range plane {
			plane[k] += d[k]
		}
	}
	res := residual()

	st := &ElementState{
		Elements:         n,
		FirstRow:         minR,
		FirstCol:         minC,
		RowSlopeDeg:      wrapDeg(plane[1]),
		ColSlopeDeg:      wrapDeg(plane[2]),
		ToleranceDeg:     toleranceDeg,
		Worst:            []ElementOutlier{},
		ResidualPhaseDeg: [][]float64{},
		Present:          [][]bool{},
	}
	ss := 0.0
	for _, r := range res {
		ss += r * r
	}
	st.RMSResidualDeg = math.Sqrt(ss / float64(n))
	sigma := st.RMSResidualDeg * math.Pi / 180
	st.PhaseLossDB = -10 / math.Ln10 * sigma * sigma

	sumA, sumA2 := 0.0, 0.0
	for _, e := range use {
		a := math.Pow(10, e.AmplitudeDB/20)
		sumA += a
		sumA2 += a * a
	}
	if sumA2 > 0 && !math.IsInf(sumA2, 0) {
		st.TaperEfficiency = sumA * sumA / (float64(n) * sumA2)
	}
	st.TaperLossDB = 10 * math.Log10(math.Max(st.TaperEfficiency, 1e-30))

	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	sort.Slice(order, func(a, b int) bool {
		ra, rb := math.Abs(res[order[a]]), math.Abs(res[order[b]])
		if ra != rb {
			return ra > rb
		}
		if use[order[a]].Row != use[order[b]].Row {
			return use[order[a]].Row < use[order[b]].Row
		}
		return use[order[a]].Col < use[order[b]].Col
	})
	for _, i := range order[:min(elementWorstCount, n)] {
		st.Worst = append(st.Worst, ElementOutlier{Row: use[i].Row, Col: use[i].Col, ResidualDeg: res[i]})
	}

	nr, nc := maxR-minR+1, maxC-minC+1
	if cells := float64(nr) * float64(nc); cells <= math.Max(4096, 16*float64(n)) {
		st.Rows, st.Cols = nr, nc
		st.ResidualPhaseDeg = make([][]float64, nr)
		st.Present = make([][]bool, nr)
		for r := range nr {
			st.ResidualPhaseDeg[r] = make([]float64, nc)
			st.Present[r] = make([]bool, nc)
		}
		for i, e := range use {
			st.ResidualPhaseDeg[e.Row-minR][e.Col-minC] = res[i]
			st.Present[e.Row-minR][e.Col-minC] = true
		}
	}
	st.Flagged = toleranceDeg != nil && st.RMSResidualDeg > *toleranceDeg
	return st
}

// planeFit returns the least-squares (a, b, c) of y = a + b*row + c*col.
// A coordinate that does not vary is left out of the fit (its slope 0);
// when the system cannot be solved, the result is zero.
func planeFit(rows, cols, y []float64) [3]float64 {
	var out [3]float64
	n := len(y)
	varies := func(x []float64) bool {
		for _, v := range x {
			if v != x[0] {
				return true
			}
		}
		return false
	}
	terms := []int{0}
	if varies(rows) {
		terms = append(terms, 1)
	}
	if varies(cols) {
		terms = append(terms, 2)
	}
	if n < len(terms) {
		return out
	}
	a := mat.NewDense(n, len(terms), nil)
	for i := range n {
		for j, t := range terms {
			switch t {
			case 0:
				a.Set(i, j, 1)
			case 1:
				a.Set(i, j, rows[i])
			case 2:
				a.Set(i, j, cols[i])
			}
		}
	}
	var x mat.VecDense
	if err := x.SolveVec(a, mat.NewVecDense(n, append([]float64(nil), y...))); err != nil {
		return out
	}
	for j, t := range terms {
		if v := x.AtVec(j); projFinite(v) {
			out[t] = v
		}
	}
	return out
}

// wrapDeg wraps an angle in degrees to (-180, 180].
func wrapDeg(x float64) float64 {
	w := math.Mod(x, 360)
	if w <= -180 {
		w += 360
	} else if w > 180 {
		w -= 360
	}
	return w
}
