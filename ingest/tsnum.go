package ingest

import (
	"math"
)

// This file holds the numbers of the Touchstone reader: the numbers of a
// data line, and the polar-to-rectangular conversion of MA and DB data.
// The numbers are exactly those of strconv.ParseFloat (the tests check
// that bit for bit).

// tsDigits reads the run of ASCII digits that starts at b[i] into mant
// (each digit multiplies mant by ten and adds itself) and returns mant and
// the index after the run. More than 19 digits overflow mant: callers
// count the digits and give up then.
func tsDigits(b []byte, i int, mant uint64) (uint64, int) {
	for i < len(b) && b[i]-'0' <= 9 {
		mant = mant*10 + uint64(b[i]-'0')
		i++
	}
	return mant, i
}

// tsScanLine appends the numbers of a line (which starts with a token) to
// dst. It stops at the first token that is not a number and returns its
// index, or -1.
func tsScanLine(b []byte, dst []float64) ([]float64, int) {
	i := 0
	for i < len(b) {
		v, n, ok := tsScan(b[i:])
		if !ok {
			return dst, len(dst)
		}
		dst = append(dst, v)
		for i += n; i < len(b) && tsSpaceTab[b[i]]; i++ {
		}
	}
	return dst, -1
}

// tsExp10DB is 10^(db/20), the linear magnitude of a value in dB.
func tsExp10DB(db float64) float64 {
	return math.Pow(10, db/20)
}

// tsPolarPairs sets m[p] to the complex number of magnitude vals[2p] at
// the angle vals[2p+1] degrees, for each p: the pairs of an MA record, or
// of a DB record with db set (the magnitude is then tsExp10DB of the first
// of each pair). It reports false when a magnitude in dB is too large for
// a float64; m is then not all set.
func tsPolarPairs(m []complex128, vals []float64, db bool) bool {
	vals = vals[:2*len(m)]
	for p := range m {
		mag, deg := vals[2*p], vals[2*p+1]
		if db {
			if mag = tsExp10DB(mag); mag > math.MaxFloat64 {
				return false
			}
		}
		if math.Abs(deg) > 180 {
			// Whole turns go exactly in degrees, so that an angle of
			// many turns loses nothing in its conversion to radians.
			deg = math.Remainder(deg, 360)
		}
		s, c := math.Sincos(deg * (math.Pi / 180))
		m[p] = complex(mag*c, mag*s)
	}
	return true
}
