package report

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"holdfast/assess"
)

// Wordings shared by the terminal tables and the report documents, so
// that a run's failures, faults, warnings and regimes read the same in
// every output.

// countedLines words failure and fault lists by reason with their first
// indices, failures first: "Failed draws: 3 × reason (first: 1, 4)" and
// "Numeric trouble: 2 draws with reason (first: 0, 5)". one and many name
// what is counted ("draw" and "draws", "model run" and "model runs"), the
// failure line heading with many; first heads the list of indices
// ("first", "first runs").
func countedLines(failed, faults []assess.Counted, one, many, first string) []string {
	var out []string
	for _, c := range failed {
		out = append(out, fmt.Sprintf("Failed %s: %d × %s (%s: %s)", many, c.Draws, c.Reason, first, ints(c.First)))
	}
	for _, c := range faults {
		out = append(out, fmt.Sprintf("Numeric trouble: %s with %s (%s: %s)", plural(c.Draws, one, many), c.Reason, first, ints(c.First)))
	}
	return out
}

// countedOf converts failure or fault lists read from a result file back
// to the engine's form.
func countedOf(cs []CountedJSON) []assess.Counted {
	out := make([]assess.Counted, 0, len(cs))
	for _, c := range cs {
		out = append(out, assess.Counted{Reason: c.Reason, Draws: c.Draws, First: c.First})
	}
	return out
}

// ints joins indices with commas.
func ints(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, ", ")
}

// affixed returns each line with prefix before and suffix after it.
func affixed(prefix, suffix string, lines []string) []string {
	out := make([]string, len(lines))
	for i, l := range lines {
		out[i] = prefix + l + suffix
	}
	return out
}

// printLines writes each line with prefix before it, one a line.
func printLines(w io.Writer, prefix string, lines []string) {
	for _, l := range lines {
		fmt.Fprintf(w, "%s%s\n", prefix, l)
	}
}

// textItems makes each line a list item of plain text.
func textItems(lines []string) [][]span {
	var items [][]span
	for _, l := range lines {
		items = append(items, []span{tx(l)})
	}
	return items
}

// troubleSection writes a document's section of warnings and failures
// under heading: the lines as a list, or the sentence none when there is
// no line.
func troubleSection(d *document, heading string, lines []string, none string) {
	d.h2(heading)
	if len(lines) == 0 {
		d.p(tx(none))
		return
	}
	d.list(textItems(lines)...)
}

// paramName is a parameter's name as a ranking lists it, with "(fixed)"
// after a fixed one.
func paramName(name string, fixed bool) string {
	if fixed {
		return name + " (fixed)"
	}
	return name
}

// regimeName words an ordered pattern of classes, low to high.
func regimeName(p []string) string {
	if s := strings.Join(p, " / "); s != "" {
		return s
	}
	return "(no equilibrium)"
}

// regimeShare words a regime with its share in percent, as the most
// common regime of a probability curve's point.
func regimeShare(p []string, share float64) string {
	return regimeName(p) + " " + pc(share) + "%"
}

// className joins a class and the side it attracts from for a result
// file: "semistable-below".
func className(class, side string) string { return withSide(class, "-", side, "") }

// classFrom joins a class and the side it attracts from for a table:
// "semistable from below".
func classFrom(class, side string) string { return withSide(class, " from ", side, "") }

// attractsClass words a class with the side it attracts from for a table
// of equilibria: "semistable (attracts from below)".
func attractsClass(class, side string) string {
	return withSide(class, " (attracts from ", side, ")")
}

// withSide is class followed by the side it attracts from between before
// and after; class alone when side is empty (attracts from both sides or
// none).
func withSide(class, before, side, after string) string {
	if side == "" {
		return class
	}
	return class + before + side + after
}
