package touchstone

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"
)

// FuzzReadTouchstone feeds arbitrary bytes to the reader under a version-1
// or version-2 name. It must never panic; a refusal must be an *Error; an
// accepted network must be consistent, and writing it as version-2 RI in
// Hz must read back to exactly the same values.
func FuzzReadTouchstone(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join(corpusDir, "*", "*"))
	for _, p := range files {
		// Large files (a 10,000-point export) only slow the fuzzer down.
		if data, err := os.ReadFile(p); err == nil && len(data) <= 64<<10 && (filepath.Ext(p) == ".ts" || portsFromName(p) > 0) {
			f.Add(data, uint8(portsFromName(p)))
		}
	}
	for _, s := range []string{
		"",
		"\xef\xbb\xbf",
		"#",
		"# GHz S RI R 50\n1 0 0\n",
		"# GHz S DB R 50\n1 -7000 0\n2 1e308 0\n",
		"# GHz Z RI R (50+50j)\n1 1 0\n",
		"# GHz S RI R 50 75\n1 0.5 0.25 0 0 0 0 0 0\n",
		"# MHz H MA R 1\n2 .95 -26 3.57 157 .04 76 .66 -14\n",
		"# MHz G MA R 1\n2 0 -26 3.57 157 .04 76 .66 -14\n",
		"2 0 0 0 0 0 0 0 0\n1 1 0.5 0 0.4\n0.5 1 0.5 0 0.4\n",
		"[Version] 2.0\n# GHz S RI\n[Number of Ports] 3\n[Matrix Format] Lower\n[Reference]\n50\n50 ! c\n50\n[Number of Frequencies] 1\n[Network Data]\n1 11 0\n21 0 22 0\n31 0 32 0 33 0\n[End]\n",
		"[Version] 2.0\n# GHz S MA\n[Number of Ports] 2\n[Two-Port Data Order] 21_12\n[Number of Frequencies] 1\n[Number of Noise Frequencies] 1\n[Network Data]\n1 1 0 1 0 1 0 1 0\n[Noise Data]\n2 1 0.5 0 20\n[End]\n",
		"[Version] 2.0\n[Begin Information]\n[End Information]\n",
		"[Version] 2.0\n# GHz Y RI\n[Number of Ports] 1000\n[Network Data]\n1 0 0\n",
		"[Version] 2.0\n# GHz Y RI\n[Number of Ports] 1000\n[Number of Frequencies] 100000\n[Network Data]\n1 0 0\n",
		"1 1e-400 1e400\n",
		"1 0.0000000000000000000000001 123456789012345678901234567890\n",
	} {
		for _, ports := range []uint8{0, 1, 2, 3, 4} {
			f.Add([]byte(s), ports)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte, ports uint8) {
		name := "fuzz.ts"
		if ports > 0 {
			name = fmt.Sprintf("fuzz.s%dp", ports%40)
		}
		n, err := readTest(bytes.NewReader(data), name)
		if err != nil {
			var e *Error
			if !errors.As(err, &e) || e.Line < 0 {
				t.Fatalf("error %T %v is not an *Error with a line", err, err)
			}
			return
		}
		N := n.Ports
		if N < 1 || len(n.FrequencyHz) == 0 || len(n.S) != len(n.FrequencyHz)*N*N || len(n.Z0) != N {
			t.Fatalf("inconsistent network: %d ports, %d points, %d S, %d z0", N, len(n.FrequencyHz), len(n.S), len(n.Z0))
		}
		for k, f := range n.FrequencyHz {
			if math.IsNaN(f) || math.IsInf(f, 0) || f < 0 || k > 0 && f <= n.FrequencyHz[k-1] {
				t.Fatalf("frequency %d = %v after %v", k, f, n.FrequencyHz[max(k-1, 0)])
			}
		}
		for _, s := range n.S {
			if cmplx.IsNaN(s) || cmplx.IsInf(s) {
				t.Fatalf("S value %v", s)
			}
		}
		if n.Z0Complex != nil {
			return
		}
		var buf bytes.Buffer
		if err := Write(&buf, &Network{Ports: N, FrequencyHz: n.FrequencyHz, Z0: n.Z0, S: n.S},
			Format{Version: 2, Format: "RI", FrequencyUnit: "Hz"}); err != nil {
			t.Fatalf("write: %v", err)
		}
		back, err := readTest(&buf, "back.ts")
		if err != nil {
			t.Fatalf("read back: %v", err)
		}
		for k := range n.FrequencyHz {
			if back.FrequencyHz[k] != n.FrequencyHz[k] {
				t.Fatalf("frequency %d: %v, wrote %v", k, back.FrequencyHz[k], n.FrequencyHz[k])
			}
		}
		for i := range n.S {
			if back.S[i] != n.S[i] {
				t.Fatalf("S %d: %v, wrote %v", i, back.S[i], n.S[i])
			}
		}
	})
}
