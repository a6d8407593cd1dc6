package ingest

import (
	"bytes"
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
	"unicode"
)

func TestReadTrace(t *testing.T) {
	// Unit prefixes k = 1e3, M = 1e6, G = 1e9 (SI Brochure, 9th ed., table 7).
	// The frequency is scaled on its decimal text, so it must equal the Go
	// literal of the same number written in Hz exactly.
	cases := []struct {
		name   string
		in     string
		column string
		freq   []float64
		values []float64
	}{
		{"ghz", "frequency_ghz,noise_dbm_hz\n10.7,-141.2\n11.2,-141\n", "noise_dbm_hz", []float64{10.7e9, 11.2e9}, []float64{-141.2, -141}},
		{"mhz", "frequency_mhz,s21_db\n10700,-9\n10700.5,-9.5\n", "s21_db", []float64{10700e6, 10700.5e6}, []float64{-9, -9.5}},
		{"khz", "frequency_khz,v\n1e7,1\n1.5E7,2\n", "v", []float64{1e10, 1.5e10}, []float64{1, 2}},
		{"hz", "frequency_hz,v\n1.07e10,0.5\n12000000000,+0.25\n", "v", []float64{1.07e10, 1.2e10}, []float64{0.5, 0.25}},
		{"bom crlf comments blanks", "\ufeff# header comment\r\n\r\nfrequency_ghz , nf_db \r\n  # mid comment\r\n10.7 , 1.9\r\n\r\n11.7,1.8\r\n", "nf_db", []float64{10.7e9, 11.7e9}, []float64{1.9, 1.8}},
		{"upper-case unit", "FREQUENCY_GHZ,v\n.5,-.5\n", "v", []float64{0.5e9}, []float64{-0.5}},
		{"no final newline", "frequency_ghz,v\n1,2", "v", []float64{1e9}, []float64{2}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tr, err := ReadTrace(strings.NewReader(c.in), "x.csv")
			if err != nil {
				t.Fatal(err)
			}
			if tr.Column != c.column || tr.File != "x.csv" {
				t.Errorf("column %q file %q", tr.Column, tr.File)
			}
			if !reflect.DeepEqual(tr.FrequencyHz, c.freq) || !reflect.DeepEqual(tr.Values, c.values) {
				t.Errorf("got %v %v, want %v %v", tr.FrequencyHz, tr.Values, c.freq, c.values)
			}
		})
	}
}

func TestReadTraceErrors(t *testing.T) {
	cases := []struct {
		name string
		in   string
		line int
		want string
	}{
		{"empty", "", 0, "file is empty"},
		{"only comments", "# nothing\n\n", 0, "file is empty"},
		{"header unit", "freq,v\n1,2\n", 1, `"freq" is not a frequency column with its unit`},
		{"header fields", "frequency_ghz,a,b\n1,2,3\n", 1, "expected 2"},
		{"header empty column", "frequency_ghz,\n1,2\n", 1, "has 1 field; expected 2"},
		{"no data", "frequency_ghz,v\n# c\n", 1, "no data lines"},
		{"decreasing", "# c\nfrequency_hz,v\n11.3e9,1\n11.2e9,2\n", 4, "frequency 11.2e9 is not above the previous 11.3e9"},
		{"repeated", "frequency_ghz,v\n1,1\n1.0,2\n", 3, "is not above the previous 1"},
		{"text in value", "frequency_ghz,v\n1,abc\n", 2, `v "abc": is not a number`},
		{"text in frequency", "frequency_ghz,v\n1,1\nx2,1\n", 3, `frequency "x2": is not a number`},
		{"comma decimal", "frequency_ghz,v\n1,1,5\n", 2, "3 fields"},
		{"one field", "frequency_ghz,v\n1,1\n2\n", 3, `1 field in "2"`},
		{"empty value", "frequency_ghz,v\n1, ,\n", 2, "empty"},
		{"nan", "frequency_ghz,v\n1,NaN\n", 2, "is not a number"},
		{"inf", "frequency_ghz,v\n1,inf\n", 2, "is not a number"},
		{"hex", "frequency_ghz,v\n0x1p3,1\n", 2, "is not a number"},
		{"overflow", "frequency_ghz,v\n1,1e400\n", 2, "out of range"},
		{"huge exponent", "frequency_ghz,v\n1e99999999999,1\n", 2, "out of range"},
		{"zero frequency", "frequency_hz,v\n0,1\n", 2, "not positive"},
		{"negative frequency", "frequency_hz,v\n-1,1\n", 2, "not positive"},
		{"control in column", "frequency_hz,a\rb\n1,1\n", 1, "control character"},
		{"binary", "frequency_hz,v\n1,\xff\xfe\n", 2, "not UTF-8"},
		{"long line", "frequency_hz,v\n" + strings.Repeat("1", maxLineBytes+10) + ",1\n", 2, "longer than"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadTrace(strings.NewReader(c.in), "b00-noise.csv")
			var p *Problem
			if !errors.As(err, &p) {
				t.Fatalf("error %v is not a *Problem", err)
			}
			if p.File != "b00-noise.csv" || p.Line != c.line || !strings.Contains(p.Message, c.want) {
				t.Errorf("got %q (line %d), want line %d containing %q", p.Error(), p.Line, c.line, c.want)
			}
		})
	}
}

func TestWriteTraceRoundTrip(t *testing.T) {
	// The frequencies include values whose GHz text has no exact binary form
	// (10.7e9/1e9 = 10.700000000000001 in float64 arithmetic), so a writer
	// that divided by 1e9 would not read back exactly.
	tr := &Trace{
		Column:      "noise_dbm_hz",
		FrequencyHz: []float64{1, 0.1, 10.7e9, 10.7e9 + 1, 11.200000000000001e9, 123456789.123, 1e30, math.Nextafter(12e9, 13e9)},
		Values:      []float64{-141.2, 0, 1e-300, -0.1, 1.0 / 3, math.MaxFloat64, -5e-324, 7},
	}
	// Sort frequencies: the format needs them increasing.
	tr.FrequencyHz = []float64{0.1, 1, 123456789.123, 10.7e9, 10.7e9 + 1, 11.200000000000001e9, math.Nextafter(12e9, 13e9), 1e30}
	for _, unit := range []string{"hz", "kHz", "frequency_mhz", "GHZ"} {
		var buf bytes.Buffer
		if err := WriteTrace(&buf, tr, unit); err != nil {
			t.Fatal(err)
		}
		back, err := ReadTrace(&buf, "rt.csv")
		if err != nil {
			t.Fatalf("%s: %v\n%s", unit, err, buf.String())
		}
		if !reflect.DeepEqual(back.FrequencyHz, tr.FrequencyHz) || !reflect.DeepEqual(back.Values, tr.Values) || back.Column != tr.Column {
			t.Errorf("%s: round trip changed the trace:\n got %v %v\nwant %v %v", unit, back.FrequencyHz, back.Values, tr.FrequencyHz, tr.Values)
		}
	}
	var buf bytes.Buffer
	if err := WriteTrace(&buf, &Trace{Column: "v", FrequencyHz: []float64{10.7e9, 11.2e9}, Values: []float64{1, 2}}, "ghz"); err != nil {
		t.Fatal(err)
	}
	if got, want := buf.String(), "frequency_ghz,v\n10.7,1\n11.2,2\n"; got != want {
		t.Errorf("WriteTrace wrote %q, want %q", got, want)
	}
	for _, bad := range []struct {
		tr   *Trace
		unit string
	}{
		{&Trace{Column: "v"}, "thz"},
		{&Trace{Column: "a,b"}, "hz"},
		{&Trace{Column: "v", FrequencyHz: []float64{1}}, "hz"},
		{&Trace{Column: "v", FrequencyHz: []float64{1}, Values: []float64{math.NaN()}}, "hz"},
	} {
		if err := WriteTrace(&bytes.Buffer{}, bad.tr, bad.unit); err == nil {
			t.Errorf("WriteTrace(%+v, %q) accepted", bad.tr, bad.unit)
		}
	}
}

func TestFormatScaled(t *testing.T) {
	cases := []struct {
		v    float64
		exp  int
		want string
	}{
		{10.7e9, -9, "10.7"},
		{1e10, -9, "10"},
		{5e5, -9, "0.0005"},
		{1e3, -9, "1e-6"},
		{-2.5e9, -9, "-2.5"},
		{1e30, -9, "1e21"},
		{0, -9, "0"},
	}
	for _, c := range cases {
		if got := formatScaled(c.v, c.exp); got != c.want {
			t.Errorf("formatScaled(%v, %d) = %q, want %q", c.v, c.exp, got, c.want)
		}
	}
}

func TestReadElements(t *testing.T) {
	in := "# element state (demo data)\nrow,col,amplitude_db,phase_deg\n0,0,0.0,0.0\n0,1,-0.2,3.5\r\n1,0,0.1,-2\n"
	got, err := ReadElements(strings.NewReader(in), "elements.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := []Element{{0, 0, 0, 0}, {0, 1, -0.2, 3.5}, {1, 0, 0.1, -2}}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("got %v, want %v", got, want)
	}
	bad := []struct {
		name, in string
		line     int
		want     string
	}{
		{"empty", "", 0, "file is empty"},
		{"header", "row,col,amp,phase\n", 1, "expected row,col,amplitude_db,phase_deg"},
		{"no rows", "row,col,amplitude_db,phase_deg\n", 1, "no elements"},
		{"fields", "row,col,amplitude_db,phase_deg\n0,0,1\n", 2, "3 fields"},
		{"negative index", "row,col,amplitude_db,phase_deg\n0,-1,0,0\n", 2, "col \"-1\" is not a non-negative integer"},
		{"fraction index", "row,col,amplitude_db,phase_deg\n0.5,1,0,0\n", 2, "row \"0.5\""},
		{"text amplitude", "row,col,amplitude_db,phase_deg\n0,1,x,0\n", 2, "amplitude_db \"x\""},
		{"text phase", "row,col,amplitude_db,phase_deg\n0,1,0,-\n", 2, "phase_deg \"-\""},
		{"duplicate", "row,col,amplitude_db,phase_deg\n0,1,0,0\n1,1,0,0\n0,1,0,0\n", 4, "already on line 2"},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadElements(strings.NewReader(c.in), "elements.csv")
			var p *Problem
			if !errors.As(err, &p) {
				t.Fatalf("error %v is not a *Problem", err)
			}
			if p.Line != c.line || !strings.Contains(p.Message, c.want) {
				t.Errorf("got %q, want line %d containing %q", p.Error(), c.line, c.want)
			}
		})
	}
}

func TestReadReferenceTable(t *testing.T) {
	got, err := readReferenceTable(strings.NewReader("frequency_ghz,gain_dbi,uncertainty_db\r\n10.5,19.9,0.3\r\n12,20.7,0.3\r\n"), "t.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := []ReferencePoint{{10.5e9, 19.9, 0.3, 2}, {12e9, 20.7, 0.3, 3}}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("got %v, want %v", got, want)
	}
	bad := []struct {
		name, in string
		line     int
		want     string
	}{
		{"header", "frequency_hz,gain_dbi,uncertainty_db\n1,2,3\n", 1, "expected frequency_ghz,gain_dbi,uncertainty_db"},
		{"decreasing", "frequency_ghz,gain_dbi,uncertainty_db\n12,1,0.1\n11,1,0.1\n", 3, "not above the previous 12 GHz"},
		{"negative uncertainty", "frequency_ghz,gain_dbi,uncertainty_db\n12,1,-0.1\n", 2, "negative"},
		{"text", "frequency_ghz,gain_dbi,uncertainty_db\n12,one,0.1\n", 2, "gain_dbi \"one\""},
	}
	for _, c := range bad {
		_, err := readReferenceTable(strings.NewReader(c.in), "t.csv")
		var p *Problem
		if !errors.As(err, &p) || p.Line != c.line || !strings.Contains(p.Message, c.want) {
			t.Errorf("%s: got %v, want line %d containing %q", c.name, err, c.line, c.want)
		}
	}
}

// FuzzReadTrace checks that no input panics, and that whatever is accepted
// keeps the promises of the format and survives a write/read round trip.
func FuzzReadTrace(f *testing.F) {
	for _, s := range []string{
		"frequency_ghz,noise_dbm_hz\n10.7,-141.2\n11.2,-141.0\n",
		"\ufeff# c\r\nfrequency_hz,v\r\n1e9,1\r\n2e9,2\r\n",
		"frequency_mhz,v\n1,1\n1,1\n",
		"frequency_khz,v\n.5,-.5e-3\n",
		"frequency_ghz,v\n1,1e400\n",
		"",
		"frequency_ghz\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		tr, err := ReadTrace(bytes.NewReader(data), "fuzz.csv")
		if err != nil {
			var p *Problem
			if !errors.As(err, &p) || p.File != "fuzz.csv" {
				t.Fatalf("error %v is not a *Problem naming the file", err)
			}
			return
		}
		if len(tr.FrequencyHz) == 0 || len(tr.FrequencyHz) != len(tr.Values) {
			t.Fatalf("accepted %d frequencies and %d values", len(tr.FrequencyHz), len(tr.Values))
		}
		for i, f := range tr.FrequencyHz {
			if !(f > 0) || math.IsInf(f, 0) || math.IsNaN(tr.Values[i]) || math.IsInf(tr.Values[i], 0) {
				t.Fatalf("accepted point %d: %v, %v", i, f, tr.Values[i])
			}
			if i > 0 && f <= tr.FrequencyHz[i-1] {
				t.Fatalf("accepted non-increasing frequency at %d", i)
			}
		}
		if strings.IndexFunc(tr.Column, unicode.IsControl) >= 0 || strings.Contains(tr.Column, ",") {
			t.Fatalf("column name %q", tr.Column)
		}
		var buf bytes.Buffer
		if err := WriteTrace(&buf, tr, "ghz"); err != nil {
			// A column such as "#x" cannot be written back; that is the
			// writer's refusal, not a reader bug.
			return
		}
		back, err := ReadTrace(&buf, "back.csv")
		if err != nil {
			t.Fatalf("written trace does not read back: %v\n%s", err, buf.String())
		}
		if !reflect.DeepEqual(back.FrequencyHz, tr.FrequencyHz) || !reflect.DeepEqual(back.Values, tr.Values) {
			t.Fatalf("round trip changed the trace")
		}
	})
}

// BenchmarkReadTrace reads a 1601-point trace (a common VNA sweep length).
func BenchmarkReadTrace(b *testing.B) {
	var buf bytes.Buffer
	buf.WriteString("frequency_ghz,noise_dbm_hz\n")
	for i := 0; i < 1601; i++ {
		buf.WriteString(formatScaled(10.7e9+float64(i)*1.25e6, -9) + ",-141.25\n")
	}
	data := buf.Bytes()
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, err := ReadTrace(bytes.NewReader(data), "b.csv"); err != nil {
			b.Fatal(err)
		}
	}
}
