package touchstone

import (
	"encoding/binary"
	"errors"
	"math"
	"math/big"
	"math/bits"
	"slices"
	"strconv"
	"sync"
)

// This file holds the numbers of the reader: decimal text to float64
// (ParseNumber, which the trace reader shares, and scan under it; scanLine
// and scanFast for the data lines), and the polar pairs of MA and DB data
// to complex numbers.

// ParseNumber reads text, a whole decimal number as measurement files
// write it (an optional sign, digits with an optional point, an optional
// exponent; no hex, inf, nan or digit separators), times 10^scale, with
// one rounding: the float64 nearest to the decimal, strconv.ParseFloat's
// value for the text with scale added to its exponent. So "10.7" at scale
// 9 is exactly the float64 nearest 10.7e9. The error is strconv.ErrSyntax
// for text of any other form, strconv.ErrRange for a value too large for
// a float64 (a value too small for one is zero).
func ParseNumber[T string | []byte](text T, scale int) (float64, error) {
	v, n, err := scan(text, scale)
	if err == nil && n != len(text) {
		err = strconv.ErrSyntax
	}
	return v, err
}

// spaceTab marks the ASCII white space that separates numbers.
var spaceTab = [256]bool{' ': true, '\t': true, '\r': true, '\n': true, '\v': true, '\f': true}

var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// scan reads the number at the start of b, up to the next white space, as
// ParseNumber does, and returns it with the length of the token.
//
// The digits make a whole number mant and the point and exponent a power
// of ten. The common case (mant below 2^53, the power up to 22) is
// computed directly: both are exact in a float64, so one multiplication
// or division rounds correctly (Clinger's fast path). Up to 19 digits
// otherwise go to the Eisel-Lemire algorithm, which rounds correctly or
// says it cannot; the rest (longer mantissas, those it cannot decide) to
// strconv.ParseFloat.
func scan[T string | []byte](b T, scale int) (v float64, n int, err error) {
	i := 0
	neg := false
	if len(b) > 0 && (b[0] == '+' || b[0] == '-') {
		neg = b[0] == '-'
		i++
	}
	// More than 19 digits may overflow mant; then strconv reads the token.
	var mant uint64
	nd, exp := 0, 0
	for ; i < len(b) && b[i]-'0' <= 9; i++ {
		mant = mant*10 + uint64(b[i]-'0')
		nd++
	}
	if i < len(b) && b[i] == '.' {
		for i++; i < len(b) && b[i]-'0' <= 9; i++ {
			mant = mant*10 + uint64(b[i]-'0')
			nd++
			exp--
		}
	}
	good := nd > 0
	mantEnd := i
	e := 0 // the written exponent, counted up to 10^8 at most
	if good && i < len(b) && (b[i] == 'e' || b[i] == 'E') {
		i++
		eneg := false
		if i < len(b) && (b[i] == '+' || b[i] == '-') {
			eneg = b[i] == '-'
			i++
		}
		ed := 0
		for ; i < len(b) && b[i]-'0' <= 9; i++ {
			if e < 1e8 {
				e = e*10 + int(b[i]-'0')
			}
			ed++
		}
		good = ed > 0
		if eneg {
			e = -e
		}
	}
	end := i
	for end < len(b) && !spaceTab[b[end]] {
		end++
	}
	if !good || end != i {
		return 0, end, strconv.ErrSyntax
	}
	exp += e + scale
	if nd <= 19 && mant <= 1<<53 && exp >= -22 && exp <= 22 {
		v = float64(mant)
		if exp > 0 {
			v *= pow10[exp]
		} else if exp < 0 {
			v /= pow10[-exp]
		}
		if neg {
			v = -v
		}
		return v, end, nil
	}
	if nd <= 19 {
		if v, ok := eiselLemire(mant, exp, neg); ok {
			return v, end, nil
		}
	}
	text := string(b[:end])
	if scale != 0 {
		if e > 100000 || e < -100000 {
			return 0, end, strconv.ErrRange
		}
		text = string(b[:mantEnd]) + "e" + strconv.Itoa(e+scale)
	}
	v, err = strconv.ParseFloat(text, 64)
	if err != nil && !(errors.Is(err, strconv.ErrRange) && v == 0) || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, end, strconv.ErrRange // too large for a float64 (underflow to zero is kept)
	}
	return v, end, nil
}

// parseNumber reads a whole token as a number.
func parseNumber(b []byte) (float64, bool) {
	v, err := ParseNumber(b, 0)
	return v, err == nil
}

// scanLine appends the numbers of a data line (which starts with a token)
// to dst. It stops at the first token that is not a number and returns its
// index on the line, or -1.
//
// scanFast reads the tokens of the form nearly every data file has; a
// token of another form is read by scan, and scanFast goes on after it.
// scanFast reads past the line's end, in the bytes after it that its
// buffer holds (a line in the read buffer has them): a line without them
// (near the end of the read buffer, or a long line) is copied first.
func scanLine(line []byte, dst []float64) ([]float64, int) {
	if cap(line)-len(line) < fastPad {
		line = append(make([]byte, 0, len(line)+fastPad), line...)
	}
	// A number takes at least two bytes (a digit and a space) but the last.
	dst = slices.Grow(dst, len(line)/2+1)
	base := len(dst)
	out := dst[base:cap(dst)]
	i, k := 0, 0
	for {
		if i, k = scanFast(line, i, out, k); i >= len(line) {
			return dst[:base+k], -1
		}
		v, n, err := scan(line[i:], 0)
		if err != nil {
			return dst[:base+k], k
		}
		out[k] = v
		k++
		for i += n; i < len(line) && spaceTab[line[i]]; i++ {
		}
	}
}

// fastPad is how many bytes after a line scanFast reads: the line's
// buffer must hold them (what they hold does not matter).
const fastPad = 64

// scanFast reads the numbers of b from index i on into out[k:] while they
// have the form of nearly every data file: [sign], up to 15 digits, a
// point and up to 24 digits or none (one digit at least, the mantissa
// below 10^19), an exponent of one to three digits or none, then white
// space or the line's end. It returns the index of the first token it did
// not read (len(b) at the end) and the new count in out, which it fills
// at most. It reads up to fastPad bytes after b, which b's capacity must
// hold, but a token that would go past b's end is left to the caller.
//
// It is scan made faster for the reader's inner loop (scan stays the
// reference, and the test holds the two to the same bits). Each token is
// read in a window of 64 bytes, so that the compiler checks bounds once a
// token rather than at every byte. The whole part goes byte by byte (on
// the regular layout of a data file the processor predicts where it ends;
// branch-free forms measured slower), the fraction in groups of eight
// bytes at known places (digitRun, digitsValue). The value is Clinger's
// or Eisel-Lemire's, as in scan.
func scanFast(b []byte, i int, out []float64, k int) (int, int) {
	n := len(b)
	bb := b[:n+fastPad]
	for i < n && k < len(out) {
		t := (*[64]byte)(bb[i : i+64])
		c := t[0]
		s := int(signTab[c] & 1)
		d := t[s] - '0'
		mant := uint64(d)
		q := s + 1 // the point, after a whole part of one digit
		if d > 9 {
			// No whole part: a point and a digit (".5"), or no number.
			if t[s] != '.' || t[s+1]-'0' > 9 {
				return i, k
			}
			mant, q = 0, s
		} else if d = t[q] - '0'; d <= 9 {
			mant = mant*10 + uint64(d)
			q++
			if d = t[q&3] - '0'; d <= 9 {
				mant = mant*10 + uint64(d)
				q++
				// More (frequencies in Hz): up to 15 digits.
				for q < 16 && t[q]-'0' <= 9 {
					mant = mant*10 + uint64(t[q]-'0')
					q++
				}
				if q == 16 {
					return i, k
				}
			}
		}
		q &= 15
		f := 0 // digits after the point
		if t[q] == '.' {
			// Up to three groups of eight bytes, written out: a loop over
			// them, or a function for a group (too large for Go to
			// inline), measured slower.
			q++
			w := binary.LittleEndian.Uint64(t[q : q+8])
			r := digitRun(w)
			if mant >= pow10u19[r] {
				return i, k
			}
			mant = mant*pow10u[r] + digitsValue(w, r)
			f = r
			if r == 8 {
				w = binary.LittleEndian.Uint64(t[q+8 : q+16])
				if r = digitRun(w); mant >= pow10u19[r] {
					return i, k
				}
				mant = mant*pow10u[r] + digitsValue(w, r)
				f += r
				if r == 8 {
					// Up to 8 more digits, while the mantissa stays below
					// 10^19 (the point's place does not matter: all digits
					// go into mant exactly).
					w = binary.LittleEndian.Uint64(t[q+16 : q+24])
					if r = digitRun(w); mant >= pow10u19[r] {
						return i, k
					}
					mant = mant*pow10u[r] + digitsValue(w, r)
					f += r
				}
			}
		}
		e := q + f // the token's end in t
		exp := -f
		if t[e&63]|0x20 == 'e' {
			// An exponent: [sign], one to three digits.
			j := e + 1
			eneg := t[j&63] == '-'
			j += int(signTab[t[j&63]] & 1)
			x, js := 0, j
			for j-js < 3 && t[j&63]-'0' <= 9 {
				x = x*10 + int(t[j&63]-'0')
				j++
			}
			if j == js {
				return i, k
			}
			if eneg {
				x = -x
			}
			exp += x
			e = j
		}
		if i+e > n || i+e < n && !spaceTab[t[e&63]] {
			return i, k
		}
		var v float64
		if mant <= 1<<53 && exp >= -22 && exp <= 22 {
			if exp < 0 {
				v = float64(mant) / pow10[-exp]
			} else {
				v = float64(mant) * pow10[exp]
			}
		} else {
			var ok bool
			if v, ok = eiselLemire(mant, exp, false); !ok {
				return i, k
			}
		}
		out[k] = math.Float64frombits(math.Float64bits(v) | negBit(c == '-'))
		k++
		for i += e; i < n && spaceTab[bb[i]]; i++ {
		}
	}
	return i, k
}

// digitRun is the number of leading ASCII digits among the eight bytes of
// w, read little-endian (the first byte is the lowest): 0 to 8. A byte
// below '0' borrows into its high bit, a byte above '9' carries into it;
// a borrow or carry spills only into the bytes after the first non-digit,
// which do not count.
func digitRun(w uint64) int {
	nd := ((w - 0x3030303030303030) | (w + 0x4646464646464646)) & 0x8080808080808080
	return bits.TrailingZeros64(nd) >> 3
}

// digitsValue is the value of the first r (0 to 8) bytes of w as decimal
// digits: they go to the top of the word, zero bytes (leading zeros)
// below them, and pairs, fours and eights of digits are combined by
// multiplication. The shift by 64 - 8r is made of two of 32 - 4r, each
// below 64, which the processor does without the checks that Go's rule
// for a shift by 64 or more (it leaves nothing, as r = 0 must) would add.
func digitsValue(w uint64, r int) uint64 {
	sh := uint(32-4*r) & 63
	w = w << sh << sh
	w = (w & 0x0F0F0F0F0F0F0F0F) * 2561 >> 8
	w = (w & 0x00FF00FF00FF00FF) * 6553601 >> 16
	return (w & 0x0000FFFF0000FFFF) * 42949672960001 >> 32
}

var pow10u = [9]uint64{1, 10, 100, 1000, 10000, 100000, 1000000, 10000000, 100000000}

// pow10u19[r] is 10^(19-r): a mantissa below it takes r more digits and
// stays below 10^19.
var pow10u19 = [9]uint64{1e19, 1e18, 1e17, 1e16, 1e15, 1e14, 1e13, 1e12, 1e11}

// signTab is 1 for the sign characters.
var signTab = [256]uint8{'+': 1, '-': 1}

// negBit is the sign bit of a float64 when neg, else 0.
func negBit(neg bool) uint64 {
	var b uint64
	if neg {
		b = 1 << 63
	}
	return b
}

// The Eisel-Lemire algorithm turns a decimal mantissa (up to 19 digits) and
// power of ten into the correctly rounded float64, or reports that it
// cannot decide (then strconv.ParseFloat, which runs the same algorithm
// after parsing the text again, and a slower fallback, decides). It is what
// makes numbers printed with 17 significant digits fast. After D. Lemire,
// "Number parsing at a gigabyte per second", Software: Practice and
// Experience 51 (2021), and the Go standard library's strconv.

const powMin, powMax = -100, 50

var (
	powOnce sync.Once
	// powTab[q-powMin] holds the 128 most significant bits of 10^q,
	// normalised so that the top bit is set, rounded down: {low, high}.
	powTab [powMax - powMin + 1][2]uint64
)

func powInit() {
	one := big.NewInt(1)
	for q := powMin; q <= powMax; q++ {
		p := new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(abs(q))), nil)
		var m *big.Int
		if q >= 0 {
			if l := p.BitLen(); l <= 128 {
				m = p.Lsh(p, uint(128-l))
			} else {
				m = p.Rsh(p, uint(l-128))
			}
		} else {
			// floor(2^(127+L) / 10^-q), L the bit length of 10^-q: in
			// [2^127, 2^128) since 10^-q is not a power of two.
			num := new(big.Int).Lsh(one, uint(127+p.BitLen()))
			m = num.Quo(num, p)
		}
		lo := new(big.Int).And(m, new(big.Int).SetUint64(math.MaxUint64))
		hi := new(big.Int).Rsh(m, 64)
		powTab[q-powMin] = [2]uint64{lo.Uint64(), hi.Uint64()}
	}
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

func eiselLemire(man uint64, exp10 int, neg bool) (float64, bool) {
	if man == 0 {
		if neg {
			return math.Copysign(0, -1), true
		}
		return 0, true
	}
	if exp10 < powMin || exp10 > powMax {
		return 0, false
	}
	powOnce.Do(powInit)
	pow := powTab[exp10-powMin]
	// Normalisation.
	clz := bits.LeadingZeros64(man)
	man <<= uint(clz)
	const bias = 1023
	retExp2 := uint64(217706*exp10>>16+64+bias) - uint64(clz)
	// Multiplication.
	xHi, xLo := bits.Mul64(man, pow[1])
	// Wider approximation.
	if xHi&0x1FF == 0x1FF && xLo+man < man {
		yHi, yLo := bits.Mul64(man, pow[0])
		mergedHi, mergedLo := xHi, xLo+yHi
		if mergedLo < xLo {
			mergedHi++
		}
		if mergedHi&0x1FF == 0x1FF && mergedLo+1 == 0 && yLo+man < man {
			return 0, false
		}
		xHi, xLo = mergedHi, mergedLo
	}
	// Shifting to 54 bits.
	msb := xHi >> 63
	retMantissa := xHi >> (msb + 9)
	retExp2 -= 1 ^ msb
	// Half-way ambiguity.
	if xLo == 0 && xHi&0x1FF == 0 && retMantissa&3 == 1 {
		return 0, false
	}
	// From 54 to 53 bits.
	retMantissa += retMantissa & 1
	retMantissa >>= 1
	if retMantissa>>53 > 0 {
		retMantissa >>= 1
		retExp2++
	}
	// Subnormal, infinite or NaN results are left to strconv.
	if retExp2-1 >= 0x7FF-1 {
		return 0, false
	}
	retBits := retExp2<<52 | retMantissa&(1<<52-1)
	if neg {
		retBits |= 1 << 63
	}
	return math.Float64frombits(retBits), true
}

// polarPairs sets m[p] to the complex number of magnitude vals[2p] at the
// angle vals[2p+1] degrees, for each p: the pairs of an MA record, or of
// a DB record with db set (the magnitude is then 10^(vals[2p]/20)). It
// returns -1, or the first pair whose magnitude in dB is too large for a
// float64 (m is then set only before it).
func polarPairs(m []complex128, vals []float64, db bool) int {
	for p := range m {
		mag, deg := vals[2*p], vals[2*p+1]
		if db {
			if mag = math.Pow(10, mag/20); math.IsInf(mag, 0) {
				return p
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
	return -1
}
