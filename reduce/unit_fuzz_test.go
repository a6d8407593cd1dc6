package reduce

import (
	"encoding/binary"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"gtpack.example/gtpack/ingest"
)

// FuzzReduceUnit feeds ReduceUnit traces whose grids, lengths and values come from the fuzzer
// (unsorted, duplicated, NaN, infinite, mismatched lengths). ReduceUnit must not reach its
// panic guard, and its result must encode as JSON (which refuses NaN and Inf).
func FuzzReduceUnit(f *testing.F) {
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16})
	f.Add([]byte("\x00\x00\x00\x00\x00\x00\xf8\x7f0123456789abcdefghij"))
	f.Fuzz(func(t *testing.T, data []byte) {
		next := func() float64 {
			if len(data) < 2 {
				return 0
			}
			v := binary.LittleEndian.Uint16(data)
			data = data[2:]
			switch v % 17 {
			case 0:
				return math.NaN()
			case 1:
				return math.Inf(1)
			}
			return 10e9 + float64(v)*1e5 // around 10 to 16.5 GHz
		}
		trace := func(n int) ([]float64, []float64) {
			var fs, vs []float64
			for i := 0; i < n; i++ {
				fs = append(fs, next())
				vs = append(vs, (next()-13e9)/1e8)
			}
			return fs, vs
		}
		in := synthInput(synthOptions{points: 11, thetas: []float64{0, 30}, bothForms: true})
		n := 3
		if len(data) > 0 {
			n = int(data[0]%7) + 1
		}
		fs, vs := trace(n)
		in.Data.RangePre.FrequencyHz, in.Data.RangePre.ParameterDB = fs, vs
		fs, vs = trace(n + 1)
		in.Data.Beams[0].Transmission.FrequencyHz, in.Data.Beams[0].Transmission.ParameterDB = fs, vs
		fs, vs = trace(n)
		in.Data.Beams[1].Noise[0].FrequencyHz, in.Data.Beams[1].Noise[0].Values = fs, vs
		fs, _ = trace(2)
		in.Spec.Limits[0].Points = []ingest.LimitPoint{lp(fs[0], 1), lp(fs[1], 2)}
		u := ReduceUnit(in)
		for _, p := range u.Problems {
			if strings.Contains(p.Message, "internal error") {
				t.Fatalf("ReduceUnit panicked: %s", p.Message)
			}
		}
		if _, err := json.Marshal(u); err != nil {
			t.Fatalf("result does not encode: %v", err)
		}
	})
}
