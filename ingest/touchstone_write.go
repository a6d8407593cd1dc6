package ingest

import "io"

// TouchstoneFormat says how WriteTouchstone writes.
type TouchstoneFormat struct {
	Version       int     // 1 or 2
	Parameter     string  // S, Y, Z (H, G for 2 ports): converted from the Network's S
	Format        string  // DB, MA, RI
	FrequencyUnit string  // Hz, kHz, MHz, GHz
	R             float64 // reference resistance of the option line (default 50)
	Comments      []string
}

// WriteTouchstone writes n in Touchstone form as f says.
func WriteTouchstone(w io.Writer, n *Network, f TouchstoneFormat) error {
	return errUnfinished
}
