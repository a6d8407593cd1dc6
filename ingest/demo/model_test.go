package demo

import (
	"math"
	"testing"
	"time"
)

// TestModelPhysics: the model obeys the relations of method.md, which the
// archive's numbers are built from.
func TestModelPhysics(t *testing.T) {
	// k*T0 = -173.975 dBm/Hz (method.md section 2, from the exact SI k).
	if math.Abs(KT0DBmPerHz-(-173.975)) > 0.0005 {
		t.Errorf("k*T0 = %.5f dBm/Hz; expected -173.975", KT0DBmPerHz)
	}
	tr, err := Plan(Options{Units: 8, Beams: 16, Points: 11})
	if err != nil {
		t.Fatal(err)
	}
	tenLogT0 := 10 * math.Log10(T0K) // 24.624 dB (method.md section 2)
	for i := range tr.Runs {
		r := &tr.Runs[i]
		for b := range r.Beams {
			for _, f := range tr.FrequenciesHz(11) {
				gt := r.GTdBPerK(b, f)
				tests := []struct {
					name string
					got  float64
				}{
					// Noise-density form: G/T = G_aut - N_rel - 10*log10(T0).
					{"noise-density form", r.GainDBi(b, f) - r.NoiseRelativeKT0DB(b, f) - tenLogT0},
					// System-noise-figure form: G/T = RL - NF_sys - 10*log10(T0).
					{"system-noise-figure form", r.RangeLossDB(f) - r.SystemNoiseFigureDB(b, f) - tenLogT0},
					// G/T = G_p/(T_A + T_e) with T_A = T_amb in the chamber.
					{"G_p/(T_amb+T_e)", r.PassiveGainDBi(b, f) - 10*math.Log10(r.AmbientK()+r.ReceiverNoiseK(f))},
					// Operating G/T at T_A = T_amb is the chamber G/T.
					{"projection to T_amb", r.OperatingGTdBPerK(b, f, r.AmbientK())},
				}
				for _, tc := range tests {
					if math.Abs(tc.got-gt) > 1e-9 {
						t.Fatalf("%s %s %g Hz: %s gives %.12f; G/T %.12f", r.Dir, r.Beams[b].ID, f, tc.name, tc.got, gt)
					}
				}
				// Gain transfer: the mean of pre and post is the range loss.
				if d := (r.RangeLossPreDB(f)+r.RangeLossPostDB(f))/2 - r.RangeLossDB(f); math.Abs(d) > 1e-12 {
					t.Fatalf("%s: pre/post mean differs from the range loss by %g", r.Dir, d)
				}
				// Scan law: G_p(theta) - G_p(0) = 10*n*log10(cos theta).
				bm := &r.Beams[b]
				b0 := bm.Pol * len(beamStates)
				want := 10 * r.ScanExponent * math.Log10(math.Cos(bm.ThetaDeg*math.Pi/180))
				if d := r.PassiveGainDBi(b, f) - r.PassiveGainDBi(b0, f) - want; math.Abs(d) > 1e-12 {
					t.Fatalf("%s %s: scan loss off by %g dB", r.Dir, bm.ID, d)
				}
			}
		}
	}
}

// TestScenarioPlanted: the default scenario plants what sample-archive is
// meant to show.
func TestScenarioPlanted(t *testing.T) {
	tr, err := Plan(Options{})
	if err != nil {
		t.Fatal(err)
	}
	if tr.Options != (Options{Units: 8, Seed: 1, Beams: 16, Points: 801}) {
		t.Fatalf("defaults %+v", tr.Options)
	}
	roles := map[string]int{}
	for _, u := range tr.Units {
		roles[u.Role]++
	}
	want := map[string]int{RoleNormal: 2, RoleElementFault: 2, RoleRetest: 1, RoleMarginal: 1, RoleRangeDrift: 1, RoleOutlier: 1, RoleCheck: 1}
	for role, n := range want {
		if roles[role] != n {
			t.Errorf("%d units with role %s; want %d", roles[role], role, n)
		}
	}
	// Nine production runs (8 units, one retest), then the check unit's:
	// every other day over the production's 8 days (at least three runs).
	if len(tr.Runs) != 14 || tr.CheckUnit != CheckUnitSerial {
		t.Fatalf("%d runs, check unit %q; want 9 production runs and 5 of the check unit", len(tr.Runs), tr.CheckUnit)
	}
	for _, r := range tr.Runs[9:] {
		if r.Serial != CheckUnitSerial || r.Started.Hour() != 7 {
			t.Errorf("check unit run %s %s", r.Serial, r.Started)
		}
	}
	// The range event: the range loss steps up by RangeEventDB from the
	// run at 90 % of the production runs on (the last of the nine).
	if tr.RangeStepFrom != 8 || tr.RangeStepDB != RangeEventDB {
		t.Errorf("range event from run %d by %g dB", tr.RangeStepFrom, tr.RangeStepDB)
	}
	for i, r := range tr.Runs[:9] {
		stepped := r.RangeLossCentreDB > 50.8+0.2
		if stepped != (i == 8) {
			t.Errorf("run %d: range loss %.3f dB at centre; the event is run 8", i, r.RangeLossCentreDB)
		}
	}
	// Runs on consecutive days, inside the reference's calibration period.
	calibrated := time.Date(2026, 1, 15, 0, 0, 0, 0, time.UTC)
	due := time.Date(2027, 1, 15, 0, 0, 0, 0, time.UTC)
	for i, r := range tr.Runs[:9] {
		day := r.Started.Truncate(24 * time.Hour)
		if want := firstDay.AddDate(0, 0, i); !day.Equal(want) {
			t.Errorf("run %d on %s; want %s", i, day.Format(time.DateOnly), want.Format(time.DateOnly))
		}
		if !r.Started.After(calibrated) || !r.Started.Before(due) {
			t.Errorf("run %d at %s is outside the calibration period", i, r.Started)
		}
	}
	// The model's boresight G/T margin against the spec's limit.
	margin := func(r *RunTruth) float64 {
		m := math.Inf(1)
		for _, f := range tr.FrequenciesHz(201) {
			x := (f - tr.StartHz) / (tr.StopHz - tr.StartHz)
			l := tr.GTLimitDB[0] + x*(tr.GTLimitDB[1]-tr.GTLimitDB[0])
			for b := range r.Beams {
				if r.Beams[b].ThetaDeg == 0 {
					m = math.Min(m, r.GTdBPerK(b, f)-l)
				}
			}
		}
		return m
	}
	for ui, u := range tr.Units {
		if u.Role == RoleCheck {
			continue
		}
		switch u.Role {
		case RoleRetest:
			first, last := &tr.Runs[u.Runs[0]], tr.Acceptance(ui)
			if len(u.Runs) != 2 || margin(first) > -0.5 || margin(last) < 0.5 || !first.Started.Before(last.Started) {
				t.Errorf("retest %s: runs %v, margins %.2f then %.2f; want a failing run, then a passing one", u.Serial, u.Runs, margin(first), margin(last))
			}
		case RoleOutlier:
			if m := margin(tr.Acceptance(ui)); m > -0.5 {
				t.Errorf("outlier %s: margin %.2f dB; want a clear fail", u.Serial, m)
			}
		case RoleMarginal:
			if m := margin(tr.Acceptance(ui)); m < 0 || m > 0.6 {
				t.Errorf("marginal %s: margin %.2f dB; want 0 to 0.6 (inside the guard band)", u.Serial, m)
			}
		case RoleElementFault:
			r := tr.Acceptance(ui)
			if r.ElementBlock == nil || elementErrorRMS(r.ElementBlock) < 1.5*tr.ElementToleranceDeg {
				t.Errorf("element fault %s: block %+v", u.Serial, r.ElementBlock)
			}
		}
		r := tr.Acceptance(ui)
		for _, f := range []float64{tr.StartHz, tr.CentreHz, tr.StopHz} {
			over := math.Abs(r.RangeDriftDB(f)) > tr.DriftToleranceDB
			if over != (u.Role == RoleRangeDrift) {
				t.Errorf("%s (%s): drift %.3f dB at %g Hz against tolerance %g", u.Serial, u.Role, r.RangeDriftDB(f), f, tr.DriftToleranceDB)
			}
		}
		if u.Role != RoleElementFault && r.ElementBlock != nil {
			t.Errorf("%s (%s) has an element block", u.Serial, u.Role)
		}
	}
	// The planted slow drift: T_e of the units without a planted noise
	// fault rises with test order (least-squares slope, K per run).
	var xs, ys []float64
	for _, r := range tr.Runs {
		if r.Role != RoleMarginal && r.Role != RoleOutlier {
			xs = append(xs, float64(r.Order))
			ys = append(ys, r.ReceiverNoiseCentreK)
		}
	}
	mx, my := mean(xs), mean(ys)
	var sxy, sxx float64
	for i := range xs {
		sxy += (xs[i] - mx) * (ys[i] - my)
		sxx += (xs[i] - mx) * (xs[i] - mx)
	}
	if slope := sxy / sxx; slope < 2 {
		t.Errorf("T_e rises by %.2f K per run over the lot; the planted drift is 40 K over 8 units", slope)
	}
}

func mean(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s / float64(len(x))
}
