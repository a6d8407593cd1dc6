package ingest

import (
	"bytes"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"testing"
)

// BenchmarkTouchstoneScanLine times the number scanner alone on the data
// lines of the benchmark files (each line in its own buffer with room
// after it, the line ending first, as the reader's lines have).
func BenchmarkTouchstoneScanLine(b *testing.B) {
	for _, format := range benchFormats {
		data := benchFile(b, 2000, format)
		var lines [][]byte
		for _, l := range bytes.Split(data, []byte("\n")) {
			if len(l) > 0 && l[0] != '!' && l[0] != '#' {
				buf := make([]byte, len(l), len(l)+64)
				copy(buf, l)
				buf[:len(l)+1][len(l)] = '\n'
				lines = append(lines, buf)
			}
		}
		b.Run(format, func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			dst := make([]float64, 0, 64)
			for b.Loop() {
				for _, l := range lines {
					vals, bad := tsScanLine(l, dst[:0])
					if bad >= 0 || len(vals) != 9 {
						b.Fatal(string(l))
					}
				}
			}
		})
	}
}

// TestTouchstoneScanFast checks the line scanner with room after the line
// (where tsScanFast reads past its end) against the same line without room
// (tsScanRun and the rest only, which TestTouchstoneNumbers checks against
// strconv.ParseFloat): the same numbers bit for bit, the same bad token.
// The bytes after the line are random digits, points, signs and spaces,
// which must not change a number that ends the line.
func TestTouchstoneScanFast(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	odd := []string{"1.5", "-0.25", "+1.25", ".5", "-.5", "5.", "-5.", "0.", "123.456", "999.999", "1234.5",
		"-0", "12", "1e5", "1.2e3", "1.2E-3", "1.2.3", "1.5-2", "-", "+", ".", "--1", "1x", "0x10", "١",
		"0.1234567890123456789", "1.234567890123456789", "12.34567890123456789", "123.4567890123456789",
		"0.000000000000000001", "9.999999999999999999", "900.71992547409931", "9007199.254740993",
		"0.12345678", "0.123456789", "0.1234567890123456", "0.12345678901234567", "-0.0000000000000000",
		"0.000000000000000000000001", "0.000000000000000000000123", "-0.00000000000000000001234", "1.000000000000000000000000",
		"0.00000000000000000000001", "0.0000000000000000000000012345678"}
	seps := []string{" ", "\t", "  ", " \t "}
	for it := 0; it < 300000; it++ {
		var line []byte
		for j, nt := 0, 1+rng.IntN(9); j < nt; j++ {
			if j > 0 {
				line = append(line, seps[rng.IntN(len(seps))]...)
			}
			switch x := (rng.Float64() - 0.5) * math.Pow(10, float64(rng.IntN(8)-3)); rng.IntN(4) {
			case 0:
				line = append(line, odd[rng.IntN(len(odd))]...)
			case 1:
				line = strconv.AppendFloat(line, x, 'g', -1, 64)
			default:
				line = strconv.AppendFloat(line, x, 'f', rng.IntN(19), 64)
			}
		}
		buf := make([]byte, len(line), len(line)+tsFastPad+rng.IntN(8))
		copy(buf, line)
		after := buf[len(line):cap(buf)]
		for j := range after {
			after[j] = "0123456789.-+eE \t\n!"[rng.IntN(19)]
		}
		want, wbad := tsScanLine(slices.Clip(buf), nil)
		got, gbad := tsScanLine(buf, nil)
		if gbad != wbad || len(got) != len(want) {
			t.Fatalf("%q: got %v (bad token %d), want %v (%d)", line, got, gbad, want, wbad)
		}
		for j := range want {
			if math.Float64bits(got[j]) != math.Float64bits(want[j]) {
				t.Fatalf("%q: got %v, want %v", line, got, want)
			}
		}
	}
}
