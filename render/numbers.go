package render

import (
	"encoding/binary"
	"math"
	"slices"
	"strconv"
)

// Number text shared by the writers: result.json and the unit workbook's
// tables (appendJSONFloat, to 1e-6) and the per-frequency CSV of the report
// (csvNumber, to 0.001 or 0.0001).

// appendDecimal writes v rounded to the given decimals (0 to 6) in the
// shortest form of the rounded value, without exponent or trailing zeros:
// what strconv.FormatFloat(math.Round(v*10^d)/10^d, 'f', -1, 64) writes,
// with "0" for a value that rounds to zero of either sign. v must be
// finite; decimals from 7 to 22 go through strconv.
//
// When |v*10^d| < 1e15 the rounded value is n/10^d for a whole n of at
// most 15 digits: n and 10^d are exact, the quotient is the float64 nearest
// the decimal n/10^d, and that decimal, of at most 15 significant digits,
// is the shortest text that reads back to it (two decimals of 15 digits
// never share a float64), so its digits are written straight from n.
// Larger values go through strconv.
func appendDecimal(b []byte, v float64, decimals int) []byte {
	p := pow10[decimals]
	x := math.Round(v * p)
	if decimals > 6 || !(math.Abs(x) < 1e15) {
		r := x / p
		if r == 0 {
			r = 0
		}
		return strconv.AppendFloat(b, r, 'f', -1, 64)
	}
	n := int64(x)
	if n == 0 {
		return append(b, '0')
	}
	neg := n < 0
	if neg {
		n = -n
	}
	// The text (at most 1 + 15 + 1 digits and signs) is written in place
	// at the end of b: a call to copy a few bytes cost as much as making
	// them.
	if cap(b)-len(b) < 24 {
		b = slices.Grow(b, 24)
	}
	at := len(b)
	d := b[at : at+24]
	i := 0
	if neg {
		d[0] = '-'
		i = 1
	}
	if (decimals == 6 && n < 1e9) || (decimals == 3 && n < 1e6) {
		return b[:at+i+putSmallDecimal(d[i:], uint64(n), decimals)]
	}
	// Division by a constant is a multiplication; by a variable it is
	// one of the slowest instructions.
	var whole, frac int64
	switch decimals {
	case 6:
		whole, frac = n/1e6, n%1e6
	case 3:
		whole, frac = n/1e3, n%1e3
	case 4:
		whole, frac = n/1e4, n%1e4
	default:
		whole, frac = n/int64(p), n%int64(p)
	}
	w := 1
	for w < 15 && whole >= wholePow10[w] {
		w++
	}
	if whole < 1e8 {
		putDigits(d[i:i+w], uint32(whole), w)
	} else { // below 1e15: 7 digits and 8
		putDigits(d[i:i+w-8], uint32(whole/1e8), w-8)
		putDigits(d[i+w-8:i+w], uint32(whole%1e8), 8)
	}
	i += w
	if frac != 0 {
		d[i] = '.'
		putDigits(d[i+1:i+1+decimals], uint32(frac), decimals)
		i += 1 + decimals
		for d[i-1] == '0' {
			i--
		}
	}
	return b[:at+i]
}

// putSmallDecimal writes appendDecimal's common case into d (room for 12
// bytes) and returns its length: n > 0 units of the last of 6 (or 3)
// decimals, with a whole part below 1000. Each group of three digits is
// one table entry, stored four bytes at a time (the fourth is overwritten
// or cut off), and the trailing zeros of the fraction come from a table
// too.
func putSmallDecimal(d []byte, n uint64, decimals int) int {
	i := 0
	var whole, hi, lo uint64
	if decimals == 6 {
		whole, hi, lo = n/1e6, n/1e3%1e3, n%1e3
	} else {
		whole, lo = n/1e3, n%1e3
	}
	w := 1
	if whole >= 10 {
		w++
	}
	if whole >= 100 {
		w++
	}
	binary.LittleEndian.PutUint32(d[i:], digits3[whole]>>(8*(3-w)))
	i += w
	switch {
	case decimals == 6 && lo != 0:
		d[i] = '.'
		binary.LittleEndian.PutUint32(d[i+1:], digits3[hi])
		binary.LittleEndian.PutUint32(d[i+4:], digits3[lo])
		i += 7 - int(zeros3[lo])
	case decimals == 6 && hi != 0:
		d[i] = '.'
		binary.LittleEndian.PutUint32(d[i+1:], digits3[hi])
		i += 4 - int(zeros3[hi])
	case decimals == 3 && lo != 0:
		d[i] = '.'
		binary.LittleEndian.PutUint32(d[i+1:], digits3[lo])
		i += 4 - int(zeros3[lo])
	}
	return i
}

// digits3[x] holds the three decimal digits of x (below 1000) in its low
// three bytes, first digit lowest; zeros3[x] counts their trailing zeros.
var digits3, zeros3 = func() (d [1000]uint32, z [1000]uint8) {
	for x := range d {
		d[x] = uint32('0'+x/100) | uint32('0'+x/10%10)<<8 | uint32('0'+x%10)<<16
		for y := x; z[x] < 3 && y%10 == 0; y /= 10 {
			z[x]++
		}
	}
	return
}()

// wholePow10 holds 10^0 to 10^15.
var wholePow10 = [16]int64{1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15}

// appendUint writes x in decimal.
func appendUint(b []byte, x uint64) []byte {
	if x < 10 {
		return append(b, byte('0'+x))
	}
	var d [20]byte
	i := len(d)
	for x >= 100 {
		r := x % 100
		x /= 100
		i -= 2
		d[i], d[i+1] = digitPairs[2*r], digitPairs[2*r+1]
	}
	if x >= 10 {
		i -= 2
		d[i], d[i+1] = digitPairs[2*x], digitPairs[2*x+1]
	} else {
		i--
		d[i] = byte('0' + x)
	}
	return append(b, d[i:]...)
}

const digitPairs = "00010203040506070809101112131415161718192021222324252627282930313233343536373839" +
	"40414243444546474849505152535455565758596061626364656667686970717273747576777879" +
	"8081828384858687888990919293949596979899"

// putDigits writes the last n decimal digits of x into d[:n], two at a
// time.
func putDigits(d []byte, x uint32, n int) {
	i := n
	for i >= 2 {
		r := x % 100
		x /= 100
		d[i-1], d[i-2] = digitPairs[2*r+1], digitPairs[2*r]
		i -= 2
	}
	if i == 1 {
		d[0] = byte('0' + x%10)
	}
}
