package ingest

import (
	"bytes"
	"testing"
)

// BenchmarkTouchstoneScanLine times the number scanner alone on the data
// lines of the benchmark files.
func BenchmarkTouchstoneScanLine(b *testing.B) {
	for _, format := range benchFormats {
		data := benchFile(b, 2000, format)
		var lines [][]byte
		for _, l := range bytes.Split(data, []byte("\n")) {
			if len(l) > 0 && l[0] != '!' && l[0] != '#' {
				lines = append(lines, l)
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
