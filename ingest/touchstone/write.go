package touchstone

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"strconv"
	"strings"
)

// Format says how Write writes.
//
// Empty fields take these defaults: Version 1, Parameter S, Format RI,
// FrequencyUnit GHz, R 50 (or the ports' reference impedance when they all
// share one).
type Format struct {
	Version       int     // 1 or 2
	Parameter     string  // S, Y, Z (H, G for 2 ports): converted from the Network's S
	Format        string  // DB, MA, RI
	FrequencyUnit string  // Hz, kHz, MHz, GHz
	R             float64 // reference resistance of the option line (default 50)
	Comments      []string
}

// zeroDB is what DB format writes for an exact zero: 10^(-7000/20)
// underflows to exactly 0 in float64, so the zero reads back as zero.
const zeroDB = -7000

// Write writes n as a Touchstone file in the form f describes.
// Numbers are written with the shortest representation that reads back to
// the same float64 (strconv 'g', -1), so RI data round-trips exactly and DB,
// MA and Y/Z/H/G data to within the rounding of the conversions.
//
// A version-1 file has one reference resistance: every port's Z0 must
// equal R. Version 2 writes [Reference] when the ports differ from R.
// Complex reference impedances are not written.
func Write(w io.Writer, n *Network, f Format) error {
	if err := checkNetwork(n); err != nil {
		return err
	}
	if f.Version == 0 {
		f.Version = 1
	}
	if f.Version != 1 && f.Version != 2 {
		return fmt.Errorf("touchstone: version %d: expected 1 or 2", f.Version)
	}
	param := strings.ToUpper(f.Parameter)
	if param == "" {
		param = "S"
	}
	switch param {
	case "S", "Y", "Z":
	case "H", "G":
		if n.Ports != 2 {
			return fmt.Errorf("touchstone: %s-parameters need 2 ports, the network has %d", param, n.Ports)
		}
	default:
		return fmt.Errorf("touchstone: parameter %q: expected S, Y, Z, H or G", f.Parameter)
	}
	format := strings.ToUpper(f.Format)
	if format == "" {
		format = "RI"
	}
	if format != "RI" && format != "MA" && format != "DB" {
		return fmt.Errorf("touchstone: format %q: expected DB, MA or RI", f.Format)
	}
	unitName, unit := "GHz", 1e9
	if f.FrequencyUnit != "" {
		var ok bool
		unitName = f.FrequencyUnit
		unit, ok = map[string]float64{"hz": 1, "khz": 1e3, "mhz": 1e6, "ghz": 1e9}[strings.ToLower(unitName)]
		if !ok {
			return fmt.Errorf("touchstone: frequency unit %q: expected Hz, kHz, MHz or GHz", f.FrequencyUnit)
		}
	}
	N := n.Ports
	R := f.R
	if R == 0 {
		R = 50
		if allEqual(n.Z0) {
			R = n.Z0[0]
		}
	}
	if !(R > 0) || math.IsInf(R, 0) {
		return fmt.Errorf("touchstone: reference resistance %v is not positive", f.R)
	}
	sameAsR := true
	for _, z := range n.Z0 {
		if math.Abs(z-R) > 1e-12*R {
			sameAsR = false
		}
	}
	if f.Version == 1 && !sameAsR {
		return fmt.Errorf("touchstone: the ports' reference impedances %v differ from R %v: a version-1 file has one reference resistance (write version 2)", n.Z0, R)
	}
	if f.Version == 1 && len(n.Noise) > 0 && n.Noise[0].FrequencyHz > n.FrequencyHz[len(n.FrequencyHz)-1] {
		return fmt.Errorf("touchstone: a version-1 noise block must start at or below the last network frequency (write version 2)")
	}

	bw := bufio.NewWriter(w)
	for _, c := range f.Comments {
		for _, l := range strings.Split(strings.ReplaceAll(c, "\r\n", "\n"), "\n") {
			bw.WriteString("! " + strings.TrimRight(l, " \t\r") + "\n")
		}
	}
	if f.Version == 2 {
		bw.WriteString("[Version] 2.0\n")
	}
	fmt.Fprintf(bw, "# %s %s %s R %s\n", unitName, param, format, formatNum(R))
	if f.Version == 2 {
		fmt.Fprintf(bw, "[Number of Ports] %d\n", N)
		if N == 2 {
			bw.WriteString("[Two-Port Data Order] 12_21\n")
		}
		fmt.Fprintf(bw, "[Number of Frequencies] %d\n", len(n.FrequencyHz))
		if len(n.Noise) > 0 {
			fmt.Fprintf(bw, "[Number of Noise Frequencies] %d\n", len(n.Noise))
		}
		if !sameAsR {
			bw.WriteString("[Reference]")
			for _, z := range n.Z0 {
				bw.WriteString(" " + formatNum(z))
			}
			bw.WriteString("\n")
		}
		bw.WriteString("[Network Data]\n")
	}

	m := make([]complex128, N*N)
	order := writeOrder(N, f.Version)
	var ws []complex128
	num := make([]byte, 0, 64)
	for k, fHz := range n.FrequencyHz {
		copy(m, n.S[k*N*N:(k+1)*N*N])
		if param != "S" {
			if err := fromS(m, param, n.Z0, f.Version, R, &ws); err != nil {
				return fmt.Errorf("touchstone: %s-parameters at %v Hz: %v", param, fHz, err)
			}
		}
		num = strconv.AppendFloat(num[:0], fHz/unit, 'g', -1, 64)
		bw.Write(num)
		// 1- and 2-port points on one line; larger matrices one row per
		// line, at most four pairs a line (the version-1 layout).
		for p, idx := range order {
			if N > 2 && p > 0 && (p%N == 0 || (p%N)%4 == 0) {
				bw.WriteString("\n")
			}
			a, b := pair(m[idx], format)
			bw.WriteByte(' ')
			bw.Write(strconv.AppendFloat(num[:0], a, 'g', -1, 64))
			bw.WriteByte(' ')
			bw.Write(strconv.AppendFloat(num[:0], b, 'g', -1, 64))
		}
		bw.WriteString("\n")
	}
	if len(n.Noise) > 0 {
		if f.Version == 2 {
			bw.WriteString("[Noise Data]\n")
		}
		for _, p := range n.Noise {
			rn := p.EffectiveNoiseResistanceOhm
			if f.Version == 1 {
				rn /= R
			}
			mag, ang := cmplx.Abs(p.GammaOpt), cmplx.Phase(p.GammaOpt)*180/math.Pi
			fmt.Fprintf(bw, "%s %s %s %s %s\n", formatNum(p.FrequencyHz/unit), formatNum(p.MinNoiseFigureDB),
				formatNum(mag), formatNum(ang), formatNum(rn))
		}
	}
	if f.Version == 2 {
		bw.WriteString("[End]\n")
	}
	return bw.Flush()
}

// writeOrder lists the row-major matrix indices in the order the file
// holds them: 11 21 12 22 for a version-1 2-port, row-major otherwise
// (version 2 declares 12_21 for 2 ports).
func writeOrder(N, version int) []int {
	if N == 2 && version == 1 {
		return []int{0, 2, 1, 3}
	}
	o := make([]int, N*N)
	for i := range o {
		o[i] = i
	}
	return o
}

func pair(c complex128, format string) (float64, float64) {
	switch format {
	case "RI":
		return real(c), imag(c)
	case "MA":
		return cmplx.Abs(c), cmplx.Phase(c) * 180 / math.Pi
	}
	mag := cmplx.Abs(c)
	if mag == 0 {
		return zeroDB, 0
	}
	return 20 * math.Log10(mag), cmplx.Phase(c) * 180 / math.Pi
}

func allEqual(v []float64) bool {
	for _, x := range v {
		if x != v[0] {
			return false
		}
	}
	return len(v) > 0
}

func checkNetwork(n *Network) error {
	if n == nil || n.Ports < 1 {
		return fmt.Errorf("touchstone: the network has no ports")
	}
	N := n.Ports
	if len(n.FrequencyHz) == 0 {
		return fmt.Errorf("touchstone: the network has no frequency points")
	}
	if len(n.S) != len(n.FrequencyHz)*N*N {
		return fmt.Errorf("touchstone: %d S values for %d frequencies of a %d-port network: expected %d", len(n.S), len(n.FrequencyHz), N, len(n.FrequencyHz)*N*N)
	}
	if len(n.Z0) != N {
		return fmt.Errorf("touchstone: %d reference impedances for %d ports", len(n.Z0), N)
	}
	if n.Z0Complex != nil {
		return fmt.Errorf("touchstone: complex reference impedances are not written")
	}
	for _, z := range n.Z0 {
		if !(z > 0) || math.IsInf(z, 0) {
			return fmt.Errorf("touchstone: reference impedance %v is not positive", z)
		}
	}
	for k, f := range n.FrequencyHz {
		if math.IsNaN(f) || math.IsInf(f, 0) || f < 0 || (k > 0 && f <= n.FrequencyHz[k-1]) {
			return fmt.Errorf("touchstone: frequency %v at index %d is not above the previous one, or not a finite non-negative number", f, k)
		}
	}
	for _, s := range n.S {
		if cmplx.IsNaN(s) || cmplx.IsInf(s) {
			return fmt.Errorf("touchstone: an S value is not finite")
		}
	}
	if len(n.Noise) > 0 && N != 2 {
		return fmt.Errorf("touchstone: noise parameters need 2 ports, the network has %d", N)
	}
	for k, p := range n.Noise {
		bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
		if bad(p.FrequencyHz) || p.FrequencyHz < 0 || (k > 0 && p.FrequencyHz <= n.Noise[k-1].FrequencyHz) ||
			bad(p.MinNoiseFigureDB) || cmplx.IsNaN(p.GammaOpt) || cmplx.IsInf(p.GammaOpt) || bad(p.EffectiveNoiseResistanceOhm) {
			return fmt.Errorf("touchstone: noise point %d is not finite or its frequency is not above the previous one", k)
		}
	}
	return nil
}
