package ingest

import (
	"encoding/binary"
	"math"
	"math/bits"
	"slices"
)

// This file holds the inner loops of the Touchstone reader: numbers of a
// data line, and the polar-to-rectangular conversion of MA and DB data.
// Both give exactly the values of the straightforward forms they replace
// (strconv.ParseFloat, math.Sincos); the tests check that bit for bit.

// tsEightDigits reads b[i:i+8] as eight decimal digits, if they are eight
// ASCII digits. The check and the conversion work on all eight bytes at
// once: a byte is a digit when its high nibble is 3 and adding 6 keeps it
// so; pairs, fours and eights of digits are then combined by
// multiplication.
func tsEightDigits(b []byte, i int) (uint64, bool) {
	w := binary.LittleEndian.Uint64(b[i:])
	if w&0xF0F0F0F0F0F0F0F0 != 0x3030303030303030 || (w+0x0606060606060606)&0xF0F0F0F0F0F0F0F0 != 0x3030303030303030 {
		return 0, false
	}
	w = (w & 0x0F0F0F0F0F0F0F0F) * 2561 >> 8
	w = (w & 0x00FF00FF00FF00FF) * 6553601 >> 16
	w = (w & 0x0000FFFF0000FFFF) * 42949672960001 >> 32
	return w, true
}

// tsDigitRun is the number of leading ASCII digits among the eight bytes
// of w, read little-endian (the first byte is the lowest): 0 to 8. A byte
// below '0' borrows into its high bit, a byte above '9' carries into it;
// a borrow or carry spills only into the bytes after the first non-digit,
// which do not count.
func tsDigitRun(w uint64) int {
	nd := ((w - 0x3030303030303030) | (w + 0x4646464646464646)) & 0x8080808080808080
	return bits.TrailingZeros64(nd) >> 3
}

// tsDigitsValue is the value of the first r (0 to 8) bytes of w as decimal
// digits: they go to the top of the word, zero bytes (leading zeros)
// below them (a shift by 64 leaves nothing), and are combined as in
// tsEightDigits.
func tsDigitsValue(w uint64, r int) uint64 {
	w <<= 64 - 8*uint(r)
	w = (w & 0x0F0F0F0F0F0F0F0F) * 2561 >> 8
	w = (w & 0x00FF00FF00FF00FF) * 6553601 >> 16
	return (w & 0x0000FFFF0000FFFF) * 42949672960001 >> 32
}

var tsPow10u = [9]uint64{1, 10, 100, 1000, 10000, 100000, 1000000, 10000000, 100000000}

// tsDigits reads the run of ASCII digits that starts at b[i] into mant
// (each digit multiplies mant by ten and adds itself) and returns mant and
// the index after the run. Fraction parts, often 6 to 17 digits long, go
// eight digits at a time while they last. More than 19 digits overflow
// mant: callers count the digits and give up then.
func tsDigits(b []byte, i int, mant uint64) (uint64, int) {
	for i+8 <= len(b) {
		w, ok := tsEightDigits(b, i)
		if !ok {
			break
		}
		mant = mant*100000000 + w
		i += 8
	}
	for i < len(b) && b[i]-'0' <= 9 {
		mant = mant*10 + uint64(b[i]-'0')
		i++
	}
	return mant, i
}

// tsSignTab is 1 for the sign characters.
var tsSignTab = [256]uint8{'+': 1, '-': 1}

// tsNegBit is the sign bit of a float64 when neg, else 0.
func tsNegBit(neg bool) uint64 {
	var b uint64
	if neg {
		b = 1 << 63
	}
	return b
}

// tsSigDigits is the number of significant digits of a token of nd digits
// that starts at b[s] (digits and at most one point): nd less its leading
// zeros. Only tokens of more than 19 digits ask.
func tsSigDigits(b []byte, s, nd int) int {
	for i := s; i < len(b) && (b[i] == '0' || b[i] == '.'); i++ {
		if b[i] == '0' {
			nd--
		}
	}
	return nd
}

// tsScanLine appends the numbers of a line (which starts with a token) to
// dst. It stops at the first token that is not a number and returns its
// index, or -1.
//
// tsScanRun reads the common forms; the tokens it leaves are finished here
// (Eisel-Lemire for long mantissas, tsScan for everything else), and
// tsScanRun goes on after them.
func tsScanLine(b []byte, dst []float64) ([]float64, int) {
	// A number takes at least two bytes (a digit and a space) but the last.
	dst = slices.Grow(dst, len(b)/2+1)
	base := len(dst)
	out := dst[base:cap(dst)]
	i, k := 0, 0
	for {
		var tok tsToken
		i, k, tok = tsScanRun(b, i, out, k)
		if i >= len(b) {
			return dst[:base+k], -1
		}
		v, ok := 0.0, false
		end := tok.end
		if tok.form {
			v, ok = tsEiselLemire(tok.mant, tok.exp, tok.neg)
		}
		if !ok {
			var n int
			if v, n, ok = tsScan(b[i:]); !ok {
				return dst[:base+k], base + k
			}
			end = i + n
		}
		out[k] = v
		k++
		for i = end; i < len(b) && tsSpaceTab[b[i]]; i++ {
		}
	}
}

// tsToken is what tsScanRun read of a token that it did not finish: form
// tells that it has the common form, with its digits in mant (at most 19
// significant), its power of ten and sign, and ends at end.
type tsToken struct {
	mant uint64
	exp  int
	neg  bool
	form bool
	end  int
}

// tsScanRun reads the numbers of b from index i on into out[k:] while they
// have the common form, [sign]digits[.digits][e[sign]digits] followed by
// white space or the end, and Clinger's fast path decides their value (a
// mantissa below 2^53, a power of ten up to 22). It returns the index of
// the first token it did not finish (len(b) at the end), the new count in
// out, and what it read of that token. out has room for every number.
//
// The loop calls nothing, so that the compiler keeps its state in
// registers. Its digit loops are mostly plain on purpose: on the regular
// layout of a data file the processor predicts where the digits of a
// token end and runs ahead, while computing that end from eight bytes at
// once makes every number wait for the one before it (measured slower for
// the whole part and the first digits of the fraction). Only the last,
// up to seven, digits of a fraction are taken in one step, as their count
// is what varies most from number to number.
func tsScanRun(b []byte, i int, out []float64, k int) (int, int, tsToken) {
	for i < len(b) {
		// The sign without a branch: signs in a data file are as good as
		// random, and a mispredicted branch costs more than this.
		c := b[i]
		neg := c == '-'
		j := i + int(tsSignTab[c])
		s := j
		var mant uint64
		for j < len(b) && b[j]-'0' <= 9 {
			mant = mant*10 + uint64(b[j]-'0')
			j++
		}
		nd, exp := j-s, 0
		if j < len(b) && b[j] == '.' {
			j++
			fs := j
			for j+8 <= len(b) {
				w, ok := tsEightDigits(b, j)
				if !ok {
					break
				}
				mant = mant*100000000 + w
				j += 8
			}
			if j+8 <= len(b) {
				// The rest, up to seven digits, in one step: their count
				// varies from number to number, and a loop over them
				// would often mispredict its end.
				w := binary.LittleEndian.Uint64(b[j:])
				r := tsDigitRun(w)
				mant = mant*tsPow10u[r] + tsDigitsValue(w, r)
				j += r
			} else {
				for j < len(b) && b[j]-'0' <= 9 {
					mant = mant*10 + uint64(b[j]-'0')
					j++
				}
			}
			nd += j - fs
			exp = fs - j
		}
		if j < len(b) && !tsSpaceTab[b[j]] {
			// An exponent, e or E, [sign], one to three digits, then
			// the end or white space; anything else is not a number of
			// this form.
			if b[j]|0x20 != 'e' {
				return i, k, tsToken{}
			}
			j++
			eneg := false
			if j < len(b) && (b[j] == '+' || b[j] == '-') {
				eneg = b[j] == '-'
				j++
			}
			e, es := 0, j
			for j < len(b) && b[j]-'0' <= 9 && j-es < 4 {
				e = e*10 + int(b[j]-'0')
				j++
			}
			if j == es || j-es == 4 || j < len(b) && !tsSpaceTab[b[j]] {
				return i, k, tsToken{}
			}
			if eneg {
				e = -e
			}
			exp += e
		}
		if nd == 0 || nd > 19 && tsSigDigits(b, s, nd) > 19 {
			return i, k, tsToken{}
		}
		if mant > 1<<53 || exp < -22 || exp > 22 {
			return i, k, tsToken{mant: mant, exp: exp, neg: neg, form: true, end: j}
		}
		// Clinger's fast path, as in tsScan; the sign as a bit (negation
		// flips it).
		v := float64(mant)
		if exp > 0 {
			v *= tsPow10[exp]
		} else if exp < 0 {
			v /= tsPow10[-exp]
		}
		out[k] = math.Float64frombits(math.Float64bits(v) | tsNegBit(neg))
		k++
		for i = j; i < len(b) && tsSpaceTab[b[i]]; i++ {
		}
	}
	return i, k, tsToken{}
}

// Coefficients of the sine and cosine polynomials on [-Pi/4, Pi/4], those
// of the Go standard library's math package (from the Cephes library).
var (
	tsSinCoef = [6]float64{
		1.58962301576546568060e-10, // 0x3de5d8fd1fd19ccd
		-2.50507477628578072866e-8, // 0xbe5ae5e5a9291f5d
		2.75573136213857245213e-6,  // 0x3ec71de3567d48a1
		-1.98412698295895385996e-4, // 0xbf2a01a019bfdf03
		8.33333333332211858878e-3,  // 0x3f8111111110f7d0
		-1.66666666666666307295e-1, // 0xbfc5555555555548
	}
	tsCosCoef = [6]float64{
		-1.13585365213876817300e-11, // 0xbda8fa49a0861a9b
		2.08757008419747316778e-9,   // 0x3e21ee9d7b4e3f05
		-2.75573141792967388112e-7,  // 0xbe927e4f7eac4bc6
		2.48015872888517045348e-5,   // 0x3efa01a019c844f5
		-1.38888888888730564116e-3,  // 0xbf56c16c16c14f91
		4.16666666666665929218e-2,   // 0x3fa555555555554b
	}
)

// tsPolar is mag at angle deg (degrees): mag (cos + j sin) of deg*Pi/180.
//
// It is math.Sincos's own computation (Cody-Waite reduction by Pi/4 in
// three parts, the same polynomials, the same order of operations, so the
// same bits), written without the branches that depend on the octant:
// angles in a file are spread over the circle, so those branches are
// mispredicted about half the time, and cost more than the arithmetic.
// Zero, very large angles (2^29 radians and beyond, where math.Sincos
// reduces differently) and anything not finite go to math.Sincos itself.
func tsPolar(mag, deg float64) complex128 {
	const (
		pi4a = 7.85398125648498535156e-1  // 0x3fe921fb40000000, Pi/4 split into three parts
		pi4b = 3.77489470793079817668e-8  // 0x3e64442d00000000,
		pi4c = 2.69515142907905952645e-15 // 0x3ce8469898cc5170,
	)
	x := deg * (math.Pi / 180)
	ax := math.Abs(x)
	if x == 0 || !(ax < 1<<29) {
		s, c := math.Sincos(x)
		return complex(mag*c, mag*s)
	}
	// Conversions through int64, cheaper in Go than through uint64, give
	// the same numbers below 2^29.
	j := int64(ax * (4 / math.Pi))
	j += j & 1 // map zeros to origin
	y := float64(j)
	z := ((ax - y*pi4a) - y*pi4b) - y*pi4c
	zz := z * z
	cos := 1.0 - 0.5*zz + zz*zz*((((((tsCosCoef[0]*zz)+tsCosCoef[1])*zz+tsCosCoef[2])*zz+tsCosCoef[3])*zz+tsCosCoef[4])*zz+tsCosCoef[5])
	sin := z + z*zz*((((((tsSinCoef[0]*zz)+tsSinCoef[1])*zz+tsSinCoef[2])*zz+tsSinCoef[3])*zz+tsSinCoef[4])*zz+tsSinCoef[5])
	// j is even: octants 0, 2, 4, 6. Octants 4 and 6 negate both; octants
	// 2 and 6 swap sine and cosine and negate the (new) cosine.
	o := uint64(j) & 7
	half := o >> 2       // octant 4 or 6
	swap := (o >> 1) & 1 // octant 2 or 6
	sb, cb := math.Float64bits(sin), math.Float64bits(cos)
	d := (sb ^ cb) & -swap // all ones when swapping
	sb ^= d
	cb ^= d
	sb ^= half<<63 ^ math.Float64bits(x)&(1<<63)
	cb ^= (half ^ swap) << 63
	return complex(mag*math.Float64frombits(cb), mag*math.Float64frombits(sb))
}
