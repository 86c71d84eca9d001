package sensitivity

import (
	"bytes"
	"encoding/json"
	"testing"
)

// FuzzScreenState feeds arbitrary bytes to Screen.UnmarshalJSON: it must
// never panic, and a state it accepts must store again, restore to the
// same bytes, give a Result, and take further draws. Seeds are in
// testdata/fuzz/FuzzScreenState and below.
func FuzzScreenState(f *testing.F) {
	m := compile(f, twoInputs)
	for _, n := range []int{0, 3, 80} {
		s := NewScreen(m, 50)
		if err := s.Add(synthetic(n)); err != nil {
			f.Fatal(err)
		}
		raw, err := json.Marshal(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(raw)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		s := NewScreen(m, 50)
		if err := s.UnmarshalJSON(data); err != nil {
			return
		}
		raw, err := json.Marshal(s)
		if err != nil {
			t.Fatalf("accepted state does not store again: %v", err)
		}
		back := NewScreen(m, 50)
		if err := back.UnmarshalJSON(raw); err != nil {
			t.Fatalf("stored state does not restore: %v", err)
		}
		if again, _ := json.Marshal(back); !bytes.Equal(raw, again) {
			t.Fatal("restored state stores different bytes")
		}
		s.Result()
		_ = s.Add(synthetic(60)) // may fail on a draw kept twice, never panic
		s.Result()
	})
}
