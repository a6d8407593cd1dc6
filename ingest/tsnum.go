package ingest

import (
	"encoding/binary"
	"math"
	"math/bits"
	"slices"
)

// This file holds the inner loops of the Touchstone reader: numbers of a
// data line, and the polar-to-rectangular conversion of MA and DB data.
// The numbers are exactly those of strconv.ParseFloat (the tests check
// that bit for bit). The conversion of a record's pairs (tsPolarPairs,
// tsExp10DB) reduces angles exactly in degrees and comes within an ulp of
// the exact values, which the tests measure against math/big. The noise
// block's reflection coefficient goes through the same conversion.

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
// below them, and are combined as in tsEightDigits. The shift by
// 64 - 8r is made of two of 32 - 4r, each below 64, which the processor
// does without the checks that Go's rule for a shift by 64 or more (it
// leaves nothing, as r = 0 must) would add.
func tsDigitsValue(w uint64, r int) uint64 {
	sh := uint(32-4*r) & 63
	w = w << sh << sh
	w = (w & 0x0F0F0F0F0F0F0F0F) * 2561 >> 8
	w = (w & 0x00FF00FF00FF00FF) * 6553601 >> 16
	return (w & 0x0000FFFF0000FFFF) * 42949672960001 >> 32
}

var tsPow10u = [9]uint64{1, 10, 100, 1000, 10000, 100000, 1000000, 10000000, 100000000}

// tsPow10u19[r] is 10^(19-r): a mantissa below it takes r more digits
// and stays below 10^19.
var tsPow10u19 = [9]uint64{1e19, 1e18, 1e17, 1e16, 1e15, 1e14, 1e13, 1e12, 1e11}

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

// tsScanLine appends the numbers of a line (which starts with a token) to
// dst. It stops at the first token that is not a number and returns its
// index, or -1.
//
// tsScanFast reads the form of nearly every data file; a token of another
// form (a mantissa of more than 19 digits, an exponent of four digits, ...)
// is read by tsScan, and tsScanFast goes on after it. tsScanFast reads
// past the line's end, in the bytes after it that its buffer holds: a line
// without them (near the end of the read buffer) is copied first.
func tsScanLine(b []byte, dst []float64) ([]float64, int) {
	if cap(b)-len(b) < tsFastPad {
		b = append(make([]byte, 0, len(b)+tsFastPad), b...)
	}
	// A number takes at least two bytes (a digit and a space) but the last.
	dst = slices.Grow(dst, len(b)/2+1)
	base := len(dst)
	out := dst[base:cap(dst)]
	i, k := 0, 0
	for {
		if i, k = tsScanFast(b, i, out, k); i >= len(b) {
			return dst[:base+k], -1
		}
		v, n, ok := tsScan(b[i:])
		if !ok {
			return dst[:base+k], base + k
		}
		out[k] = v
		k++
		for i += n; i < len(b) && tsSpaceTab[b[i]]; i++ {
		}
	}
}

// tsFastPad is how many bytes after a line tsScanFast reads: the line's
// buffer must hold them (what they hold does not matter).
const tsFastPad = 64

// tsScanFast reads the numbers of b from index i on into out[k:] while
// they have the form of nearly every data file: [sign], up to 15 digits,
// a point and up to 24 digits or none (one digit at least, the mantissa
// below 10^19), an exponent of one to three digits or none, then white
// space or the line's end. It returns the index of the first token it did
// not read (len(b) at the end) and the new count in out, which it fills at
// most. It stops at a line feed too. It reads up to tsFastPad bytes after
// b, which b's capacity must hold, but a token that would go past b's end
// is left to the caller.
//
// Each token is read in a window of 64 bytes, so that the compiler checks
// bounds once a token rather than at every byte: the whole part byte by
// byte (on the regular layout of a data file the processor predicts where
// it ends; branch-free forms measured slower, see DEVELOPERS.md), the
// fraction in groups of eight bytes at known places. This took 11 to 22 %
// less time than the scanner before it on the benchmark files' lines. The
// value is Clinger's (a mantissa up to 2^53, and a power of ten up to
// 10^22) or Eisel-Lemire's, each exact as strconv's.
func tsScanFast(b []byte, i int, out []float64, k int) (int, int) {
	n := len(b)
	bb := b[:n+tsFastPad]
	for i < n && k < len(out) {
		t := (*[64]byte)(bb[i : i+64])
		c := t[0]
		s := int(tsSignTab[c] & 1)
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
			// Up to three groups of eight bytes, written out: a loop
			// over them, or a function for a group (too large for Go to
			// inline), measured 10 to 40 % slower on the scan.
			q++
			w := binary.LittleEndian.Uint64(t[q : q+8])
			r := tsDigitRun(w)
			if mant >= tsPow10u19[r] {
				return i, k
			}
			mant = mant*tsPow10u[r] + tsDigitsValue(w, r)
			f = r
			if r == 8 {
				w = binary.LittleEndian.Uint64(t[q+8 : q+16])
				if r = tsDigitRun(w); mant >= tsPow10u19[r] {
					return i, k
				}
				mant = mant*tsPow10u[r] + tsDigitsValue(w, r)
				f += r
				if r == 8 {
					// Up to 8 more digits, while the mantissa stays below
					// 10^19 (the point's place does not matter: all digits
					// go into mant exactly).
					w = binary.LittleEndian.Uint64(t[q+16 : q+24])
					if r = tsDigitRun(w); mant >= tsPow10u19[r] {
						return i, k
					}
					mant = mant*tsPow10u[r] + tsDigitsValue(w, r)
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
			j += int(tsSignTab[t[j&63]] & 1)
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
		if i+e > n || i+e < n && !tsSpaceTab[t[e&63]] {
			return i, k
		}
		var v float64
		if mant <= 1<<53 && exp >= -22 && exp <= 22 {
			if exp < 0 {
				v = float64(mant) / tsPow10[-exp]
			} else {
				v = float64(mant) * tsPow10[exp]
			}
		} else {
			var ok bool
			if v, ok = tsEiselLemire(mant, exp, false); !ok {
				return i, k
			}
		}
		out[k] = math.Float64frombits(math.Float64bits(v) | tsNegBit(c == '-'))
		k++
		// White space but a line feed: at one, which is not a number
		// either, a read of whole buffers (plainLines) learns that the
		// line ended.
		for i += e; i < n && tsBlankTab[bb[i]]; i++ {
		}
	}
	return i, k
}

// tsExp10DB is 10^(db/20), the linear magnitude of a value in dB, to about
// half an ulp: db times log2(10)/20 in two parts (the product's rounding
// error kept with a fused multiply-add), 2^x split into 2^(k/64) from a
// table of values and their rounding errors, 2^r for |r| <= 1/128 by a
// polynomial (Taylor series of exp(r ln 2), the first neglected term below
// 2^-60), and a power of two. A single math.Exp of db*ln(10)/20 loses up
// to 45 ulps in the rounding of its argument over -300..+100 dB (the
// test measures it). Beyond 2^1020 either way (about 6140 dB) it is
// math.Exp's, which handles overflow, underflow and what is not finite.
func tsExp10DB(db float64) float64 {
	x := db * tsExpKHi
	if !(math.Abs(x) < 1020) {
		return math.Exp(db * (math.Ln10 / 20))
	}
	e := math.FMA(db, tsExpKHi, -x) + db*tsExpKLo // x + e is db*log2(10)/20
	kd := (x*64 + tsRound) - tsRound              // x*64 to the nearest integer
	k := int64(kd)
	r := (x - kd*(1.0/64)) + e // the subtraction is exact
	// 2^r - 1, the terms grouped to shorten the chain of operations.
	r2 := r * r
	p := r*(tsExpC1+r*tsExpC2) + r2*r*((tsExpC3+r*tsExpC4)+r2*(tsExpC5+r*tsExpC6))
	t := &tsExp2Tab[k&63]
	y := t[0] + (t[0]*p + t[1])
	return y * math.Float64frombits(uint64(k>>6+1023)<<52)
}

// The constants of tsExp10DB.
const (
	tsExpKHi = 0x1.542a5a12e1c5bp-03  // log2(10)/20 rounded to a float64
	tsExpKLo = -0x1.33e2bb36cd142p-57 // log2(10)/20 - tsExpKHi
	tsRound  = 0x1.8p52               // adding it rounds to an integer
	tsExpC1  = math.Ln2               // Taylor series of 2^r - 1
	tsExpC2  = math.Ln2 * math.Ln2 / 2
	tsExpC3  = math.Ln2 * math.Ln2 * math.Ln2 / 6
	tsExpC4  = math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 / 24
	tsExpC5  = math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 / 120
	tsExpC6  = math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 / 720
)

// tsExp2Tab[j] is 2^(j/64) as the float64 nearest to it and the
// difference to the exact value (computed with math/big; the test checks
// them).
var tsExp2Tab = [64][2]float64{
	{0x1p+00, 0x0p+00},
	{0x1.02c9a3e778061p+00, -0x1.19083535b085dp-56},
	{0x1.059b0d3158574p+00, 0x1.d73e2a475b465p-55},
	{0x1.0874518759bc8p+00, 0x1.186be4bb284ffp-57},
	{0x1.0b5586cf9890fp+00, 0x1.8a62e4adc610bp-54},
	{0x1.0e3ec32d3d1a2p+00, 0x1.03a1727c57b53p-59},
	{0x1.11301d0125b51p+00, -0x1.6c51039449b3ap-54},
	{0x1.1429aaea92dep+00, -0x1.32fbf9af1369ep-54},
	{0x1.172b83c7d517bp+00, -0x1.19041b9d78a76p-55},
	{0x1.1a35beb6fcb75p+00, 0x1.e5b4c7b4968e4p-55},
	{0x1.1d4873168b9aap+00, 0x1.e016e00a2643cp-54},
	{0x1.2063b88628cd6p+00, 0x1.dc775814a8495p-55},
	{0x1.2387a6e756238p+00, 0x1.9b07eb6c70573p-54},
	{0x1.26b4565e27cddp+00, 0x1.2bd339940e9d9p-55},
	{0x1.29e9df51fdee1p+00, 0x1.612e8afad1255p-55},
	{0x1.2d285a6e4030bp+00, 0x1.0024754db41d5p-54},
	{0x1.306fe0a31b715p+00, 0x1.6f46ad23182e4p-55},
	{0x1.33c08b26416ffp+00, 0x1.32721843659a6p-54},
	{0x1.371a7373aa9cbp+00, -0x1.63aeabf42eae2p-54},
	{0x1.3a7db34e59ff7p+00, -0x1.5e436d661f5e3p-56},
	{0x1.3dea64c123422p+00, 0x1.ada0911f09ebcp-55},
	{0x1.4160a21f72e2ap+00, -0x1.ef3691c309278p-58},
	{0x1.44e086061892dp+00, 0x1.89b7a04ef80dp-59},
	{0x1.486a2b5c13cdp+00, 0x1.3c1a3b69062fp-56},
	{0x1.4bfdad5362a27p+00, 0x1.d4397afec42e2p-56},
	{0x1.4f9b2769d2ca7p+00, -0x1.4b309d25957e3p-54},
	{0x1.5342b569d4f82p+00, -0x1.07abe1db13cadp-55},
	{0x1.56f4736b527dap+00, 0x1.9bb2c011d93adp-54},
	{0x1.5ab07dd485429p+00, 0x1.6324c054647adp-54},
	{0x1.5e76f15ad2148p+00, 0x1.ba6f93080e65ep-54},
	{0x1.6247eb03a5585p+00, -0x1.383c17e40b497p-54},
	{0x1.6623882552225p+00, -0x1.bb60987591c34p-54},
	{0x1.6a09e667f3bcdp+00, -0x1.bdd3413b26456p-54},
	{0x1.6dfb23c651a2fp+00, -0x1.bbe3a683c88abp-57},
	{0x1.71f75e8ec5f74p+00, -0x1.16e4786887a99p-55},
	{0x1.75feb564267c9p+00, -0x1.0245957316dd3p-54},
	{0x1.7a11473eb0187p+00, -0x1.41577ee04992fp-55},
	{0x1.7e2f336cf4e62p+00, 0x1.05d02ba15797ep-56},
	{0x1.82589994cce13p+00, -0x1.d4c1dd41532d8p-54},
	{0x1.868d99b4492edp+00, -0x1.fc6f89bd4f6bap-54},
	{0x1.8ace5422aa0dbp+00, 0x1.6e9f156864b27p-54},
	{0x1.8f1ae99157736p+00, 0x1.5cc13a2e3976cp-55},
	{0x1.93737b0cdc5e5p+00, -0x1.75fc781b57ebcp-57},
	{0x1.97d829fde4e5p+00, -0x1.d185b7c1b85d1p-54},
	{0x1.9c49182a3f09p+00, 0x1.c7c46b071f2bep-56},
	{0x1.a0c667b5de565p+00, -0x1.359495d1cd533p-54},
	{0x1.a5503b23e255dp+00, -0x1.d2f6edb8d41e1p-54},
	{0x1.a9e6b5579fdbfp+00, 0x1.0fac90ef7fd31p-54},
	{0x1.ae89f995ad3adp+00, 0x1.7a1cd345dcc81p-54},
	{0x1.b33a2b84f15fbp+00, -0x1.2805e3084d708p-57},
	{0x1.b7f76f2fb5e47p+00, -0x1.5584f7e54ac3bp-56},
	{0x1.bcc1e904bc1d2p+00, 0x1.23dd07a2d9e84p-55},
	{0x1.c199bdd85529cp+00, 0x1.11065895048ddp-55},
	{0x1.c67f12e57d14bp+00, 0x1.2884dff483cadp-54},
	{0x1.cb720dcef9069p+00, 0x1.503cbd1e949dbp-56},
	{0x1.d072d4a07897cp+00, -0x1.cbc3743797a9cp-54},
	{0x1.d5818dcfba487p+00, 0x1.2ed02d75b3707p-55},
	{0x1.da9e603db3285p+00, 0x1.c2300696db532p-54},
	{0x1.dfc97337b9b5fp+00, -0x1.1a5cd4f184b5cp-54},
	{0x1.e502ee78b3ff6p+00, 0x1.39e8980a9cc8fp-55},
	{0x1.ea4afa2a490dap+00, -0x1.e9c23179c2893p-54},
	{0x1.efa1bee615a27p+00, 0x1.dc7f486a4b6bp-54},
	{0x1.f50765b6e454p+00, 0x1.9d3e12dd8a18bp-54},
	{0x1.fa7c1819e90d8p+00, 0x1.74853f3a5931ep-55},
}

// tsPolarPairs sets m[p] to the complex number of magnitude vals[2p] at
// the angle vals[2p+1] degrees, for each p: the pairs of an MA record, or
// of a DB record with db set (the magnitude is then tsExp10DB of the first
// of each pair). It reports false when a magnitude in dB is too large for
// a float64; m is then not all set.
//
// The angle is reduced in degrees, exactly: k = the nearest multiple of
// 90/256 degree, and the rest, at most 0.18 degree, is exact in a float64.
// Sine and cosine of k*90/256 degrees come from a table of the whole
// circle (the float64 nearest each and the difference to the exact value,
// computed with math/big; the test checks them), those of the rest from
// short Taylor series (the first neglected terms below 2^-60), and the
// angle sum formulas join them. The
// components come within an ulp of the exact values; they are not
// math.Sincos's bits, but multiples of 90 degrees give exact zeros and
// ones, and angles of many turns lose nothing to their conversion to
// radians. Angles of 10^11 degrees and beyond are first reduced by
// math.Remainder (exact too); angles not finite give NaN.
func tsPolarPairs(m []complex128, vals []float64, db bool) bool {
	vals = vals[:2*len(m)]
	for p := range m {
		mag, deg := vals[2*p], vals[2*p+1]
		if db {
			// tsExp10DB written out (the call costs as much as the rest).
			x := mag * tsExpKHi
			if math.Abs(x) < 1020 {
				e := math.FMA(mag, tsExpKHi, -x) + mag*tsExpKLo
				kd := (x*64 + tsRound) - tsRound
				k := int64(kd)
				r := (x - kd*(1.0/64)) + e
				r2 := r * r
				p := r*(tsExpC1+r*tsExpC2) + r2*r*((tsExpC3+r*tsExpC4)+r2*(tsExpC5+r*tsExpC6))
				t := &tsExp2Tab[k&63]
				mag = (t[0] + (t[0]*p + t[1])) * math.Float64frombits(uint64(k>>6+1023)<<52)
			} else if mag = tsExp10DB(mag); mag > math.MaxFloat64 {
				return false
			}
		}
		t := deg * (256.0 / 90)
		if !(math.Abs(t) < 1<<40) {
			if !(math.Abs(deg) <= math.MaxFloat64) {
				m[p] = complex(math.NaN(), math.NaN())
				continue
			}
			deg = math.Remainder(deg, 360) // exact
			t = deg * (256.0 / 90)
		}
		kf := (t + tsRound) - tsRound
		k := int64(kf)
		r := (deg - kf*(90.0/256)) * (math.Pi / 180) // the subtraction is exact
		r2 := r * r
		sr := r + r*r2*(-1.0/6+r2*(1.0/120)) // sin r
		cm := r2 * (-1.0/2 + r2*(1.0/24))    // cos r - 1
		// Sine and cosine as the table's float64 and a small rest, so
		// that the magnitude multiplies them with one rounding.
		e := &tsCircleTab[k&1023]
		sl := e[0]*cm + e[2]*sr + e[1]
		cl := e[2]*cm - e[0]*sr + e[3]
		re := math.FMA(mag, e[2], mag*cl)
		im := math.FMA(mag, e[0], mag*sl)
		// Adding zero turns a -0 (a zero component of a negative
		// magnitude) into +0.
		m[p] = complex(re+0, im+0)
	}
	return true
}

// tsCircleTab[j] is sine and cosine of j*90/256 degrees (j*Pi/512) for
// the whole circle, j = 0 to 1023, as in tsSinTab: made from tsSinTab's
// quarter, exactly, by the quarter-turn rules ((cos, sin) becomes
// (-sin, cos) a quarter turn on). A table four times the size of the
// quarter (32 KiB, within the processor's first-level cache) spares the
// conversion of every pair the rules' sign and swap work: the MA
// conversion took 30 % less time, with the same bits.
var tsCircleTab = func() (c [1024][4]float64) {
	for j := range c {
		e := tsSinTab[j&255]
		s, sl, co, cl := e[0], e[1], e[2], e[3]
		for q := 0; q < j>>8; q++ {
			s, sl, co, cl = co, cl, -s, -sl
		}
		c[j] = [4]float64{s + 0, sl + 0, co + 0, cl + 0} // +0: no negative zeros
	}
	return c
}()

// tsSinTab[j] is sine and cosine of j*90/256 degrees (j*Pi/512): each as
// the float64 nearest to it and the difference to the exact value.
var tsSinTab = [256][4]float64{
	{0x0p+00, 0x0p+00, 0x1p+00, 0x0p+00},
	{0x1.921f0fe670071p-08, 0x1.ab967fe6b7a9bp-64, 0x1.fffd8858e8a92p-01, 0x1.359c71883bcf7p-55},
	{0x1.921d1fcdec784p-07, 0x1.9878ebe836d9dp-61, 0x1.fff62169b92dbp-01, 0x1.5dda3c81fbd0dp-55},
	{0x1.2d936bbe30efdp-06, 0x1.b5f91ee371d64p-61, 0x1.ffe9cb44b51a1p-01, 0x1.5b43366df667p-56},
	{0x1.92155f7a3667ep-06, -0x1.b1d63091a013p-64, 0x1.ffd886084cd0dp-01, -0x1.1354d4556e4cbp-55},
	{0x1.f693731d1cf01p-06, -0x1.3fe9bc66286c7p-66, 0x1.ffc251df1d3f8p-01, 0x1.7a7d209f32d43p-56},
	{0x1.2d865759455cdp-05, 0x1.686f65ba93acp-61, 0x1.ffa72effef75dp-01, -0x1.8b4cdcdb25956p-55},
	{0x1.5fc00d290cd43p-05, 0x1.a2669a693a8e1p-59, 0x1.ff871dadb81dfp-01, 0x1.8b1c676208aa4p-56},
	{0x1.91f65f10dd814p-05, -0x1.912bd0d569a9p-61, 0x1.ff621e3796d7ep-01, -0x1.c57bc2e24aa15p-57},
	{0x1.c428d12c0d7e3p-05, -0x1.89bc74b58c513p-60, 0x1.ff3830f8d575cp-01, -0x1.95e1e79d335f7p-56},
	{0x1.f656e79f820ep-05, -0x1.2e1ebe392bffep-61, 0x1.ff095658e71adp-01, 0x1.01a8ce18a4b9ep-55},
	{0x1.1440134d709b3p-04, -0x1.fec446daea6adp-58, 0x1.fed58ecb673c4p-01, -0x1.e6e462a7ae686p-56},
	{0x1.2d52092ce19f6p-04, -0x1.9a088a8bf6b2cp-59, 0x1.fe9cdad01883ap-01, 0x1.521ecd0c67e35p-57},
	{0x1.4661179272096p-04, -0x1.4b109f2406c4cp-58, 0x1.fe5f3af2e394p-01, 0x1.b213f18c9cf17p-55},
	{0x1.5f6d00a9aa419p-04, -0x1.f4022d03f6c9ap-59, 0x1.fe1cafcbd5b09p-01, 0x1.a23e3202a884ep-57},
	{0x1.787586a5d5b21p-04, 0x1.5f7589f083399p-58, 0x1.fdd539ff1f456p-01, -0x1.ab13cbbec1781p-56},
	{0x1.917a6bc29b42cp-04, -0x1.e2718d26ed688p-60, 0x1.fd88da3d12526p-01, -0x1.87df6378811c7p-55},
	{0x1.aa7b724495c03p-04, 0x1.e5399ba0967b8p-58, 0x1.fd37914220b84p-01, 0x1.52e9d7b772791p-55},
	{0x1.c3785c79ec2d5p-04, -0x1.4f39df133fb21p-61, 0x1.fce15fd6da67bp-01, -0x1.5dd6f830d4c09p-56},
	{0x1.dc70ecbae9fc9p-04, 0x1.2fda2d73295eep-60, 0x1.fc8646cfeb721p-01, 0x1.3143dc43a9b9dp-55},
	{0x1.f564e56a9730ep-04, 0x1.a2704729ae56dp-59, 0x1.fc26470e19fd3p-01, 0x1.1ec8668ecaceep-55},
	{0x1.072a047ba831dp-03, 0x1.19db1f70118cap-58, 0x1.fbc1617e44186p-01, -0x1.58ec496dc4ecbp-59},
	{0x1.139f0cedaf577p-03, -0x1.523434d1b3cfap-57, 0x1.fb5797195d741p-01, 0x1.1bfac7397cc08p-56},
	{0x1.20116d4ec7bcfp-03, -0x1.242c8e1053452p-57, 0x1.fae8e8e46cfbbp-01, -0x1.3a9e414732d97p-56},
	{0x1.2c8106e8e613ap-03, 0x1.13000a89a11ep-58, 0x1.fa7557f08a517p-01, -0x1.7a0a8ca13571fp-55},
	{0x1.38edbb0cd8d14p-03, -0x1.198c21fbf7718p-57, 0x1.f9fce55adb2c8p-01, 0x1.f2a06fab9f9d1p-56},
	{0x1.45576b1293e5ap-03, -0x1.285a24119f7b1p-58, 0x1.f97f924c9099bp-01, -0x1.e2ae0eea5963bp-55},
	{0x1.51bdf8597c5f2p-03, -0x1.9f9976af04aa5p-61, 0x1.f8fd5ffae41dbp-01, -0x1.8cfd77fd970d2p-56},
	{0x1.5e214448b3fc6p-03, 0x1.531ff779ddac6p-57, 0x1.f8764fa714ba9p-01, 0x1.ab256778ffcb6p-56},
	{0x1.6a81304f64ab2p-03, 0x1.f0cd73fb5d8d4p-58, 0x1.f7ea629e63d6ep-01, 0x1.ba92d57ebfeddp-55},
	{0x1.76dd9de50bf31p-03, 0x1.1d5eeec501b2fp-57, 0x1.f7599a3a12077p-01, 0x1.84f31d743195cp-55},
	{0x1.83366e89c64c6p-03, -0x1.192952df10db8p-57, 0x1.f6c3f7df5bbb7p-01, 0x1.8561ce9d5ef5bp-56},
	{0x1.8f8b83c69a60bp-03, -0x1.26d19b9ff8d82p-57, 0x1.f6297cff75cbp-01, 0x1.562172a361fd3p-56},
	{0x1.9bdcbf2dc4366p-03, 0x1.9632d189956fep-57, 0x1.f58a2b1789e84p-01, 0x1.1f4a188aa368p-56},
	{0x1.a82a025b00451p-03, -0x1.87905ffd084adp-57, 0x1.f4e603b0b2f2dp-01, -0x1.8ee01e695ac05p-56},
	{0x1.b4732ef3d6722p-03, 0x1.bbe5d5d75cbd8p-57, 0x1.f43d085ff92ddp-01, -0x1.8fde71e361c05p-55},
	{0x1.c0b826a7e4f63p-03, -0x1.af1439e521935p-62, 0x1.f38f3ac64e589p-01, -0x1.d7bafb51f72e6p-56},
	{0x1.ccf8cb312b286p-03, 0x1.2382b0aecadf8p-58, 0x1.f2dc9c9089a9dp-01, 0x1.5407460bdfc07p-59},
	{0x1.d934fe5454311p-03, 0x1.75b92277107adp-57, 0x1.f2252f7763adap-01, -0x1.20cb81c8d94abp-55},
	{0x1.e56ca1e101a1bp-03, 0x1.46ac3f9fd0227p-57, 0x1.f168f53f7205dp-01, -0x1.26a6c1f015601p-57},
	{0x1.f19f97b215f1bp-03, -0x1.42deef11da2c4p-57, 0x1.f0a7efb9230d7p-01, 0x1.52c7adc6b4989p-56},
	{0x1.fdcdc1adfedf9p-03, -0x1.2dba4580ed7bbp-57, 0x1.efe220c0b95ecp-01, 0x1.c853b7bf7e0cdp-55},
	{0x1.04fb80e37fdaep-02, -0x1.412cdb72583ccp-63, 0x1.ef178a3e473c2p-01, 0x1.6310a67fe774fp-55},
	{0x1.0b0d9cfdbdb9p-02, 0x1.3b3a7b8d1200dp-58, 0x1.ee482e25a9dbcp-01, -0x1.b6066ef81af2ap-56},
	{0x1.111d262b1f677p-02, 0x1.824c20ab7aa9ap-56, 0x1.ed740e7684963p-01, 0x1.e82c791f59cc2p-56},
	{0x1.172a0d7765177p-02, 0x1.22575f33366bep-57, 0x1.ec9b2d3c3bf84p-01, 0x1.19119d358de05p-56},
	{0x1.1d3443f4cdb3ep-02, -0x1.720d41c13519ep-57, 0x1.ebbd8c8df0b74p-01, 0x1.c6c8c615e7277p-56},
	{0x1.233bbabc3bb71p-02, 0x1.99b04e23259efp-56, 0x1.eadb2e8e7a88ep-01, -0x1.92ec52ea226a3p-55},
	{0x1.294062ed59f06p-02, -0x1.5d28da2c4612dp-56, 0x1.e9f4156c62ddap-01, 0x1.760b1e2e3f81ep-55},
	{0x1.2f422daec0387p-02, -0x1.7501ba473da6fp-56, 0x1.e9084361df7f2p-01, 0x1.cdfc7ce9dc3e9p-55},
	{0x1.35410c2e18152p-02, -0x1.3cb002f96e062p-56, 0x1.e817bab4cd10dp-01, -0x1.d0afe686b5e0ap-56},
	{0x1.3b3cefa0414b7p-02, 0x1.f36dc4a9c2294p-56, 0x1.e7227db6a9744p-01, 0x1.2128794da5a5p-55},
	{0x1.4135c94176601p-02, 0x1.0c97c4afa2518p-56, 0x1.e6288ec48e112p-01, -0x1.16b56f2847754p-57},
	{0x1.472b8a5571054p-02, -0x1.01ea0fe4dff23p-56, 0x1.e529f04729ffcp-01, 0x1.9075d6e6dfc8bp-55},
	{0x1.4d1e24278e76ap-02, 0x1.2417218792858p-57, 0x1.e426a4b2bc17ep-01, 0x1.a873889744882p-55},
	{0x1.530d880af3c24p-02, -0x1.fab8e2103fbd6p-56, 0x1.e31eae870ce25p-01, -0x1.bc7094538d678p-56},
	{0x1.58f9a75ab1fddp-02, -0x1.efdc0d58cf62p-62, 0x1.e212104f686e5p-01, -0x1.014c76c126527p-55},
	{0x1.5ee27379ea693p-02, 0x1.634ff2fa75245p-56, 0x1.e100cca2980acp-01, -0x1.02d182acdf825p-57},
	{0x1.64c7ddd3f27c6p-02, 0x1.10d2b4a664121p-58, 0x1.dfeae622dbe2bp-01, -0x1.514ea88425567p-55},
	{0x1.6aa9d7dc77e17p-02, -0x1.38b470592c7b3p-56, 0x1.ded05f7de47dap-01, -0x1.2cc4c1f8ba966p-55},
	{0x1.7088530fa459fp-02, -0x1.44b19e0864c5dp-56, 0x1.ddb13b6ccc23cp-01, 0x1.83c37c6107db3p-55},
	{0x1.766340f2418f6p-02, 0x1.2b2adc9041b2cp-56, 0x1.dc8d7cb41026p-01, 0x1.6b7872773830dp-56},
	{0x1.7c3a9311dcce7p-02, 0x1.9a3f21ef3e8d9p-62, 0x1.db6526238a09bp-01, -0x1.adee7eae6946p-56},
	{0x1.820e3b04eaac4p-02, -0x1.92379eb01c6b6p-59, 0x1.da383a9668988p-01, -0x1.5811000b39d84p-55},
	{0x1.87de2a6aea963p-02, -0x1.72cedd3d5a61p-57, 0x1.d906bcf328d46p-01, 0x1.457e610231ac2p-56},
	{0x1.8daa52ec8a4bp-02, -0x1.72eb2db8c621ep-57, 0x1.d7d0b02b8ecf9p-01, 0x1.800f4ce65cd6ep-55},
	{0x1.9372a63bc93d7p-02, 0x1.684319e5ad5b1p-57, 0x1.d696173c9e68bp-01, -0x1.e8c61c6393d55p-56},
	{0x1.993716141bdffp-02, -0x1.15e8cce261c55p-56, 0x1.d556f52e93eb1p-01, -0x1.80ed9233a963p-55},
	{0x1.9ef7943a8ed8ap-02, 0x1.6da81290bdbabp-57, 0x1.d4134d14dc93ap-01, -0x1.4ef5295d25af2p-55},
	{0x1.a4b4127dea1e5p-02, -0x1.bec6f01bc22f1p-56, 0x1.d2cb220e0ef9fp-01, -0x1.f07656d4e6652p-56},
	{0x1.aa6c82b6d3fcap-02, -0x1.d5f106ee5ccf7p-56, 0x1.d17e7743e35dcp-01, -0x1.101da3540130ap-58},
	{0x1.b020d6c7f4009p-02, 0x1.414ae7e555208p-58, 0x1.d02d4feb2bd92p-01, 0x1.195ff41bc55fep-55},
	{0x1.b5d1009e15ccp-02, 0x1.5b362cb974183p-57, 0x1.ced7af43cc773p-01, -0x1.e7b6bb5ab58aep-58},
	{0x1.bb7cf2304bd01p-02, 0x1.9e1a5bd9269d4p-57, 0x1.cd7d9898b32f6p-01, -0x1.f2fa062496738p-57},
	{0x1.c1249d8011ee7p-02, -0x1.813aabb515206p-56, 0x1.cc1f0f3fcfc5cp-01, 0x1.e57613b68f6abp-56},
	{0x1.c6c7f4997000bp-02, -0x1.bec2669c68e74p-56, 0x1.cabc169a0b9p-01, 0x1.c42d3e10851d1p-55},
	{0x1.cc66e9931c45ep-02, 0x1.6850e59c37f8fp-58, 0x1.c954b213411f5p-01, -0x1.2fb761e946603p-58},
	{0x1.d2016e8e9db5bp-02, -0x1.c8bce9d93efb8p-57, 0x1.c7e8e52233cf3p-01, 0x1.b2ad324aa35c1p-57},
	{0x1.d79775b86e389p-02, 0x1.550ec87bc0575p-56, 0x1.c678b3488739bp-01, 0x1.d86cac7c5ff5bp-57},
	{0x1.dd28f1481cc58p-02, -0x1.e7576fa6c944ep-59, 0x1.c5042012b6907p-01, -0x1.5c058dd8eaba5p-57},
	{0x1.e2b5d3806f63bp-02, 0x1.e0d891d3c6841p-58, 0x1.c38b2f180bdb1p-01, -0x1.6e0b1757c8d07p-56},
	{0x1.e83e0eaf85114p-02, -0x1.7bc380ef24ba7p-57, 0x1.c20de3fa971bp-01, -0x1.b4ca2bab1322cp-55},
	{0x1.edc1952ef78d6p-02, -0x1.dd0f7c33edee6p-56, 0x1.c08c426725549p-01, 0x1.b157fd80e2946p-58},
	{0x1.f3405963fd067p-02, 0x1.06846d44a238fp-56, 0x1.bf064e15377ddp-01, 0x1.2156026a1e028p-57},
	{0x1.f8ba4dbf89abap-02, -0x1.2ec1fc1b776b8p-60, 0x1.bd7c0ac6f952ap-01, -0x1.825a732ac700ap-55},
	{0x1.fe2f64be7121p-02, -0x1.297ab1ca2d7dbp-56, 0x1.bbed7c49380eap-01, 0x1.beacbd88500b4p-59},
	{0x1.01cfc874c3eb7p-01, -0x1.34a35e7c2368cp-56, 0x1.ba5aa673590d2p-01, 0x1.7ea4e370753b6p-55},
	{0x1.0485626ae221ap-01, 0x1.b937d9091ff7p-55, 0x1.b8c38d27504e9p-01, -0x1.1529abff40e45p-55},
	{0x1.073879922ffeep-01, -0x1.a5a014347406cp-55, 0x1.b728345196e3ep-01, -0x1.bc69f324e6d61p-55},
	{0x1.09e907417c5e1p-01, -0x1.fe573741a9bd4p-55, 0x1.b5889fe921405p-01, -0x1.df49b307c8602p-57},
	{0x1.0c9704d5d898fp-01, -0x1.8d3d7de6ee9b2p-55, 0x1.b3e4d3ef55712p-01, -0x1.eb6b8bf11a493p-55},
	{0x1.0f426bb2a8e7ep-01, -0x1.bb58fb774f8eep-55, 0x1.b23cd470013b4p-01, 0x1.5a1bb35ad6d2ep-56},
	{0x1.11eb3541b4b23p-01, -0x1.ef23b69abe4f1p-55, 0x1.b090a581502p-01, -0x1.926da300ffccep-55},
	{0x1.14915af336cebp-01, 0x1.f3660558a0213p-56, 0x1.aee04b43c1474p-01, -0x1.3a79a438bf8ccp-55},
	{0x1.1734d63dedb49p-01, -0x1.7eef2ccc50575p-55, 0x1.ad2bc9e21d511p-01, -0x1.47fbe07bea548p-55},
	{0x1.19d5a09f2b9b8p-01, -0x1.33656c68a1d4ap-57, 0x1.ab7325916c0d4p-01, 0x1.a8b8c85baaa9bp-55},
	{0x1.1c73b39ae68c8p-01, 0x1.b25dd267f66p-55, 0x1.a9b66290ea1a3p-01, 0x1.9f630e8b6dac8p-60},
	{0x1.1f0f08bbc861bp-01, -0x1.10d9dcafb74cbp-57, 0x1.a7f58529fe69dp-01, -0x1.97a441584a179p-55},
	{0x1.21a799933eb59p-01, -0x1.3a7b177c68fb2p-55, 0x1.a63091b02fae2p-01, -0x1.e911152248d1p-56},
	{0x1.243d5fb98ac1fp-01, 0x1.c533d0a284a8dp-56, 0x1.a4678c8119ac8p-01, 0x1.1b4c0dd3f212ap-55},
	{0x1.26d054cdd12dfp-01, -0x1.5da743ef3770cp-55, 0x1.a29a7a0462782p-01, -0x1.128bb015df175p-56},
	{0x1.2960727629ca8p-01, 0x1.56d6c7af02d5cp-56, 0x1.a0c95eabaf937p-01, -0x1.e0ca3acbd049ap-55},
	{0x1.2bedb25faf3eap-01, -0x1.14981c796ee46p-58, 0x1.9ef43ef29af94p-01, 0x1.b1dfcb60445c2p-56},
	{0x1.2e780e3e8ea17p-01, -0x1.b19fafe36587ap-55, 0x1.9d1b1f5ea80d5p-01, 0x1.c5fadd5ffb36fp-55},
	{0x1.30ff7fce17035p-01, -0x1.efcc626f74a6fp-57, 0x1.9b3e047f38741p-01, -0x1.30ee286712474p-55},
	{0x1.338400d0c8e57p-01, -0x1.abf2a5e95e6e5p-55, 0x1.995cf2ed80d22p-01, 0x1.7783e907fbd7bp-56},
	{0x1.36058b10659f3p-01, -0x1.1fcb3a35857e7p-55, 0x1.9777ef4c7d742p-01, -0x1.15479a240665ep-55},
	{0x1.3884185dfeb22p-01, -0x1.a038026abe6b2p-56, 0x1.958efe48e6dd7p-01, -0x1.561335da0f4e7p-55},
	{0x1.3affa292050b9p-01, 0x1.e3e25e3954964p-56, 0x1.93a22499263fbp-01, 0x1.3d419a920df0bp-55},
	{0x1.3d78238c58344p-01, -0x1.0219f5f0f79cep-55, 0x1.91b166fd49da2p-01, -0x1.3be953a7fe996p-57},
	{0x1.3fed9534556d4p-01, 0x1.36916608c5061p-55, 0x1.8fbcca3ef940dp-01, -0x1.6dfa99c86f2f1p-57},
	{0x1.425ff178e6bb1p-01, 0x1.7b38d675140cap-55, 0x1.8dc45331698ccp-01, 0x1.1d9fcd83634d7p-57},
	{0x1.44cf325091dd6p-01, 0x1.8076a2cfdc6b3p-57, 0x1.8bc806b151741p-01, -0x1.2c5e12ed1336dp-55},
	{0x1.473b51b987347p-01, 0x1.ca1953514e41bp-57, 0x1.89c7e9a4dd4aap-01, 0x1.db6ea04a8678fp-55},
	{0x1.49a449b9b0939p-01, -0x1.27ee16d719b94p-55, 0x1.87c400fba2ebfp-01, -0x1.2dabc0c3f64cdp-55},
	{0x1.4c0a145ec0004p-01, 0x1.2630cfafceaa1p-58, 0x1.85bc51ae958ccp-01, 0x1.45ba6478086ccp-55},
	{0x1.4e6cabbe3e5e9p-01, 0x1.3c293edceb327p-57, 0x1.83b0e0bff976ep-01, -0x1.6f420f8ea3475p-56},
	{0x1.50cc09f59a09bp-01, 0x1.693463a2c2e6fp-56, 0x1.81a1b33b57accp-01, -0x1.5dea12d66bb66p-55},
	{0x1.5328292a35596p-01, -0x1.a12eb89da0257p-56, 0x1.7f8ece3571771p-01, -0x1.9c8d8ce93c917p-55},
	{0x1.5581038975137p-01, 0x1.4570d9efe26dfp-55, 0x1.7d7836cc33db2p-01, 0x1.162715ef03f85p-56},
	{0x1.57d69348cecap-01, -0x1.75720992bfbb2p-55, 0x1.7b5df226aafafp-01, -0x1.0f537acdf0ad7p-56},
	{0x1.5a28d2a5d725p-01, 0x1.57a25f8b1343p-55, 0x1.79400574f55e5p-01, -0x1.0adadbdb4c65ap-55},
	{0x1.5c77bbe65018cp-01, 0x1.069ea9c0bc32ap-55, 0x1.771e75f037261p-01, 0x1.5cfce8d84068fp-56},
	{0x1.5ec3495837074p-01, 0x1.dea89a9b8f727p-56, 0x1.74f948da8d28dp-01, 0x1.19900a3b9a3a2p-63},
	{0x1.610b7551d2cdfp-01, -0x1.251b352ff2a37p-56, 0x1.72d0837efff96p-01, 0x1.0d4ef0f1d915cp-55},
	{0x1.63503a31c1be9p-01, 0x1.1248f09e6587cp-57, 0x1.70a42b3176d7ap-01, -0x1.d9e3fbe2e15ap-56},
	{0x1.6591925f0783dp-01, 0x1.c3d64fbf5de23p-55, 0x1.6e74454eaa8afp-01, -0x1.dbc03c84e226ep-55},
	{0x1.67cf78491af1p-01, 0x1.750ab23477b61p-59, 0x1.6c40d73c18275p-01, 0x1.25d4f802be257p-57},
	{0x1.6a09e667f3bcdp-01, -0x1.bdd3413b26456p-55, 0x1.6a09e667f3bcdp-01, -0x1.bdd3413b26456p-55},
	{0x1.6c40d73c18275p-01, 0x1.25d4f802be257p-57, 0x1.67cf78491af1p-01, 0x1.750ab23477b61p-59},
	{0x1.6e74454eaa8afp-01, -0x1.dbc03c84e226ep-55, 0x1.6591925f0783dp-01, 0x1.c3d64fbf5de23p-55},
	{0x1.70a42b3176d7ap-01, -0x1.d9e3fbe2e15ap-56, 0x1.63503a31c1be9p-01, 0x1.1248f09e6587cp-57},
	{0x1.72d0837efff96p-01, 0x1.0d4ef0f1d915cp-55, 0x1.610b7551d2cdfp-01, -0x1.251b352ff2a37p-56},
	{0x1.74f948da8d28dp-01, 0x1.19900a3b9a3a2p-63, 0x1.5ec3495837074p-01, 0x1.dea89a9b8f727p-56},
	{0x1.771e75f037261p-01, 0x1.5cfce8d84068fp-56, 0x1.5c77bbe65018cp-01, 0x1.069ea9c0bc32ap-55},
	{0x1.79400574f55e5p-01, -0x1.0adadbdb4c65ap-55, 0x1.5a28d2a5d725p-01, 0x1.57a25f8b1343p-55},
	{0x1.7b5df226aafafp-01, -0x1.0f537acdf0ad7p-56, 0x1.57d69348cecap-01, -0x1.75720992bfbb2p-55},
	{0x1.7d7836cc33db2p-01, 0x1.162715ef03f85p-56, 0x1.5581038975137p-01, 0x1.4570d9efe26dfp-55},
	{0x1.7f8ece3571771p-01, -0x1.9c8d8ce93c917p-55, 0x1.5328292a35596p-01, -0x1.a12eb89da0257p-56},
	{0x1.81a1b33b57accp-01, -0x1.5dea12d66bb66p-55, 0x1.50cc09f59a09bp-01, 0x1.693463a2c2e6fp-56},
	{0x1.83b0e0bff976ep-01, -0x1.6f420f8ea3475p-56, 0x1.4e6cabbe3e5e9p-01, 0x1.3c293edceb327p-57},
	{0x1.85bc51ae958ccp-01, 0x1.45ba6478086ccp-55, 0x1.4c0a145ec0004p-01, 0x1.2630cfafceaa1p-58},
	{0x1.87c400fba2ebfp-01, -0x1.2dabc0c3f64cdp-55, 0x1.49a449b9b0939p-01, -0x1.27ee16d719b94p-55},
	{0x1.89c7e9a4dd4aap-01, 0x1.db6ea04a8678fp-55, 0x1.473b51b987347p-01, 0x1.ca1953514e41bp-57},
	{0x1.8bc806b151741p-01, -0x1.2c5e12ed1336dp-55, 0x1.44cf325091dd6p-01, 0x1.8076a2cfdc6b3p-57},
	{0x1.8dc45331698ccp-01, 0x1.1d9fcd83634d7p-57, 0x1.425ff178e6bb1p-01, 0x1.7b38d675140cap-55},
	{0x1.8fbcca3ef940dp-01, -0x1.6dfa99c86f2f1p-57, 0x1.3fed9534556d4p-01, 0x1.36916608c5061p-55},
	{0x1.91b166fd49da2p-01, -0x1.3be953a7fe996p-57, 0x1.3d78238c58344p-01, -0x1.0219f5f0f79cep-55},
	{0x1.93a22499263fbp-01, 0x1.3d419a920df0bp-55, 0x1.3affa292050b9p-01, 0x1.e3e25e3954964p-56},
	{0x1.958efe48e6dd7p-01, -0x1.561335da0f4e7p-55, 0x1.3884185dfeb22p-01, -0x1.a038026abe6b2p-56},
	{0x1.9777ef4c7d742p-01, -0x1.15479a240665ep-55, 0x1.36058b10659f3p-01, -0x1.1fcb3a35857e7p-55},
	{0x1.995cf2ed80d22p-01, 0x1.7783e907fbd7bp-56, 0x1.338400d0c8e57p-01, -0x1.abf2a5e95e6e5p-55},
	{0x1.9b3e047f38741p-01, -0x1.30ee286712474p-55, 0x1.30ff7fce17035p-01, -0x1.efcc626f74a6fp-57},
	{0x1.9d1b1f5ea80d5p-01, 0x1.c5fadd5ffb36fp-55, 0x1.2e780e3e8ea17p-01, -0x1.b19fafe36587ap-55},
	{0x1.9ef43ef29af94p-01, 0x1.b1dfcb60445c2p-56, 0x1.2bedb25faf3eap-01, -0x1.14981c796ee46p-58},
	{0x1.a0c95eabaf937p-01, -0x1.e0ca3acbd049ap-55, 0x1.2960727629ca8p-01, 0x1.56d6c7af02d5cp-56},
	{0x1.a29a7a0462782p-01, -0x1.128bb015df175p-56, 0x1.26d054cdd12dfp-01, -0x1.5da743ef3770cp-55},
	{0x1.a4678c8119ac8p-01, 0x1.1b4c0dd3f212ap-55, 0x1.243d5fb98ac1fp-01, 0x1.c533d0a284a8dp-56},
	{0x1.a63091b02fae2p-01, -0x1.e911152248d1p-56, 0x1.21a799933eb59p-01, -0x1.3a7b177c68fb2p-55},
	{0x1.a7f58529fe69dp-01, -0x1.97a441584a179p-55, 0x1.1f0f08bbc861bp-01, -0x1.10d9dcafb74cbp-57},
	{0x1.a9b66290ea1a3p-01, 0x1.9f630e8b6dac8p-60, 0x1.1c73b39ae68c8p-01, 0x1.b25dd267f66p-55},
	{0x1.ab7325916c0d4p-01, 0x1.a8b8c85baaa9bp-55, 0x1.19d5a09f2b9b8p-01, -0x1.33656c68a1d4ap-57},
	{0x1.ad2bc9e21d511p-01, -0x1.47fbe07bea548p-55, 0x1.1734d63dedb49p-01, -0x1.7eef2ccc50575p-55},
	{0x1.aee04b43c1474p-01, -0x1.3a79a438bf8ccp-55, 0x1.14915af336cebp-01, 0x1.f3660558a0213p-56},
	{0x1.b090a581502p-01, -0x1.926da300ffccep-55, 0x1.11eb3541b4b23p-01, -0x1.ef23b69abe4f1p-55},
	{0x1.b23cd470013b4p-01, 0x1.5a1bb35ad6d2ep-56, 0x1.0f426bb2a8e7ep-01, -0x1.bb58fb774f8eep-55},
	{0x1.b3e4d3ef55712p-01, -0x1.eb6b8bf11a493p-55, 0x1.0c9704d5d898fp-01, -0x1.8d3d7de6ee9b2p-55},
	{0x1.b5889fe921405p-01, -0x1.df49b307c8602p-57, 0x1.09e907417c5e1p-01, -0x1.fe573741a9bd4p-55},
	{0x1.b728345196e3ep-01, -0x1.bc69f324e6d61p-55, 0x1.073879922ffeep-01, -0x1.a5a014347406cp-55},
	{0x1.b8c38d27504e9p-01, -0x1.1529abff40e45p-55, 0x1.0485626ae221ap-01, 0x1.b937d9091ff7p-55},
	{0x1.ba5aa673590d2p-01, 0x1.7ea4e370753b6p-55, 0x1.01cfc874c3eb7p-01, -0x1.34a35e7c2368cp-56},
	{0x1.bbed7c49380eap-01, 0x1.beacbd88500b4p-59, 0x1.fe2f64be7121p-02, -0x1.297ab1ca2d7dbp-56},
	{0x1.bd7c0ac6f952ap-01, -0x1.825a732ac700ap-55, 0x1.f8ba4dbf89abap-02, -0x1.2ec1fc1b776b8p-60},
	{0x1.bf064e15377ddp-01, 0x1.2156026a1e028p-57, 0x1.f3405963fd067p-02, 0x1.06846d44a238fp-56},
	{0x1.c08c426725549p-01, 0x1.b157fd80e2946p-58, 0x1.edc1952ef78d6p-02, -0x1.dd0f7c33edee6p-56},
	{0x1.c20de3fa971bp-01, -0x1.b4ca2bab1322cp-55, 0x1.e83e0eaf85114p-02, -0x1.7bc380ef24ba7p-57},
	{0x1.c38b2f180bdb1p-01, -0x1.6e0b1757c8d07p-56, 0x1.e2b5d3806f63bp-02, 0x1.e0d891d3c6841p-58},
	{0x1.c5042012b6907p-01, -0x1.5c058dd8eaba5p-57, 0x1.dd28f1481cc58p-02, -0x1.e7576fa6c944ep-59},
	{0x1.c678b3488739bp-01, 0x1.d86cac7c5ff5bp-57, 0x1.d79775b86e389p-02, 0x1.550ec87bc0575p-56},
	{0x1.c7e8e52233cf3p-01, 0x1.b2ad324aa35c1p-57, 0x1.d2016e8e9db5bp-02, -0x1.c8bce9d93efb8p-57},
	{0x1.c954b213411f5p-01, -0x1.2fb761e946603p-58, 0x1.cc66e9931c45ep-02, 0x1.6850e59c37f8fp-58},
	{0x1.cabc169a0b9p-01, 0x1.c42d3e10851d1p-55, 0x1.c6c7f4997000bp-02, -0x1.bec2669c68e74p-56},
	{0x1.cc1f0f3fcfc5cp-01, 0x1.e57613b68f6abp-56, 0x1.c1249d8011ee7p-02, -0x1.813aabb515206p-56},
	{0x1.cd7d9898b32f6p-01, -0x1.f2fa062496738p-57, 0x1.bb7cf2304bd01p-02, 0x1.9e1a5bd9269d4p-57},
	{0x1.ced7af43cc773p-01, -0x1.e7b6bb5ab58aep-58, 0x1.b5d1009e15ccp-02, 0x1.5b362cb974183p-57},
	{0x1.d02d4feb2bd92p-01, 0x1.195ff41bc55fep-55, 0x1.b020d6c7f4009p-02, 0x1.414ae7e555208p-58},
	{0x1.d17e7743e35dcp-01, -0x1.101da3540130ap-58, 0x1.aa6c82b6d3fcap-02, -0x1.d5f106ee5ccf7p-56},
	{0x1.d2cb220e0ef9fp-01, -0x1.f07656d4e6652p-56, 0x1.a4b4127dea1e5p-02, -0x1.bec6f01bc22f1p-56},
	{0x1.d4134d14dc93ap-01, -0x1.4ef5295d25af2p-55, 0x1.9ef7943a8ed8ap-02, 0x1.6da81290bdbabp-57},
	{0x1.d556f52e93eb1p-01, -0x1.80ed9233a963p-55, 0x1.993716141bdffp-02, -0x1.15e8cce261c55p-56},
	{0x1.d696173c9e68bp-01, -0x1.e8c61c6393d55p-56, 0x1.9372a63bc93d7p-02, 0x1.684319e5ad5b1p-57},
	{0x1.d7d0b02b8ecf9p-01, 0x1.800f4ce65cd6ep-55, 0x1.8daa52ec8a4bp-02, -0x1.72eb2db8c621ep-57},
	{0x1.d906bcf328d46p-01, 0x1.457e610231ac2p-56, 0x1.87de2a6aea963p-02, -0x1.72cedd3d5a61p-57},
	{0x1.da383a9668988p-01, -0x1.5811000b39d84p-55, 0x1.820e3b04eaac4p-02, -0x1.92379eb01c6b6p-59},
	{0x1.db6526238a09bp-01, -0x1.adee7eae6946p-56, 0x1.7c3a9311dcce7p-02, 0x1.9a3f21ef3e8d9p-62},
	{0x1.dc8d7cb41026p-01, 0x1.6b7872773830dp-56, 0x1.766340f2418f6p-02, 0x1.2b2adc9041b2cp-56},
	{0x1.ddb13b6ccc23cp-01, 0x1.83c37c6107db3p-55, 0x1.7088530fa459fp-02, -0x1.44b19e0864c5dp-56},
	{0x1.ded05f7de47dap-01, -0x1.2cc4c1f8ba966p-55, 0x1.6aa9d7dc77e17p-02, -0x1.38b470592c7b3p-56},
	{0x1.dfeae622dbe2bp-01, -0x1.514ea88425567p-55, 0x1.64c7ddd3f27c6p-02, 0x1.10d2b4a664121p-58},
	{0x1.e100cca2980acp-01, -0x1.02d182acdf825p-57, 0x1.5ee27379ea693p-02, 0x1.634ff2fa75245p-56},
	{0x1.e212104f686e5p-01, -0x1.014c76c126527p-55, 0x1.58f9a75ab1fddp-02, -0x1.efdc0d58cf62p-62},
	{0x1.e31eae870ce25p-01, -0x1.bc7094538d678p-56, 0x1.530d880af3c24p-02, -0x1.fab8e2103fbd6p-56},
	{0x1.e426a4b2bc17ep-01, 0x1.a873889744882p-55, 0x1.4d1e24278e76ap-02, 0x1.2417218792858p-57},
	{0x1.e529f04729ffcp-01, 0x1.9075d6e6dfc8bp-55, 0x1.472b8a5571054p-02, -0x1.01ea0fe4dff23p-56},
	{0x1.e6288ec48e112p-01, -0x1.16b56f2847754p-57, 0x1.4135c94176601p-02, 0x1.0c97c4afa2518p-56},
	{0x1.e7227db6a9744p-01, 0x1.2128794da5a5p-55, 0x1.3b3cefa0414b7p-02, 0x1.f36dc4a9c2294p-56},
	{0x1.e817bab4cd10dp-01, -0x1.d0afe686b5e0ap-56, 0x1.35410c2e18152p-02, -0x1.3cb002f96e062p-56},
	{0x1.e9084361df7f2p-01, 0x1.cdfc7ce9dc3e9p-55, 0x1.2f422daec0387p-02, -0x1.7501ba473da6fp-56},
	{0x1.e9f4156c62ddap-01, 0x1.760b1e2e3f81ep-55, 0x1.294062ed59f06p-02, -0x1.5d28da2c4612dp-56},
	{0x1.eadb2e8e7a88ep-01, -0x1.92ec52ea226a3p-55, 0x1.233bbabc3bb71p-02, 0x1.99b04e23259efp-56},
	{0x1.ebbd8c8df0b74p-01, 0x1.c6c8c615e7277p-56, 0x1.1d3443f4cdb3ep-02, -0x1.720d41c13519ep-57},
	{0x1.ec9b2d3c3bf84p-01, 0x1.19119d358de05p-56, 0x1.172a0d7765177p-02, 0x1.22575f33366bep-57},
	{0x1.ed740e7684963p-01, 0x1.e82c791f59cc2p-56, 0x1.111d262b1f677p-02, 0x1.824c20ab7aa9ap-56},
	{0x1.ee482e25a9dbcp-01, -0x1.b6066ef81af2ap-56, 0x1.0b0d9cfdbdb9p-02, 0x1.3b3a7b8d1200dp-58},
	{0x1.ef178a3e473c2p-01, 0x1.6310a67fe774fp-55, 0x1.04fb80e37fdaep-02, -0x1.412cdb72583ccp-63},
	{0x1.efe220c0b95ecp-01, 0x1.c853b7bf7e0cdp-55, 0x1.fdcdc1adfedf9p-03, -0x1.2dba4580ed7bbp-57},
	{0x1.f0a7efb9230d7p-01, 0x1.52c7adc6b4989p-56, 0x1.f19f97b215f1bp-03, -0x1.42deef11da2c4p-57},
	{0x1.f168f53f7205dp-01, -0x1.26a6c1f015601p-57, 0x1.e56ca1e101a1bp-03, 0x1.46ac3f9fd0227p-57},
	{0x1.f2252f7763adap-01, -0x1.20cb81c8d94abp-55, 0x1.d934fe5454311p-03, 0x1.75b92277107adp-57},
	{0x1.f2dc9c9089a9dp-01, 0x1.5407460bdfc07p-59, 0x1.ccf8cb312b286p-03, 0x1.2382b0aecadf8p-58},
	{0x1.f38f3ac64e589p-01, -0x1.d7bafb51f72e6p-56, 0x1.c0b826a7e4f63p-03, -0x1.af1439e521935p-62},
	{0x1.f43d085ff92ddp-01, -0x1.8fde71e361c05p-55, 0x1.b4732ef3d6722p-03, 0x1.bbe5d5d75cbd8p-57},
	{0x1.f4e603b0b2f2dp-01, -0x1.8ee01e695ac05p-56, 0x1.a82a025b00451p-03, -0x1.87905ffd084adp-57},
	{0x1.f58a2b1789e84p-01, 0x1.1f4a188aa368p-56, 0x1.9bdcbf2dc4366p-03, 0x1.9632d189956fep-57},
	{0x1.f6297cff75cbp-01, 0x1.562172a361fd3p-56, 0x1.8f8b83c69a60bp-03, -0x1.26d19b9ff8d82p-57},
	{0x1.f6c3f7df5bbb7p-01, 0x1.8561ce9d5ef5bp-56, 0x1.83366e89c64c6p-03, -0x1.192952df10db8p-57},
	{0x1.f7599a3a12077p-01, 0x1.84f31d743195cp-55, 0x1.76dd9de50bf31p-03, 0x1.1d5eeec501b2fp-57},
	{0x1.f7ea629e63d6ep-01, 0x1.ba92d57ebfeddp-55, 0x1.6a81304f64ab2p-03, 0x1.f0cd73fb5d8d4p-58},
	{0x1.f8764fa714ba9p-01, 0x1.ab256778ffcb6p-56, 0x1.5e214448b3fc6p-03, 0x1.531ff779ddac6p-57},
	{0x1.f8fd5ffae41dbp-01, -0x1.8cfd77fd970d2p-56, 0x1.51bdf8597c5f2p-03, -0x1.9f9976af04aa5p-61},
	{0x1.f97f924c9099bp-01, -0x1.e2ae0eea5963bp-55, 0x1.45576b1293e5ap-03, -0x1.285a24119f7b1p-58},
	{0x1.f9fce55adb2c8p-01, 0x1.f2a06fab9f9d1p-56, 0x1.38edbb0cd8d14p-03, -0x1.198c21fbf7718p-57},
	{0x1.fa7557f08a517p-01, -0x1.7a0a8ca13571fp-55, 0x1.2c8106e8e613ap-03, 0x1.13000a89a11ep-58},
	{0x1.fae8e8e46cfbbp-01, -0x1.3a9e414732d97p-56, 0x1.20116d4ec7bcfp-03, -0x1.242c8e1053452p-57},
	{0x1.fb5797195d741p-01, 0x1.1bfac7397cc08p-56, 0x1.139f0cedaf577p-03, -0x1.523434d1b3cfap-57},
	{0x1.fbc1617e44186p-01, -0x1.58ec496dc4ecbp-59, 0x1.072a047ba831dp-03, 0x1.19db1f70118cap-58},
	{0x1.fc26470e19fd3p-01, 0x1.1ec8668ecaceep-55, 0x1.f564e56a9730ep-04, 0x1.a2704729ae56dp-59},
	{0x1.fc8646cfeb721p-01, 0x1.3143dc43a9b9dp-55, 0x1.dc70ecbae9fc9p-04, 0x1.2fda2d73295eep-60},
	{0x1.fce15fd6da67bp-01, -0x1.5dd6f830d4c09p-56, 0x1.c3785c79ec2d5p-04, -0x1.4f39df133fb21p-61},
	{0x1.fd37914220b84p-01, 0x1.52e9d7b772791p-55, 0x1.aa7b724495c03p-04, 0x1.e5399ba0967b8p-58},
	{0x1.fd88da3d12526p-01, -0x1.87df6378811c7p-55, 0x1.917a6bc29b42cp-04, -0x1.e2718d26ed688p-60},
	{0x1.fdd539ff1f456p-01, -0x1.ab13cbbec1781p-56, 0x1.787586a5d5b21p-04, 0x1.5f7589f083399p-58},
	{0x1.fe1cafcbd5b09p-01, 0x1.a23e3202a884ep-57, 0x1.5f6d00a9aa419p-04, -0x1.f4022d03f6c9ap-59},
	{0x1.fe5f3af2e394p-01, 0x1.b213f18c9cf17p-55, 0x1.4661179272096p-04, -0x1.4b109f2406c4cp-58},
	{0x1.fe9cdad01883ap-01, 0x1.521ecd0c67e35p-57, 0x1.2d52092ce19f6p-04, -0x1.9a088a8bf6b2cp-59},
	{0x1.fed58ecb673c4p-01, -0x1.e6e462a7ae686p-56, 0x1.1440134d709b3p-04, -0x1.fec446daea6adp-58},
	{0x1.ff095658e71adp-01, 0x1.01a8ce18a4b9ep-55, 0x1.f656e79f820ep-05, -0x1.2e1ebe392bffep-61},
	{0x1.ff3830f8d575cp-01, -0x1.95e1e79d335f7p-56, 0x1.c428d12c0d7e3p-05, -0x1.89bc74b58c513p-60},
	{0x1.ff621e3796d7ep-01, -0x1.c57bc2e24aa15p-57, 0x1.91f65f10dd814p-05, -0x1.912bd0d569a9p-61},
	{0x1.ff871dadb81dfp-01, 0x1.8b1c676208aa4p-56, 0x1.5fc00d290cd43p-05, 0x1.a2669a693a8e1p-59},
	{0x1.ffa72effef75dp-01, -0x1.8b4cdcdb25956p-55, 0x1.2d865759455cdp-05, 0x1.686f65ba93acp-61},
	{0x1.ffc251df1d3f8p-01, 0x1.7a7d209f32d43p-56, 0x1.f693731d1cf01p-06, -0x1.3fe9bc66286c7p-66},
	{0x1.ffd886084cd0dp-01, -0x1.1354d4556e4cbp-55, 0x1.92155f7a3667ep-06, -0x1.b1d63091a013p-64},
	{0x1.ffe9cb44b51a1p-01, 0x1.5b43366df667p-56, 0x1.2d936bbe30efdp-06, 0x1.b5f91ee371d64p-61},
	{0x1.fff62169b92dbp-01, 0x1.5dda3c81fbd0dp-55, 0x1.921d1fcdec784p-07, 0x1.9878ebe836d9dp-61},
	{0x1.fffd8858e8a92p-01, 0x1.359c71883bcf7p-55, 0x1.921f0fe670071p-08, 0x1.ab967fe6b7a9bp-64},
}
