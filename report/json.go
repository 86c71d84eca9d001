package report

import (
	"encoding/json"
	"io"
)

// WriteJSON writes v as indented JSON with a final newline. Output is
// deterministic: struct fields keep their declared order.
func WriteJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
