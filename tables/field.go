package tables

import (
	"fmt"

	"github.com/apache/arrow-go/v18/arrow"
)

// Type is the type of the values in a column.
type Type int

// The column types. The zero Type is invalid, so a Field must name its type.
const (
	Int64   Type = iota + 1 // Arrow int64, Parquet INT64
	Float64                 // Arrow float64, Parquet DOUBLE
	String                  // Arrow utf8, Parquet BYTE_ARRAY (UTF8)
)

// String returns the name of the type: "int64", "float64" or "string".
func (t Type) String() string {
	switch t {
	case Int64:
		return "int64"
	case Float64:
		return "float64"
	case String:
		return "string"
	}
	return fmt.Sprintf("Type(%d)", int(t))
}

// arrow returns the Arrow data type for t. It panics if t is not a valid Type.
func (t Type) arrow() arrow.DataType {
	switch t {
	case Int64:
		return arrow.PrimitiveTypes.Int64
	case Float64:
		return arrow.PrimitiveTypes.Float64
	case String:
		return arrow.BinaryTypes.String
	}
	panic(fmt.Sprintf("tables: invalid column type %d", int(t)))
}

// Field describes a column. Unit and Doc document the column; they are stored
// in the Arrow field metadata under the keys "unit" and "doc" when not empty.
type Field struct {
	Name     string
	Type     Type
	Nullable bool   // whether the column may hold nulls
	Unit     string // unit of the values, e.g. "s" or "1/D"; empty if none
	Doc      string // one-line description
}

// The Arrow field metadata keys that hold Field.Unit and Field.Doc.
const (
	unitKey = "unit"
	docKey  = "doc"
)

// arrowField returns the Arrow field for f.
func (f Field) arrowField() arrow.Field {
	var keys, values []string
	if f.Unit != "" {
		keys, values = append(keys, unitKey), append(values, f.Unit)
	}
	if f.Doc != "" {
		keys, values = append(keys, docKey), append(values, f.Doc)
	}
	af := arrow.Field{Name: f.Name, Type: f.Type.arrow(), Nullable: f.Nullable}
	if keys != nil {
		af.Metadata = arrow.NewMetadata(keys, values)
	}
	return af
}

// fieldFrom returns the Field for an Arrow field, or an error if its type is
// none of the column types.
func fieldFrom(af arrow.Field) (Field, error) {
	f := Field{Name: af.Name, Nullable: af.Nullable}
	switch af.Type.ID() {
	case arrow.INT64:
		f.Type = Int64
	case arrow.FLOAT64:
		f.Type = Float64
	case arrow.STRING:
		f.Type = String
	default:
		return Field{}, fmt.Errorf("column %q has Arrow type %s; tables hold int64, float64 and utf8 columns", af.Name, af.Type)
	}
	if i := af.Metadata.FindKey(unitKey); i >= 0 {
		f.Unit = af.Metadata.Values()[i]
	}
	if i := af.Metadata.FindKey(docKey); i >= 0 {
		f.Doc = af.Metadata.Values()[i]
	}
	return f, nil
}

// checkFields panics if fields is not a valid column list: every field needs
// a non-empty name, a unique name and a valid type.
func checkFields(fields []Field) {
	seen := make(map[string]bool, len(fields))
	for i, f := range fields {
		if f.Name == "" {
			panic(fmt.Sprintf("tables: field %d has no name", i))
		}
		if seen[f.Name] {
			panic(fmt.Sprintf("tables: duplicate field name %q", f.Name))
		}
		seen[f.Name] = true
		if f.Type < Int64 || f.Type > String {
			panic(fmt.Sprintf("tables: field %q has invalid type %d", f.Name, int(f.Type)))
		}
	}
}
