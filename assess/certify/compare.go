package certify

import (
	"math"

	"holdfast/assess/steady"
)

// Compare matches the scan's equilibria found (sorted by X, as steady.Find
// returns them) with the certified roots and unresolved intervals of the
// last report, records the matches (Root.Scan, Box.ScanLo and ScanHi) and
// every disagreement (Report.Disagreements), and returns the report.
//
// A scan equilibrium matches a root when its position lies in the root's
// enclosure, and an unresolved interval when its position (or span, for a
// continuum) meets the interval, both widened by the larger of
// Options.MatchTol·(hi − lo) and 4·XErr. A scan equilibrium that matches
// neither lies where interval arithmetic proves f ≠ 0 (NotARoot); a root
// that no scan equilibrium matches was missed by the scan (MissedByScan);
// a second match of one root is a Duplicate, and a matched scan class
// other than the root's certified class is ClassDiffers.
func (c *Checker) Compare(found []steady.Equilibrium) *Report {
	r := &c.rep
	r.Disagreements = r.Disagreements[:0]
	for i := range r.Roots {
		r.Roots[i].Scan = -1
	}
	for i := range r.Unresolved {
		r.Unresolved[i].ScanLo, r.Unresolved[i].ScanHi = 0, 0
	}
	width := r.Hi - r.Lo
	for j := range found {
		e := &found[j]
		tol := math.Max(c.opt.MatchTol*width, 4*e.XErr)
		lo, hi := math.Min(e.X, e.Span[0])-tol, math.Max(e.X, e.Span[1])+tol
		if i := matchRoot(r.Roots, lo, hi); i >= 0 {
			rt := &r.Roots[i]
			if rt.Scan >= 0 {
				r.Disagreements = append(r.Disagreements, Disagreement{Kind: Duplicate, X: e.X, Scan: j, Root: i})
				continue
			}
			rt.Scan = j
			if e.Class != rt.Class {
				r.Disagreements = append(r.Disagreements, Disagreement{Kind: ClassDiffers, X: e.X, Scan: j, Root: i})
			}
			continue
		}
		if k := matchBox(r.Unresolved, lo, hi); k >= 0 {
			b := &r.Unresolved[k]
			if b.ScanHi == b.ScanLo {
				b.ScanLo = j
			}
			b.ScanHi = j + 1
			continue
		}
		r.Disagreements = append(r.Disagreements, Disagreement{Kind: NotARoot, X: e.X, Scan: j, Root: -1})
	}
	for i, rt := range r.Roots {
		if rt.Scan < 0 {
			r.Disagreements = append(r.Disagreements, Disagreement{Kind: MissedByScan, X: rt.Lo + (rt.Hi-rt.Lo)/2, Scan: -1, Root: i})
		}
	}
	return r
}

// matchRoot returns the index of the root whose enclosure meets [lo, hi]
// (the nearest by middle when several do), or −1.
func matchRoot(roots []Root, lo, hi float64) int {
	best, bd := -1, math.Inf(1)
	mid := lo + (hi-lo)/2
	for i, rt := range roots {
		if rt.Hi < lo || rt.Lo > hi {
			continue
		}
		if d := math.Abs(rt.Lo + (rt.Hi-rt.Lo)/2 - mid); d < bd {
			best, bd = i, d
		}
	}
	return best
}

// matchBox returns the index of the first unresolved interval that meets
// [lo, hi], or −1.
func matchBox(boxes []Box, lo, hi float64) int {
	for k, b := range boxes {
		if b.Hi >= lo && b.Lo <= hi {
			return k
		}
	}
	return -1
}

// Agrees reports whether the certified roots of a Certified report have
// the classes of pattern, in order: then the scan's ordered pattern of
// classes is proven (every root found, none spurious, each class right).
func (r *Report) Agrees(pattern []steady.Class) bool {
	if r.Status != Certified || len(pattern) != len(r.Roots) {
		return false
	}
	for i, rt := range r.Roots {
		if pattern[i] != rt.Class {
			return false
		}
	}
	return true
}
