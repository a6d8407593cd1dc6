package ingest

import (
	"encoding/json"
	"strings"
	"testing"
)

// TestReadTouchstoneProblems checks that a refusal of the Touchstone
// reader (the touchstone package's tests have every kind) comes out of
// ReadTouchstone as a *Problem naming the file and the line, and a refusal
// at a limit of a build at the line that passes it.
func TestReadTouchstoneProblems(t *testing.T) {
	for _, tc := range []struct {
		name, file, text string
		line             int
		msg              string
	}{
		{"text in a number column", "u/a/b00.s2p", "# GHz S RI R 50\n1 0 0 abc 0 0 0 0 0\n", 2, `"abc", is not a number`},
		{"decreasing frequency", "b.s1p", "# GHz S RI R 50\n1 0 0\n2 0 0\n1.5 0 0\n", 4, "frequency 1.5 is not above the previous 2"},
		{"the file as a whole", "c.s2p", "! nothing\n", 0, "no network data"},
		{"declared past the limit", "d.ts", "[Version] 2.0\n# GHz S RI R 50\n[Number of Ports] 1\n[Number of Frequencies] 100002\n", 4,
			"[Number of Frequencies] 100,002 is past the limit of a trace; expected at most 100,001 points"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadTouchstone(strings.NewReader(tc.text), tc.file)
			p, ok := err.(*Problem)
			if !ok || p.File != tc.file || p.Line != tc.line || !strings.Contains(p.Message, tc.msg) {
				t.Errorf("got %T %v, want a *Problem at %s:%d saying %q", err, err, tc.file, tc.line, tc.msg)
			}
		})
	}
}

func TestNetworkJSON(t *testing.T) {
	n, err := ReadTouchstone(strings.NewReader("# GHz S RI R 50\n1 0.1 0.2 0.3 0.4 0.5 0.6 0.7 0.8\n"), "a.s2p")
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(NetworkJSON(n))
	if err != nil {
		t.Fatal(err)
	}
	// Version-1 2-port order is S11 S21 S12 S22 (Touchstone specification).
	want := `{"ports":2,"frequency_hz":[1000000000],"z0":[50,50],"s":[[[[0.1,0.2],[0.5,0.6]],[[0.3,0.4],[0.7,0.8]]]]}`
	if string(b) != want {
		t.Errorf("got  %s\nwant %s", b, want)
	}
}
