package ingest

import (
	"bytes"
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
