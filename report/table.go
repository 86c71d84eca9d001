package report

import (
	"io"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/tw"
)

// newTable returns the table style every holdfast table uses: headers kept
// exactly as written (symbols such as x* and f' must survive), numbers
// right-aligned by the caller's choice of columns.
func newTable(w io.Writer) *tablewriter.Table {
	return tablewriter.NewTable(w,
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeaderAlignment(tw.AlignLeft),
		tablewriter.WithRowAlignment(tw.AlignLeft),
	)
}

// writeTable writes a terminal table in that style: the header, then the
// rows in order.
func writeTable(w io.Writer, head []string, rows [][]string) error {
	t := newTable(w)
	h := make([]any, len(head))
	for i, s := range head {
		h[i] = s
	}
	t.Header(h...)
	for _, r := range rows {
		if err := t.Append(r); err != nil {
			return err
		}
	}
	return t.Render()
}
