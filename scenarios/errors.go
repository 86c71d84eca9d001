package scenarios

import (
	"cmp"
	"fmt"
	"slices"
	"strconv"
	"strings"
)

// Pos is a position in a file: Line and Col count from 1, and Col counts
// bytes, as in go/token. A zero Line means the position is unknown; a zero
// Col means only the line is known.
type Pos struct{ Line, Col int }

// IsValid reports whether the position is known.
func (p Pos) IsValid() bool { return p.Line > 0 }

// String returns "line:col", "line", or "-" for an unknown position.
func (p Pos) String() string {
	switch {
	case p.Line <= 0:
		return "-"
	case p.Col <= 0:
		return strconv.Itoa(p.Line)
	}
	return strconv.Itoa(p.Line) + ":" + strconv.Itoa(p.Col)
}

// Error is one problem found in a scenario (or in a CSV file it names).
// Field is the path of the offending field, such as "parameters.s.sd" or
// "correlations[1]", and is empty for problems that belong to no field
// (YAML syntax errors, an empty file).
type Error struct {
	File  string
	Pos   Pos
	Field string
	Msg   string
}

// Error formats the error as "file:line:col: field: msg", leaving out the
// parts that are unknown, in the manner of go/scanner.
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Pos.IsValid() {
		if b.Len() > 0 {
			b.WriteByte(':')
		}
		b.WriteString(e.Pos.String())
	}
	if b.Len() > 0 {
		b.WriteString(": ")
	}
	if e.Field != "" {
		b.WriteString(e.Field)
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

// ErrorList is a list of errors sorted by file and position, as
// go/scanner.ErrorList. Parse returns at most MaxErrors of them; when there
// were more, the last entry says so.
type ErrorList []*Error

// MaxErrors is the most errors Parse reports for one scenario.
const MaxErrors = 10

// Error returns the errors one per line.
func (l ErrorList) Error() string {
	switch len(l) {
	case 0:
		return "no errors"
	case 1:
		return l[0].Error()
	}
	lines := make([]string, len(l))
	for i, e := range l {
		lines[i] = e.Error()
	}
	return strings.Join(lines, "\n")
}

// Err returns nil for an empty list and the list itself otherwise, so that
// a function can end with "return l.Err()".
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	return l
}

// Sort orders the list by file, line, column, field and message. Errors
// without a position come first within their file.
func (l ErrorList) Sort() {
	slices.SortStableFunc(l, func(a, b *Error) int {
		return cmp.Or(
			cmp.Compare(a.File, b.File),
			cmp.Compare(a.Pos.Line, b.Pos.Line),
			cmp.Compare(a.Pos.Col, b.Pos.Col),
			cmp.Compare(a.Field, b.Field),
			cmp.Compare(a.Msg, b.Msg),
		)
	})
}

// errorSink collects errors while a scenario is decoded.
type errorSink struct {
	file string
	list ErrorList
}

// add records an error at p in the scenario file.
func (s *errorSink) add(p Pos, field, format string, args ...any) {
	s.addIn(s.file, p, field, format, args...)
}

// addIn records an error in another file (a CSV file the scenario names).
func (s *errorSink) addIn(file string, p Pos, field, format string, args ...any) {
	msg := format
	if len(args) > 0 {
		msg = fmt.Sprintf(format, args...)
	}
	s.list = append(s.list, &Error{File: file, Pos: p, Field: field, Msg: msg})
}

// err returns the sorted list, cut to MaxErrors entries, or nil.
func (s *errorSink) err() error {
	if len(s.list) == 0 {
		return nil
	}
	l := slices.Clone(s.list)
	l.Sort()
	// Drop exact repeats (the same message at the same place).
	l = slices.CompactFunc(l, func(a, b *Error) bool { return *a == *b })
	if len(l) > MaxErrors {
		more := len(l) - MaxErrors
		rest := l[MaxErrors]
		l = append(l[:MaxErrors:MaxErrors], &Error{File: rest.File, Pos: rest.Pos,
			Msg: "too many errors (" + strconv.Itoa(more) + " more not shown)"})
	}
	return l
}
