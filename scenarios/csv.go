package scenarios

import (
	"bytes"
	"encoding/csv"
	"errors"
	"io"
	"io/fs"
	"math"
	"path"
	"path/filepath"
	"strconv"
	"strings"
	"unicode/utf8"
)

// readColumn reads the samples of an empirical parameter from the CSV file
// and column it names. The file name must be relative to the scenario's
// folder and stay inside it. The CSV file has a header row; lines starting
// with # are comments; cells of the column that are blank are skipped, so
// that columns of different lengths can share a file; every other cell must
// be a finite number.
func (p *parser) readColumn(b *spec, par *Param) ([]float64, bool) {
	fileKV, colKV := b.have["file"], b.have["column"]
	name, column := fileKV.val.Value, strings.TrimSpace(colKV.val.Value)
	fpath := b.path + ".file"
	bad := func(format string, args ...any) ([]float64, bool) {
		p.errorf(fileKV.val, fpath, format, args...)
		return nil, false
	}
	switch {
	case strings.TrimSpace(name) == "":
		return bad("must name a CSV file beside the scenario")
	case strings.HasPrefix(name, "/") || strings.HasPrefix(name, `\`) || filepath.IsAbs(name) || filepath.VolumeName(name) != "":
		return bad("%s is an absolute path; give a file name relative to the scenario's folder", quoteShort(name))
	case strings.Contains(name, `\`):
		return bad("%s: separate folder names with /", quoteShort(name))
	case containsStr(strings.Split(name, "/"), ".."):
		return bad("%s leaves the scenario's folder (..); the CSV file must lie in that folder or below it", quoteShort(name))
	}
	clean := path.Clean(name)
	if !fs.ValidPath(clean) {
		return bad("%s is not a valid file name", quoteShort(name))
	}
	if column == "" {
		p.errorf(colKV.val, b.path+".column", "must name a column of the CSV file's header")
		return nil, false
	}
	if p.dir == nil {
		return bad("cannot read CSV files here (the scenario was not read from a folder); give samples: as a list")
	}
	if st, err := fs.Stat(p.dir, clean); err == nil && !st.Mode().IsRegular() && !st.IsDir() {
		return bad("%s is not a regular file (a pipe or device would block); give a CSV file", quoteShort(clean))
	}
	f, err := p.dir.Open(clean)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return bad("no file %s in the scenario's folder", quoteShort(clean))
		}
		return bad("cannot open %s: %v", quoteShort(clean), unwrapPath(err))
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil {
		if st.IsDir() {
			return bad("%s is a folder, not a CSV file", quoteShort(clean))
		}
		if st.Size() > MaxFileSize {
			return bad("%s", tooBig("CSV file "+clean))
		}
	}
	data, err := io.ReadAll(io.LimitReader(f, MaxFileSize+1))
	if err != nil {
		return bad("cannot read %s: %v", quoteShort(clean), unwrapPath(err))
	}
	if len(data) > MaxFileSize {
		return bad("%s", tooBig("CSV file "+clean))
	}
	par.DataFile, par.DataColumn = clean, column
	if p.attached == nil {
		p.attached = map[string][]byte{}
	}
	p.attached[clean] = data
	return p.parseColumn(p.csvName(clean), data, column, b)
}

// csvName is how messages name a CSV file: beside the scenario file.
func (p *parser) csvName(clean string) string {
	if strings.HasPrefix(p.file, DemoPrefix) {
		return DemoPrefix + clean
	}
	return filepath.Join(filepath.Dir(p.file), filepath.FromSlash(clean))
}

// unwrapPath drops the operation and path of an *fs.PathError, which repeat
// what the message already says.
func unwrapPath(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// parseColumn decodes the named column of CSV data. Errors inside the CSV
// file carry its name and position.
func (p *parser) parseColumn(file string, data []byte, column string, b *spec) ([]float64, bool) {
	ix := newSrcIndex(data)
	csvErr := func(pos Pos, format string, args ...any) ([]float64, bool) {
		p.errs.addIn(file, pos, b.path, format, args...)
		return nil, false
	}
	if i := bytes.IndexByte(data, 0); i >= 0 {
		return csvErr(ix.pos(i), "file is binary, not text (NUL byte)")
	}
	if !utf8.Valid(data) {
		return csvErr(Pos{}, "file is not valid UTF-8 text")
	}
	body := bytes.TrimPrefix(data, []byte("\uFEFF"))
	r := csv.NewReader(bytes.NewReader(body))
	r.Comment = '#'
	r.TrimLeadingSpace = true
	header, err := r.Read()
	if err == io.EOF {
		return csvErr(Pos{}, "file is empty; expected a header row naming the columns")
	}
	if err != nil {
		return csvErr(csvErrPos(err), "%s", csvErrMsg(err))
	}
	col := -1
	names := make([]string, len(header))
	for i, h := range header {
		names[i] = strings.TrimSpace(h)
		if names[i] == column && col < 0 {
			col = i
		}
	}
	if col < 0 {
		hl, _ := r.FieldPos(0)
		p.errorf(b.have["column"].val, b.path+".column", "no column %s in %s%s (header, line %d: %s)",
			quoteShort(column), file, didYouMean(column, names), hl, quoteShort(strings.Join(names, ", ")))
		return nil, false
	}
	var out []float64
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return csvErr(csvErrPos(err), "%s", csvErrMsg(err))
		}
		cell := strings.TrimSpace(rec[col])
		if cell == "" {
			continue
		}
		line, c := r.FieldPos(col)
		v, err := strconv.ParseFloat(cell, 64)
		switch {
		case err != nil:
			return csvErr(Pos{Line: line, Col: c}, "column %s: %s is not a number", column, quoteShort(cell))
		case math.IsNaN(v) || math.IsInf(v, 0):
			return csvErr(Pos{Line: line, Col: c}, "column %s: %s is not a finite number", column, quoteShort(cell))
		}
		out = append(out, v)
	}
	return out, true
}

func csvErrPos(err error) Pos {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return Pos{Line: pe.Line, Col: pe.Column}
	}
	return Pos{}
}

func csvErrMsg(err error) string {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return "CSV: " + pe.Err.Error()
	}
	return err.Error()
}
