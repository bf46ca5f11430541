package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"

	"mixdepth/tables"
)

func init() {
	register(command{name: "show", summary: "print a table's run metadata, columns and rows", run: runShow})
}

// showTextRows is the number of rows the text format prints unless --limit
// says otherwise; csv and json print every row by default.
const showTextRows = 20

func runShow(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("show FILE", "FILE is a table written by mixdepth (.arrow or .parquet).\n\nPrints what the table holds: its run metadata, its columns with types, units and meanings, and\nits rows, as aligned text, CSV (rows only, with a header line) or one JSON document. Floats are\nexact in csv and json (shortest round-trip form) and rounded to 8 significant digits in text.",
		"mixdepth show scan.parquet --limit 5", stdout)
	format := fs.String("format", "text", "output format: text, csv or json")
	limit := fs.Int("limit", -1, "print at most N rows, 0 for all; -1 means 20 in text and all in csv and json")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 1 {
		return badInput("show takes one table file (got %d arguments): mixdepth show FILE", fs.NArg())
	}
	switch *format {
	case "text", "csv", "json":
	default:
		return badInput("--format %q: use text, csv or json", *format)
	}
	if *limit < -1 {
		return badInput("--limit %d: give a number of rows, or 0 for all", *limit)
	}
	path := fs.Arg(0)
	t, err := tables.Read(path)
	if err != nil {
		return usageError{err}
	}
	rows := t.Len()
	switch {
	case *limit == -1 && *format == "text":
		rows = min(rows, showTextRows)
	case *limit > 0:
		rows = min(rows, *limit)
	}
	switch *format {
	case "csv":
		return showCSV(stdout, t, rows)
	case "json":
		return showJSON(stdout, path, t, rows)
	}
	return showText(stdout, path, t, rows)
}

// cell returns the value of column j in row i, or nil for a null.
func cell(t *tables.Table, j, i int) any {
	if t.Valid != nil && t.Valid[j] != nil && !t.Valid[j][i] {
		return nil
	}
	switch col := t.Columns[j].(type) {
	case []int64:
		return col[i]
	case []float64:
		return col[i]
	case []string:
		return col[i]
	}
	panic(fmt.Sprintf("mixdepth: column %q has Go type %T", t.Fields[j].Name, t.Columns[j]))
}

// formatCell writes a value; exact floats use the shortest form that reads
// back to the same float64, others 8 significant digits. A null is "".
func formatCell(v any, exact bool) string {
	switch v := v.(type) {
	case nil:
		return ""
	case int64:
		return strconv.FormatInt(v, 10)
	case float64:
		if exact {
			return strconv.FormatFloat(v, 'g', -1, 64)
		}
		return strconv.FormatFloat(v, 'g', 8, 64)
	case string:
		return v
	}
	panic(fmt.Sprintf("mixdepth: cell of type %T", v))
}

func tableFormat(path string) string {
	if strings.EqualFold(filepath.Ext(path), ".parquet") {
		return "parquet"
	}
	return "arrow"
}

func showText(w io.Writer, path string, t *tables.Table, rows int) error {
	fmt.Fprintf(w, "%s: %s table, %d rows, %d columns\n\n", path, map[string]string{"arrow": "Arrow IPC", "parquet": "Parquet"}[tableFormat(path)], t.Len(), len(t.Fields))
	fmt.Fprintln(w, "Run metadata:")
	tw := tabwriter.NewWriter(w, 0, 8, 2, ' ', 0)
	for i, k := range t.Meta.Keys {
		fmt.Fprintf(tw, "  %s\t%s\n", k, t.Meta.Values[i])
	}
	tw.Flush()
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Columns:")
	tw = tabwriter.NewWriter(w, 0, 8, 2, ' ', 0)
	for _, f := range t.Fields {
		typ := f.Type.String()
		if f.Nullable {
			typ += " (nullable)"
		}
		unit := f.Unit
		if unit == "" {
			unit = "-"
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\n", f.Name, typ, unit, f.Doc)
	}
	tw.Flush()
	fmt.Fprintln(w)
	if t.Len() == 0 {
		fmt.Fprintln(w, "No rows.")
		return nil
	}
	fmt.Fprintf(w, "Rows 1–%d of %d:\n", rows, t.Len())
	tw = tabwriter.NewWriter(w, 0, 8, 2, ' ', tabwriter.AlignRight)
	for j, f := range t.Fields {
		if j > 0 {
			fmt.Fprint(tw, "\t")
		}
		fmt.Fprint(tw, f.Name)
	}
	fmt.Fprintln(tw, "\t")
	for i := range rows {
		for j := range t.Fields {
			if j > 0 {
				fmt.Fprint(tw, "\t")
			}
			s := formatCell(cell(t, j, i), false)
			if cell(t, j, i) == nil {
				s = "null"
			}
			fmt.Fprint(tw, s)
		}
		fmt.Fprintln(tw, "\t")
	}
	tw.Flush()
	if rest := t.Len() - rows; rest > 0 {
		fmt.Fprintf(w, "… %d more rows (--limit 0 prints all)\n", rest)
	}
	return nil
}

func showCSV(w io.Writer, t *tables.Table, rows int) error {
	cw := csv.NewWriter(w)
	record := make([]string, len(t.Fields))
	for j, f := range t.Fields {
		record[j] = f.Name
	}
	cw.Write(record)
	for i := range rows {
		for j := range t.Fields {
			record[j] = formatCell(cell(t, j, i), true)
		}
		cw.Write(record)
	}
	cw.Flush()
	return cw.Error()
}

// orderedObject is a JSON object that keeps its keys in the given order.
type orderedObject struct {
	keys   []string
	values []any
}

func (o orderedObject) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, k := range o.keys {
		if i > 0 {
			b.WriteByte(',')
		}
		kb, err := json.Marshal(k)
		if err != nil {
			return nil, err
		}
		vb, err := json.Marshal(o.values[i])
		if err != nil {
			return nil, err
		}
		b.Write(kb)
		b.WriteByte(':')
		b.Write(vb)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// showJSONDoc is the --format json document of show. Field names are an
// interface.
type showJSONDoc struct {
	File      string           `json:"file"`
	Format    string           `json:"format"`
	RowsTotal int              `json:"rows_total"`
	RowsShown int              `json:"rows_shown"`
	Metadata  orderedObject    `json:"metadata"`
	Columns   []showJSONColumn `json:"columns"`
	Rows      []orderedObject  `json:"rows"`
}

type showJSONColumn struct {
	Name     string `json:"name"`
	Type     string `json:"type"`
	Nullable bool   `json:"nullable"`
	Unit     string `json:"unit"`
	Doc      string `json:"doc"`
}

func showJSON(w io.Writer, path string, t *tables.Table, rows int) error {
	doc := showJSONDoc{
		File: path, Format: tableFormat(path), RowsTotal: t.Len(), RowsShown: rows,
		Rows: []orderedObject{},
	}
	for i, k := range t.Meta.Keys {
		doc.Metadata.keys = append(doc.Metadata.keys, k)
		doc.Metadata.values = append(doc.Metadata.values, t.Meta.Values[i])
	}
	names := make([]string, len(t.Fields))
	for j, f := range t.Fields {
		names[j] = f.Name
		doc.Columns = append(doc.Columns, showJSONColumn{Name: f.Name, Type: f.Type.String(), Nullable: f.Nullable, Unit: f.Unit, Doc: f.Doc})
	}
	for i := range rows {
		row := orderedObject{keys: names, values: make([]any, len(names))}
		for j := range t.Fields {
			v := cell(t, j, i)
			// JSON has no NaN or infinity: they print as null, like a null.
			if x, ok := v.(float64); ok && (math.IsNaN(x) || math.IsInf(x, 0)) {
				v = nil
			}
			row.values[j] = v
		}
		doc.Rows = append(doc.Rows, row)
	}
	return writeJSON(w, doc)
}
