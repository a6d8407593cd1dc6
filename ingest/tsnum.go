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
	const (
		kHi   = 0x1.542a5a12e1c5bp-03  // log2(10)/20 rounded to a float64
		kLo   = -0x1.33e2bb36cd142p-57 // log2(10)/20 - kHi
		round = 0x1.8p52               // adding it rounds to an integer
		c1    = math.Ln2
		c2    = math.Ln2 * math.Ln2 / 2
		c3    = math.Ln2 * math.Ln2 * math.Ln2 / 6
		c4    = math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 / 24
		c5    = math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 / 120
		c6    = math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 * math.Ln2 / 720
	)
	x := db * kHi
	if !(math.Abs(x) < 1020) {
		return math.Exp(db * (math.Ln10 / 20))
	}
	e := math.FMA(db, kHi, -x) + db*kLo // x + e is db*log2(10)/20
	kd := (x*64 + round) - round        // x*64 to the nearest integer
	k := int64(kd)
	r := (x - kd*(1.0/64)) + e                       // the subtraction is exact
	p := r * (c1 + r*(c2+r*(c3+r*(c4+r*(c5+r*c6))))) // 2^r - 1
	t := &tsExp2Tab[k&63]
	y := t[0] + (t[0]*p + t[1])
	return y * math.Float64frombits(uint64(k>>6+1023)<<52)
}

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

// tsPolarPairs sets m[p] to tsPolar(vals[2p], vals[2p+1]) for each p: the
// pairs of an MA record, or of a DB record with db set (the magnitude is
// then tsExp10DB of the first of each pair). The same computations,
// written out in one loop rather than two calls a pair. It reports false
// when a magnitude in dB is too large for a float64; m is then not all
// set.
func tsPolarPairs(m []complex128, vals []float64, db bool) bool {
	const (
		pi4a = 7.85398125648498535156e-1  // as in tsPolar
		pi4b = 3.77489470793079817668e-8  //
		pi4c = 2.69515142907905952645e-15 //
	)
	vals = vals[:2*len(m)]
	for p := range m {
		mag, deg := vals[2*p], vals[2*p+1]
		if db {
			mag = tsExp10DB(mag)
			if mag > math.MaxFloat64 {
				return false
			}
		}
		x := deg * (math.Pi / 180)
		ax := math.Abs(x)
		if x == 0 || !(ax < 1<<29) {
			m[p] = tsPolar(mag, deg)
			continue
		}
		j := int64(ax * (4 / math.Pi))
		j += j & 1
		y := float64(j)
		z := ((ax - y*pi4a) - y*pi4b) - y*pi4c
		zz := z * z
		cos := 1.0 - 0.5*zz + zz*zz*((((((tsCosCoef[0]*zz)+tsCosCoef[1])*zz+tsCosCoef[2])*zz+tsCosCoef[3])*zz+tsCosCoef[4])*zz+tsCosCoef[5])
		sin := z + z*zz*((((((tsSinCoef[0]*zz)+tsSinCoef[1])*zz+tsSinCoef[2])*zz+tsSinCoef[3])*zz+tsSinCoef[4])*zz+tsSinCoef[5])
		o := uint64(j) & 7
		half := o >> 2
		swap := (o >> 1) & 1
		sb, cb := math.Float64bits(sin), math.Float64bits(cos)
		d := (sb ^ cb) & -swap
		sb ^= d
		cb ^= d
		sb ^= half<<63 ^ math.Float64bits(x)&(1<<63)
		cb ^= (half ^ swap) << 63
		m[p] = complex(mag*math.Float64frombits(cb), mag*math.Float64frombits(sb))
	}
	return true
}
