package touchstone

import (
	"errors"
	"math"
	"math/cmplx"
)

// This file converts between S and the other parameters a file may hold
// (Y, Z, H, G), with the ports' real reference impedances.

var errSingular = errors.New("the matrix cannot be converted (it is singular)")

// zToS replaces Z (ohms) by S: with zn = D Z D, D = diag(1/sqrt(z0)),
// S = (zn - I)(zn + I)^-1, which for real positive z0 is both the
// power-wave form F (Z - Z0)(Z + Z0)^-1 F^-1 and the pseudo-wave form.
func zToS(m []complex128, z0 []float64, ws *[]complex128) error {
	N := len(z0)
	a, b := scratch(ws, N)
	for i := 0; i < N; i++ {
		for j := 0; j < N; j++ {
			zn := m[i*N+j] / complex(math.Sqrt(z0[i]*z0[j]), 0)
			a[i*N+j], b[i*N+j] = zn, zn
		}
		a[i*N+i]++
		b[i*N+i]--
	}
	// (zn + I) and (zn - I) commute, so S = (zn + I)^-1 (zn - I).
	if !solve(a, b, N) {
		return errSingular
	}
	copy(m, b)
	return nil
}

// yToS replaces Y (siemens) by S = (I - yn)(I + yn)^-1, yn = D^-1 Y D^-1.
func yToS(m []complex128, z0 []float64, ws *[]complex128) error {
	N := len(z0)
	a, b := scratch(ws, N)
	for i := 0; i < N; i++ {
		for j := 0; j < N; j++ {
			yn := m[i*N+j] * complex(math.Sqrt(z0[i]*z0[j]), 0)
			a[i*N+j], b[i*N+j] = yn, -yn
		}
		a[i*N+i]++
		b[i*N+i]++
	}
	if !solve(a, b, N) {
		return errSingular
	}
	copy(m, b)
	return nil
}

// hToZ replaces 2-port H by Z: z11 = det H / h22, z12 = h12 / h22,
// z21 = -h21 / h22, z22 = 1 / h22.
func hToZ(m []complex128) error {
	h11, h12, h21, h22 := m[0], m[1], m[2], m[3]
	if h22 == 0 {
		return errSingular
	}
	m[0] = (h11*h22 - h12*h21) / h22
	m[1] = h12 / h22
	m[2] = -h21 / h22
	m[3] = 1 / h22
	return nil
}

// gToZ replaces 2-port G (the inverse of H) by Z: z11 = 1 / g11,
// z12 = -g12 / g11, z21 = g21 / g11, z22 = det G / g11.
func gToZ(m []complex128) error {
	g11, g12, g21, g22 := m[0], m[1], m[2], m[3]
	if g11 == 0 {
		return errSingular
	}
	m[0] = 1 / g11
	m[1] = -g12 / g11
	m[2] = g21 / g11
	m[3] = (g11*g22 - g12*g21) / g11
	return nil
}

func scratch(ws *[]complex128, N int) (a, b []complex128) {
	if cap(*ws) < 2*N*N {
		*ws = make([]complex128, 2*N*N)
	}
	w := (*ws)[:2*N*N]
	return w[:N*N], w[N*N:]
}

// solve overwrites b (N x N) with a^-1 b by Gaussian elimination with
// partial pivoting; a is destroyed. It reports false for a singular a.
func solve(a, b []complex128, N int) bool {
	for c := 0; c < N; c++ {
		p, best := c, cmplx.Abs(a[c*N+c])
		for r := c + 1; r < N; r++ {
			if v := cmplx.Abs(a[r*N+c]); v > best {
				p, best = r, v
			}
		}
		if best == 0 || math.IsNaN(best) {
			return false
		}
		if p != c {
			for j := 0; j < N; j++ {
				a[c*N+j], a[p*N+j] = a[p*N+j], a[c*N+j]
				b[c*N+j], b[p*N+j] = b[p*N+j], b[c*N+j]
			}
		}
		inv := 1 / a[c*N+c]
		for r := 0; r < N; r++ {
			if r == c {
				continue
			}
			f := a[r*N+c] * inv
			if f == 0 {
				continue
			}
			for j := c; j < N; j++ {
				a[r*N+j] -= f * a[c*N+j]
			}
			for j := 0; j < N; j++ {
				b[r*N+j] -= f * b[c*N+j]
			}
		}
	}
	for r := 0; r < N; r++ {
		inv := 1 / a[r*N+r]
		for j := 0; j < N; j++ {
			b[r*N+j] *= inv
		}
	}
	for _, v := range b {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return false
		}
	}
	return true
}

// fromS converts one S matrix in place to param, with per-port real
// reference impedances z0; version 1 normalises to R.
func fromS(m []complex128, param string, z0 []float64, version int, R float64, ws *[]complex128) error {
	N := len(z0)
	a, b := scratch(ws, N)
	switch param {
	case "Z", "H", "G":
		// zn = (I - S)^-1 (I + S); Z = D^-1 zn D^-1.
		for i := range m {
			a[i], b[i] = -m[i], m[i]
		}
		for i := 0; i < N; i++ {
			a[i*N+i]++
			b[i*N+i]++
		}
		if !solve(a, b, N) {
			return errSingular
		}
		for i := 0; i < N; i++ {
			for j := 0; j < N; j++ {
				m[i*N+j] = b[i*N+j] * complex(math.Sqrt(z0[i]*z0[j]), 0)
			}
		}
	case "Y":
		// yn = (I + S)^-1 (I - S); Y = D yn D.
		for i := range m {
			a[i], b[i] = m[i], -m[i]
		}
		for i := 0; i < N; i++ {
			a[i*N+i]++
			b[i*N+i]++
		}
		if !solve(a, b, N) {
			return errSingular
		}
		for i := 0; i < N; i++ {
			for j := 0; j < N; j++ {
				m[i*N+j] = b[i*N+j] / complex(math.Sqrt(z0[i]*z0[j]), 0)
			}
		}
	}
	switch param {
	case "H":
		z11, z12, z21, z22 := m[0], m[1], m[2], m[3]
		if z22 == 0 {
			return errSingular
		}
		m[0], m[1], m[2], m[3] = (z11*z22-z12*z21)/z22, z12/z22, -z21/z22, 1/z22
	case "G":
		z11, z12, z21, z22 := m[0], m[1], m[2], m[3]
		if z11 == 0 {
			return errSingular
		}
		m[0], m[1], m[2], m[3] = 1/z11, -z12/z11, z21/z11, (z11*z22-z12*z21)/z11
	}
	if version == 1 {
		r := complex(R, 0)
		switch param {
		case "Z":
			for i := range m {
				m[i] /= r
			}
		case "Y":
			for i := range m {
				m[i] *= r
			}
		case "H":
			m[0] /= r
			m[3] *= r
		case "G":
			m[0] *= r
			m[3] /= r
		}
	}
	for _, v := range m {
		if cmplx.IsNaN(v) || cmplx.IsInf(v) {
			return errSingular
		}
	}
	return nil
}
