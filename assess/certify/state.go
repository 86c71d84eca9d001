package certify

import (
	"cmp"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"

	"holdfast/assess/agg"
)

// The stored form of a Summary (MarshalJSON): every count, the pattern
// tables as lists sorted by key, the listed draws in index order, and the
// widest unresolved interval with its bits kept (agg.ExactFloat). Version
// changes when the meaning of a field does.
const stateVersion = 1

type summaryJSON struct {
	Version     int            `json:"version"`
	Seen        int64          `json:"seen"`
	Checked     int64          `json:"checked"`
	Certified   int64          `json:"certified"`
	Unresolved  int64          `json:"unresolved"`
	Evals       int64          `json:"evals"`
	MaxWidth    agg.ExactFloat `json:"max_width"`
	Regimes     []regimeJSON   `json:"regimes"`
	CertRegimes []certJSON     `json:"certified_regimes"`
	Disagreeing int64          `json:"disagreeing"`
	Kinds       []kindJSON     `json:"kinds"`
	Listed      []listedJSON   `json:"listed"`
}

// regimeJSON is a scan pattern code (patternCode) with its count.
type regimeJSON struct {
	Code uint64 `json:"code"`
	N    int64  `json:"n"`
}

// certJSON is a certified pattern: the number of roots, the repelling
// bits ({0, 1} for more than 52 roots) and the count.
type certJSON struct {
	Roots     uint64 `json:"roots"`
	Repelling uint64 `json:"repelling"`
	N         int64  `json:"n"`
}

type kindJSON struct {
	Kind  Kind  `json:"kind"`
	N     int64 `json:"n"`
	First []int `json:"first"`
}

type listedJSON struct {
	Draw  int  `json:"draw"`
	Flags Kind `json:"flags"`
}

// MarshalJSON writes the Summary's complete state, deterministically
// (tables sorted by key), so that UnmarshalJSON restores a Summary that
// behaves exactly as this one: further Add calls, Merge and Result give
// what they would have given on the original.
func (s *Summary) MarshalJSON() ([]byte, error) {
	j := summaryJSON{
		Version: stateVersion,
		Seen:    s.seen, Checked: s.checked, Certified: s.certified, Unresolved: s.unresolved,
		Evals: s.evals, MaxWidth: agg.ExactFloat(s.maxWidth), Disagreeing: s.disagreed,
		Regimes: []regimeJSON{}, CertRegimes: []certJSON{}, Kinds: []kindJSON{}, Listed: []listedJSON{},
	}
	for k, v := range s.all {
		j.Regimes = append(j.Regimes, regimeJSON{k, v})
	}
	slices.SortFunc(j.Regimes, func(a, b regimeJSON) int { return cmp.Compare(a.Code, b.Code) })
	for k, v := range s.cert {
		j.CertRegimes = append(j.CertRegimes, certJSON{k[0], k[1], v})
	}
	slices.SortFunc(j.CertRegimes, func(a, b certJSON) int {
		return cmp.Or(cmp.Compare(a.Roots, b.Roots), cmp.Compare(a.Repelling, b.Repelling))
	})
	for k, l := range s.kinds {
		j.Kinds = append(j.Kinds, kindJSON{k, l.n, append([]int{}, l.first...)})
	}
	slices.SortFunc(j.Kinds, func(a, b kindJSON) int { return cmp.Compare(a.Kind, b.Kind) })
	for _, d := range s.listed {
		j.Listed = append(j.Listed, listedJSON{d.Draw, d.Flags})
	}
	return json.Marshal(j)
}

// UnmarshalJSON restores a Summary written by MarshalJSON. It checks that
// the state is one that Add and Merge can produce (the counts agree with
// each other and with the tables, the lists are sorted and as long as
// their counts say) and returns an error otherwise, leaving s unchanged.
func (s *Summary) UnmarshalJSON(b []byte) error {
	var j summaryJSON
	if err := agg.DecodeStrict(b, &j); err != nil {
		return fmt.Errorf("certify: summary state: %w", err)
	}
	t, err := j.summary()
	if err != nil {
		return fmt.Errorf("certify: summary state: %w", err)
	}
	*s = *t
	return nil
}

// summary validates the stored form and builds the Summary.
func (j *summaryJSON) summary() (*Summary, error) {
	switch {
	case j.Version != stateVersion:
		return nil, fmt.Errorf("version %d, want %d", j.Version, stateVersion)
	case j.Seen < 0 || j.Checked < 0 || j.Certified < 0 || j.Unresolved < 0 || j.Evals < 0 || j.Disagreeing < 0:
		return nil, errors.New("negative count")
	case j.Checked > j.Seen:
		return nil, fmt.Errorf("%d draws checked of %d seen", j.Checked, j.Seen)
	case j.Certified+j.Unresolved != j.Checked || j.Certified > j.Checked:
		return nil, fmt.Errorf("%d certified and %d unresolved, %d checked", j.Certified, j.Unresolved, j.Checked)
	case j.Disagreeing > j.Checked:
		return nil, fmt.Errorf("%d disagreeing of %d checked", j.Disagreeing, j.Checked)
	}
	// The widest unresolved interval starts at +0 and grows by max with
	// widths that Fields accepts (≥ 0, not NaN).
	w := float64(j.MaxWidth)
	if !(w >= 0) || math.Signbit(w) || (j.Unresolved == 0 && w != 0) {
		return nil, fmt.Errorf("widest unresolved interval %v with %d unresolved draws", w, j.Unresolved)
	}
	s := NewSummary()
	s.seen, s.checked, s.certified, s.unresolved = j.Seen, j.Checked, j.Certified, j.Unresolved
	s.evals, s.maxWidth, s.disagreed = j.Evals, w, j.Disagreeing
	var sum int64
	for i, r := range j.Regimes {
		if !validCode(r.Code) || r.N < 1 || i > 0 && r.Code <= j.Regimes[i-1].Code {
			return nil, fmt.Errorf("regime %d: code %#x, count %d", i, r.Code, r.N)
		}
		if r.N > j.Checked-sum {
			break
		}
		sum += r.N
		s.all[r.Code] = r.N
	}
	if sum != j.Checked || len(s.all) != len(j.Regimes) {
		return nil, fmt.Errorf("regimes count %d draws, %d checked", sum, j.Checked)
	}
	sum = 0
	for i, r := range j.CertRegimes {
		key := [2]uint64{r.Roots, r.Repelling}
		if !validCert(key) || r.N < 1 || i > 0 && cmp.Or(cmp.Compare(r.Roots, j.CertRegimes[i-1].Roots), cmp.Compare(r.Repelling, j.CertRegimes[i-1].Repelling)) <= 0 {
			return nil, fmt.Errorf("certified regime %d: %d roots, repelling %#x, count %d", i, r.Roots, r.Repelling, r.N)
		}
		if r.N > j.Certified-sum {
			break
		}
		sum += r.N
		s.cert[key] = r.N
	}
	if sum != j.Certified || len(s.cert) != len(j.CertRegimes) {
		return nil, fmt.Errorf("certified regimes count %d draws, %d certified", sum, j.Certified)
	}
	for i, k := range j.Kinds {
		if bitsSet(uint8(k.Kind)) != 1 || k.Kind > SidesDiffer || i > 0 && k.Kind <= j.Kinds[i-1].Kind {
			return nil, fmt.Errorf("kind %d: %d", i, k.Kind)
		}
		if k.N < 1 || k.N > j.Disagreeing || int64(len(k.First)) != min(k.N, maxFirst) || !slices.IsSorted(k.First) {
			return nil, fmt.Errorf("kind %v: %d draws, first %v", k.Kind, k.N, k.First)
		}
		s.kinds[k.Kind] = &listed{n: k.N, first: slices.Clone(k.First)}
	}
	if int64(len(j.Listed)) != min(j.Disagreeing, MaxListed) {
		return nil, fmt.Errorf("%d listed draws of %d disagreeing", len(j.Listed), j.Disagreeing)
	}
	for i, d := range j.Listed {
		if d.Flags == 0 || d.Flags >= 2*SidesDiffer || i > 0 && d.Draw < j.Listed[i-1].Draw {
			return nil, fmt.Errorf("listed draw %d: index %d, flags %d", i, d.Draw, d.Flags)
		}
		s.listed = append(s.listed, Disagreeing{d.Draw, d.Flags})
	}
	return s, nil
}

func bitsSet(k uint8) int {
	n := 0
	for ; k != 0; k &= k - 1 {
		n++
	}
	return n
}
