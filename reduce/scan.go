package reduce

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/stat"

	"gtpack.example/gtpack/ingest"
)

// boresightToleranceDeg is the largest scan angle still taken as boresight.
const boresightToleranceDeg = 1.0

// ScanBehaviour returns the scan behaviour of a unit's beams (method.md
// section 8), or nil when there is no boresight beam (theta 0, or the
// smallest |theta| at most 1 deg) or no scanned beam to compare with it.
//
// Beams are compared only within one polarization: a scanned beam of one
// polarization says nothing about the boresight beam of another. The beams
// are grouped by Polarization; each group's boresight beam is its smallest
// |theta| (when at most 1 deg) and its scanned beams are those with
// 1 deg < |theta| < 90 deg. The group with the most scanned beams is kept
// (ties: the group whose boresight beam comes first in beams); Scan names
// its polarization and boresight beam. Other beams near boresight in the
// group (a second beam at theta 0) are left out.
//
// The frequency grid is the boresight beam's, restricted to the span that
// every beam of the group covers; scanned beams are interpolated onto it
// (piecewise linear in frequency on dB values). A beam whose grid is
// unusable (not strictly increasing, lengths that disagree, values not
// finite) is left out.
//
// Per frequency the scan exponent is the least-squares n of
// y = n*x, x = 10*log10(cos theta), y = G/T(theta) - G/T(0), over the
// scanned beams: n = sum(x*y)/sum(x^2). The same fit on gain is given
// beside it, when every beam has gain: where the two exponents differ, the
// noise temperature changes with scan. The scan law of the spec is the
// first limit with a ScanExponent.
func ScanBehaviour(beams []Beam, limits []ingest.Limit) *Scan {
	type group struct {
		pol       string
		boresight int
		scanned   []int
	}
	var groups []*group
	byPol := map[string]*group{}
	for i := range beams {
		p := beams[i].Polarization
		if byPol[p] == nil {
			g := &group{pol: p, boresight: -1}
			byPol[p] = g
			groups = append(groups, g)
		}
	}
	for _, g := range groups {
		best := math.Inf(1)
		for i := range beams {
			if beams[i].Polarization != g.pol || !scanBeamUsable(&beams[i]) {
				continue
			}
			th := math.Abs(beams[i].ThetaDeg)
			if th < best {
				best, g.boresight = th, i
			}
		}
		if g.boresight < 0 || best > boresightToleranceDeg {
			g.boresight = -1
			continue
		}
		for i := range beams {
			th := math.Abs(beams[i].ThetaDeg)
			if beams[i].Polarization == g.pol && i != g.boresight &&
				th > boresightToleranceDeg && th < 90 && scanBeamUsable(&beams[i]) {
				g.scanned = append(g.scanned, i)
			}
		}
	}
	var pick *group
	for _, g := range groups {
		if g.boresight < 0 || len(g.scanned) == 0 {
			continue
		}
		if pick == nil || len(g.scanned) > len(pick.scanned) ||
			(len(g.scanned) == len(pick.scanned) && g.boresight < pick.boresight) {
			pick = g
		}
	}
	if pick == nil {
		return nil
	}

	bore := &beams[pick.boresight]
	lo, hi := bore.FrequencyHz[0], bore.FrequencyHz[len(bore.FrequencyHz)-1]
	for _, i := range pick.scanned {
		f := beams[i].FrequencyHz
		lo = math.Max(lo, f[0])
		hi = math.Min(hi, f[len(f)-1])
	}
	var grid []int // indexes into the boresight grid
	for k, f := range bore.FrequencyHz {
		if f >= lo && f <= hi {
			grid = append(grid, k)
		}
	}
	if len(grid) == 0 {
		return nil
	}
	freq := make([]float64, len(grid))
	for j, k := range grid {
		freq[j] = bore.FrequencyHz[k]
	}

	withGain := scanHasGain(bore)
	for _, i := range pick.scanned {
		withGain = withGain && scanHasGain(&beams[i])
	}

	var law *float64
	for _, l := range limits {
		if l.ScanExponent != nil && !math.IsNaN(*l.ScanExponent) && !math.IsInf(*l.ScanExponent, 0) {
			n := *l.ScanExponent
			law = &n
			break
		}
	}

	order := append([]int(nil), pick.scanned...)
	sort.SliceStable(order, func(a, b int) bool {
		ta, tb := math.Abs(beams[order[a]].ThetaDeg), math.Abs(beams[order[b]].ThetaDeg)
		if ta != tb {
			return ta < tb
		}
		return beams[order[a]].ID < beams[order[b]].ID
	})

	s := &Scan{
		FrequencyHz:   freq,
		Polarization:  pick.pol,
		BoresightBeam: bore.ID,
		LawExponentN:  law,
	}
	sxy := make([]float64, len(freq))
	sxyGain := make([]float64, len(freq))
	sxx := 0.0
	for _, i := range order {
		b := &beams[i]
		x := 10 * math.Log10(math.Cos(b.ThetaDeg*math.Pi/180))
		sxx += x * x
		gt := resampleDB(b.FrequencyHz, b.GTdBPerK, freq)
		sb := ScanBeam{ID: b.ID, ThetaDeg: b.ThetaDeg, ScanLossDB: make([]float64, len(freq))}
		for j, k := range grid {
			y := gt[j] - bore.GTdBPerK[k]
			sb.ScanLossDB[j] = y
			sxy[j] += x * y
		}
		if withGain {
			g := resampleDB(b.FrequencyHz, b.GainDBi, freq)
			sb.GainLossDB = make([]float64, len(freq))
			for j, k := range grid {
				y := g[j] - bore.GainDBi[k]
				sb.GainLossDB[j] = y
				sxyGain[j] += x * y
			}
		}
		if law != nil {
			v := 10 * *law * math.Log10(math.Cos(b.ThetaDeg*math.Pi/180))
			sb.LawLossDB = &v
		}
		s.Beams = append(s.Beams, sb)
	}
	s.ExponentN = make([]float64, len(freq))
	for j := range freq {
		s.ExponentN[j] = sxy[j] / sxx
	}
	s.MeanExponentN = stat.Mean(s.ExponentN, nil)
	if withGain {
		s.GainExponentN = make([]float64, len(freq))
		for j := range freq {
			s.GainExponentN[j] = sxyGain[j] / sxx
		}
		s.MeanGainExponentN = stat.Mean(s.GainExponentN, nil)
	}
	return s
}

// scanBeamUsable reports whether a beam's G/T trace can be put on another
// grid: at least one point, strictly increasing finite frequencies, finite
// values, equal lengths.
func scanBeamUsable(b *Beam) bool {
	return diagTraceUsable(b.FrequencyHz, b.GTdBPerK) && !math.IsNaN(b.ThetaDeg) && !math.IsInf(b.ThetaDeg, 0)
}

func scanHasGain(b *Beam) bool {
	return diagTraceUsable(b.FrequencyHz, b.GainDBi)
}

// diagTraceUsable reports whether (xs, ys) is a trace resampleDB accepts.
func diagTraceUsable(xs, ys []float64) bool {
	if len(xs) == 0 || len(xs) != len(ys) {
		return false
	}
	for i, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(ys[i]) || math.IsInf(ys[i], 0) {
			return false
		}
		if i > 0 && !(x > xs[i-1]) {
			return false
		}
	}
	return true
}
