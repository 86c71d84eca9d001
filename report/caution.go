// Package report renders holdfast results: terminal tables, JSON and CSV
// files, and (later) Markdown and HTML appendices with plots. It only
// formats: every number it prints was computed by package assess, and it
// never calls back into assess.
package report

// Caution is the notice that every human-facing output carries. Model
// verdicts can feed decisions about reactors, dams or fishery closures, so
// the notice is printed with every table and report, never only in a footer
// that can be cut off.
const Caution = "Caution: these verdicts come from a model and the stated assumptions. " +
	"They need review by a qualified expert before any real decision, and they defer " +
	"to local codes, standards and licensed practice wherever safety is involved."
