package render

import (
	"bytes"
	"math"
	"testing"

	"gtpack.example/gtpack/reduce"
)

// forgetSkeletons empties the store of workbook skeletons.
func forgetSkeletons() {
	skeletons.Lock()
	skeletons.m, skeletons.bytes = nil, 0
	skeletons.Unlock()
}

// A unit workbook is the same whether its skeleton was made for it or
// kept from a unit of the same shape with other values, and units of
// other shapes get skeletons of their own.
func TestUnitWorkbookKeptSkeleton(t *testing.T) {
	first := fixtureUnit(t, 3, 41)
	// Same shape, other values and text: another unit of the product.
	second := fixtureUnit(t, 3, 41)
	second.Serial, second.Product, second.Started = "KP16-00018 <&>", "KU-PANEL-16 & co", mustTime("2026-11-04T10:00:00Z")
	second.Verdict = reduce.VerdictFail
	for i := range second.Beams {
		for k := range second.Beams[i].GainDBi {
			second.Beams[i].GainDBi[k] -= 0.75
			second.Beams[i].GTdBPerK[k] -= 0.75
		}
	}
	second.Limits[0].WorstMarginDB = -0.4
	// Another shape with as many beams, points and limits: one beam is
	// steered elsewhere (its chart's title changes).
	other := fixtureUnit(t, 3, 41)
	other.Beams[1].ThetaDeg = 25

	forgetSkeletons()
	fresh, err := UnitWorkbook(second)
	if err != nil {
		t.Fatal(err)
	}
	forgetSkeletons()
	freshOther, err := UnitWorkbook(other)
	if err != nil {
		t.Fatal(err)
	}

	forgetSkeletons()
	for _, u := range []*reduce.Unit{first, other} {
		if _, err := UnitWorkbook(u); err != nil {
			t.Fatal(err)
		}
	}
	skeletons.Lock()
	made := len(skeletons.m)
	skeletons.Unlock()
	if made != 2 {
		t.Errorf("%d skeletons made for two shapes", made)
	}
	kept, err := UnitWorkbook(second)
	if err != nil {
		t.Fatal(err)
	}
	keptOther, err := UnitWorkbook(other)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(kept, fresh) {
		t.Errorf("the workbook on a kept skeleton differs from the one on its own (%d and %d bytes)", len(kept), len(fresh))
	}
	if !bytes.Equal(keptOther, freshOther) {
		t.Errorf("the other shape's workbook differs on a kept skeleton")
	}
	if bytes.Equal(kept, freshOther) {
		t.Errorf("two shapes gave the same workbook")
	}
	// The kept skeleton's slots hold the second unit's title and date.
	d := readWorkbook(t, kept)
	if want := "G/T acceptance workbook, unit " + second.Serial; d.Props.Title != want {
		t.Errorf("title %q, want %q", d.Props.Title, want)
	}
	if d.Props.Created != "2026-11-04T10:00:00" {
		t.Errorf("created %q, want 2026-11-04T10:00:00", d.Props.Created)
	}
	s := d.sheet(t, "Summary")
	if s.cell(2, 2) != second.Serial || s.cell(7, 2) != string(reduce.VerdictFail) {
		t.Errorf("Summary B2 %v, B7 %v: the second unit's serial and verdict expected", s.cell(2, 2), s.cell(7, 2))
	}
	checkZipTimes(t, kept, startedTime(second.Started))
}

// bandEdge rounds the band outwards to 0.1 GHz and passes over
// frequencies that are not finite.
func TestBandEdge(t *testing.T) {
	nan := math.NaN()
	for _, c := range []struct {
		hz       []float64
		lo, hi   float64
		describe string
	}{
		{[]float64{10.7e9, 11e9, 12.75e9}, 10.7, 12.8, "a Ku-band grid"},
		{[]float64{nan, 10.75e9, 12.7e9, math.Inf(1)}, 10.7, 12.7, "ends not finite"},
		{[]float64{nan}, 0, 0, "nothing finite"},
		{nil, 0, 0, "no grid"},
	} {
		if lo, hi := bandEdge(c.hz, false), bandEdge(c.hz, true); math.Abs(lo-c.lo) > 1e-12 || math.Abs(hi-c.hi) > 1e-12 {
			t.Errorf("%s: %v to %v, want %v to %v", c.describe, lo, hi, c.lo, c.hi)
		}
	}
}

// The store of skeletons holds at most maxSkeletonBytes, however large and
// many the shapes: eleven shapes of 256 beams (some 0.85 MB each) do not
// all stay.
func TestSkeletonStoreBounded(t *testing.T) {
	forgetSkeletons()
	defer forgetSkeletons()
	for points := 11; points < 22; points++ {
		if _, err := UnitWorkbook(fixtureUnit(t, 256, points)); err != nil {
			t.Fatal(err)
		}
		skeletons.Lock()
		n, size := len(skeletons.m), skeletons.bytes
		skeletons.Unlock()
		if size > maxSkeletonBytes || n == 0 {
			t.Fatalf("after %d shapes: %d skeletons of %d bytes, more than %d", points-10, n, size, maxSkeletonBytes)
		}
		if points == 21 && n == 11 {
			t.Errorf("all eleven skeletons of %d bytes are kept", size)
		}
	}
}
