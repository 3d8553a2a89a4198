package report

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"strconv"
)

// Table is a table of results: a header row whose column names carry their units
// (for example "f_hz", "gain", "v_receiving_pu") and rows of formatted cells. The same
// table serves CSV files and tables in the HTML report.
type Table struct {
	Columns []string
	Rows    [][]string
}

// NewTable returns an empty table with the given column names.
func NewTable(columns ...string) *Table {
	return &Table{Columns: columns}
}

// Add appends a row. Cells may be float64 (written in the shortest form that reads
// back exactly), int, int64, bool or string. It returns an error for a float that is
// not finite (no NaN or Inf reaches an output) and panics when the row's length differs
// from the header's, a programmer error.
func (t *Table) Add(cells ...any) error {
	if len(cells) != len(t.Columns) {
		panic(fmt.Sprintf("report: row of %d cells for %d columns", len(cells), len(t.Columns)))
	}
	row := make([]string, len(cells))
	for i, c := range cells {
		switch v := c.(type) {
		case float64:
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("report: column %s, row %d: value is not finite", t.Columns[i], len(t.Rows)+1)
			}
			row[i] = strconv.FormatFloat(v, 'g', -1, 64)
		case int:
			row[i] = strconv.Itoa(v)
		case int64:
			row[i] = strconv.FormatInt(v, 10)
		case bool:
			row[i] = strconv.FormatBool(v)
		case string:
			row[i] = v
		default:
			panic(fmt.Sprintf("report: cannot put a %T in a table", c))
		}
	}
	t.Rows = append(t.Rows, row)
	return nil
}

// CSV returns the table as comma-separated values (RFC 4180): the header row, then
// one line per row.
func (t *Table) CSV() []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	_ = w.Write(t.Columns) // the first error stays in w.Error, checked below
	for _, r := range t.Rows {
		_ = w.Write(r)
	}
	w.Flush()
	// Into memory with the default delimiter the writer cannot fail: an error here is a
	// bug, not something a user's data can cause.
	if err := w.Error(); err != nil {
		panic("report: CSV: " + err.Error())
	}
	return b.Bytes()
}
