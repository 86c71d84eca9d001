package agg

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"testing"
)

func TestSketchRoundTripMergesExactly(t *testing.T) {
	// A sketch written and read back must merge exactly as the original
	// (the shard/merge contract; common practice, no source).
	rng := rand.New(rand.NewPCG(8, 9))
	a, b := NewSketch(), NewSketch()
	for i := 0; i < 5000; i++ {
		a.Add(rng.NormFloat64() * math.Exp(rng.NormFloat64()))
		b.Add(float64(rng.IntN(3)) * rng.Float64())
	}
	raw, err := json.Marshal(a)
	if err != nil {
		t.Fatal(err)
	}
	back := NewSketch()
	if err := json.Unmarshal(raw, back); err != nil {
		t.Fatal(err)
	}
	m1, m2 := NewSketch(), NewSketch()
	m1.Merge(a)
	m1.Merge(b)
	m2.Merge(back)
	m2.Merge(b)
	for _, q := range []float64{0, 0.05, 0.5, 0.95, 1} {
		if m1.Quantile(q) != m2.Quantile(q) {
			t.Errorf("q=%v: %v vs %v after round trip", q, m1.Quantile(q), m2.Quantile(q))
		}
	}
	for _, bad := range []string{
		`{"count": 2, "zero": 0, "pos": [[3, 1]], "neg": [], "min": 1, "max": 2}`,
		`{"count": 1, "zero": 0, "pos": [[3, -1]], "neg": [], "min": 1, "max": 2}`,
		`{"count": 2, "zero": 0, "pos": [[3, 1], [2, 1]], "neg": [], "min": 1, "max": 2}`,
		`{"count": 1, "zero": 1, "pos": [], "neg": []}`,
	} {
		if err := json.Unmarshal([]byte(bad), NewSketch()); err == nil {
			t.Errorf("accepted %s", bad)
		}
	}
}

func TestSketchJSONWithOverflowingSum(t *testing.T) {
	// A sum of values near the float64 limit overflows to +Inf (IEEE 754);
	// the stored form must still round-trip (common practice, no source).
	s := NewSketch()
	s.Add(math.MaxFloat64)
	s.Add(math.MaxFloat64)
	raw, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	var back Sketch
	if err := json.Unmarshal(raw, &back); err != nil {
		t.Fatal(err)
	}
	again, _ := json.Marshal(&back)
	if string(raw) != string(again) {
		t.Errorf("round trip changed the sketch:\n%s\n%s", raw, again)
	}
}

func TestExactFloatKeepsItsBits(t *testing.T) {
	// IEEE 754 binary64: every bit pattern, NaN payloads and −0 included,
	// survives the stored form (common practice, no source).
	for _, v := range []float64{
		0, math.Copysign(0, -1), 0.1, -2.5e-310, math.MaxFloat64, math.SmallestNonzeroFloat64,
		math.Inf(1), math.Inf(-1), math.NaN(), math.Float64frombits(0x7ff0000000000001), math.Float64frombits(0xfff8000000000123),
	} {
		b, err := json.Marshal(ExactFloat(v))
		if err != nil {
			t.Fatalf("%v: %v", v, err)
		}
		var got ExactFloat
		if err := json.Unmarshal(b, &got); err != nil {
			t.Fatalf("%v (%s): %v", v, b, err)
		}
		if math.Float64bits(float64(got)) != math.Float64bits(v) {
			t.Errorf("%#x → %s → %#x", math.Float64bits(v), b, math.Float64bits(float64(got)))
		}
	}
	for _, bad := range []string{`"Inf"`, `"NaN:0x1"`, `"NaN:0xzz"`, `true`, `"1"`, `null`, `1e400`} {
		var got ExactFloat
		if err := json.Unmarshal([]byte(bad), &got); err == nil {
			t.Errorf("%s read as %v", bad, got)
		}
	}
}
