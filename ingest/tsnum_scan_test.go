package ingest

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
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

// TestTouchstoneScanFast checks the line scanner, with room after the line
// (where tsScanFast reads past its end) and without (the line is copied),
// against each token read alone by tsParseNumber (tsScan, which
// TestTouchstoneNumbers checks against strconv.ParseFloat): the same
// numbers bit for bit, the same bad token. The bytes after the line are
// random digits, points, signs and spaces, which must not change a number
// that ends the line.
func TestTouchstoneScanFast(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	odd := []string{"1.5", "-0.25", "+1.25", ".5", "-.5", "5.", "-5.", "0.", "123.456", "999.999", "1234.5",
		"-0", "12", "1e5", "1.2e3", "1.2E-3", "1.2.3", "1.5-2", "-", "+", ".", "--1", "1x", "0x10", "١",
		"0.1234567890123456789", "1.234567890123456789", "12.34567890123456789", "123.4567890123456789",
		"0.000000000000000001", "9.999999999999999999", "900.71992547409931", "9007199.254740993",
		"0.12345678", "0.123456789", "0.1234567890123456", "0.12345678901234567", "-0.0000000000000000",
		"0.000000000000000000000001", "0.000000000000000000000123", "-0.00000000000000000001234", "1.000000000000000000000000",
		"0.00000000000000000000001", "0.0000000000000000000000012345678",
		"1000000000", "1000000000.5", "-999999999999999", "123456789012345", "1234567890123456", "12345678901234.56789",
		"123456789012345.6789012345", "99999999999.99999999", "18446744073709551615", "0000000000000001.5",
		"1.5e-05", "-9.87654321E+02", "1e-400", "1e308", "1e309", "2.5e", "2.5e+", "2.5e-", "2.5e1234", "2.5e0005", "4.9e-324",
		"1.7976931348623157e308", "9007199254740993e-5", "5e22", "5e23", "123456789012345678e-30", "1.e5", ".5e-3", "1e+"}
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
		var want []float64
		wbad := -1
		for j, tok := range tsFields(line) {
			v, ok := tsParseNumber(tok)
			if !ok {
				wbad = j
				break
			}
			want = append(want, v)
		}
		for _, b := range [][]byte{buf, slices.Clip(buf)} {
			got, gbad := tsScanLine(b, nil)
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
}

// TestTouchstonePlainLines reads files with plainLines (data lines straight
// from the read buffer) and without it (every line through nextLine and
// data), and wants the same network, bit for bit, or the same error. The
// files: the corpus; networks written by WriteTouchstone and as
// instruments write them (fixed digits, one point a line), some larger
// than the read buffer; and each of those changed at random places: a
// comment line or a comment after the numbers, a blank line, CRLF, a line
// wrapped, a line repeated (a frequency not above the one before), a
// number spoiled, a keyword, the file cut short.
func TestTouchstonePlainLines(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 16))
	type file struct {
		name string
		data []byte
	}
	var files []file
	if paths, err := filepath.Glob(filepath.Join(corpusDir, "*", "*")); err == nil {
		for _, p := range paths {
			if data, err := os.ReadFile(p); err == nil && (filepath.Ext(p) == ".ts" || tsPortsFromName(p) > 0) {
				files = append(files, file{filepath.Base(p), data})
			}
		}
	}
	instrument := func(n *Network, format, unit string, digits int) []byte {
		scale := map[string]float64{"Hz": 1, "kHz": 1e3, "MHz": 1e6, "GHz": 1e9}[unit]
		var buf bytes.Buffer
		fmt.Fprintf(&buf, "! instrument-style file, made-up data\n# %s S %s R 50\n", unit, format)
		N := n.Ports
		for k, f := range n.FrequencyHz {
			buf.WriteString(strconv.FormatFloat(f/scale, 'f', 6, 64))
			for j := 0; j < N*N; j++ {
				idx := j
				if N == 2 {
					idx = []int{0, 2, 1, 3}[j]
				}
				a, b := tsPair(n.S[k*N*N+idx], format)
				fmt.Fprintf(&buf, " %s %s", strconv.FormatFloat(a, 'g', digits, 64), strconv.FormatFloat(b, 'g', digits, 64))
			}
			buf.WriteString("\n")
		}
		return buf.Bytes()
	}
	for it := 0; it < 40; it++ {
		ports := 1 + rng.IntN(4)
		points := 1 + rng.IntN(60)
		if it%8 == 0 {
			points = 3000 + rng.IntN(2000) // past the 256 KiB read buffer
		}
		z0 := make([]float64, ports)
		for i := range z0 {
			z0[i] = 50
		}
		n := randomNetwork(rng, ports, points, z0)
		format := []string{"RI", "MA", "DB"}[rng.IntN(3)]
		unit := []string{"Hz", "kHz", "MHz", "GHz"}[rng.IntN(4)]
		name := fmt.Sprintf("gen%d.s%dp", it, ports)
		if it%2 == 0 && ports <= 2 {
			files = append(files, file{name, instrument(n, format, unit, 6+rng.IntN(5))})
			continue
		}
		var buf bytes.Buffer
		if err := WriteTouchstone(&buf, n, TouchstoneFormat{Version: 1 + rng.IntN(2), Parameter: "S", Format: format, FrequencyUnit: unit}); err != nil {
			t.Fatal(err)
		}
		files = append(files, file{name, buf.Bytes()})
	}
	changes := []func(lines [][]byte, k int) [][]byte{
		func(l [][]byte, k int) [][]byte { return slices.Insert(l, k, []byte("! a comment")) },
		func(l [][]byte, k int) [][]byte { l[k] = append(slices.Clip(l[k]), " ! a comment"...); return l },
		func(l [][]byte, k int) [][]byte { return slices.Insert(l, k, []byte("   ")) },
		func(l [][]byte, k int) [][]byte { l[k] = append(slices.Clip(l[k]), '\r'); return l },
		func(l [][]byte, k int) [][]byte {
			if len(l[k]) < 2 {
				return l
			}
			if i := bytes.IndexByte(l[k][1:], ' '); i >= 0 {
				l[k] = slices.Concat(l[k][:i+1], []byte("\n"), l[k][i+2:])
			}
			return l
		},
		func(l [][]byte, k int) [][]byte { return slices.Insert(l, k, slices.Clone(l[k])) },
		func(l [][]byte, k int) [][]byte {
			if len(l[k]) > 0 {
				l[k] = slices.Clone(l[k])
				l[k][rng.IntN(len(l[k]))] = "x.-e 9\t"[rng.IntN(7)]
			}
			return l
		},
		func(l [][]byte, k int) [][]byte { return slices.Insert(l, k, []byte("[End]")) },
		func(l [][]byte, k int) [][]byte { return l[:k] },
	}
	cases := 0
	for _, f := range files {
		variants := [][]byte{f.data}
		for v := 0; v < 6; v++ {
			lines := bytes.Split(slices.Clone(f.data), []byte("\n"))
			for c := 0; c < 1+rng.IntN(3) && len(lines) > 0; c++ {
				lines = changes[rng.IntN(len(changes))](lines, rng.IntN(len(lines)))
			}
			variants = append(variants, bytes.Join(lines, []byte("\n")))
		}
		for _, data := range variants {
			cases++
			want, werr := readTouchstone(bytes.NewReader(data), f.name, false)
			got, gerr := readTouchstone(bytes.NewReader(data), f.name, true)
			if (werr == nil) != (gerr == nil) || werr != nil && werr.Error() != gerr.Error() {
				t.Fatalf("%s: error %v, want %v", f.name, gerr, werr)
			}
			if werr == nil && !reflect.DeepEqual(got, want) {
				t.Fatalf("%s: networks differ", f.name)
			}
		}
	}
	t.Logf("%d files read both ways", cases)
}
