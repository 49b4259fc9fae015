package reports

import (
	"encoding/json"
	"reflect"
	"strings"

	"github.com/borel-audit/borel/stats/audit"
)

// JSONSchema returns the JSON Schema (draft 2020-12) of the JSON report,
// made from the Go types that write it (JSONDocument and the types in it),
// so that the two cannot drift apart: a field's JSON name and type, a
// pointer or slice that may be null, omitempty fields not required, no
// property the types do not have, and the values a verdict, a mark and an
// adjustment can take. The repository keeps it as reports/schema.json (a
// test checks the file against this function and every golden JSON report
// against the file).
func JSONSchema() ([]byte, error) {
	s := schemaOf(reflect.TypeOf(JSONDocument{}), "")
	s["$schema"] = "https://json-schema.org/draft/2020-12/schema"
	s["$id"] = "https://github.com/borel-audit/borel/reports/schema.json"
	s["title"] = "borel audit report, schema_version " + itoa(SchemaVersion)
	return json.MarshalIndent(s, "", "  ")
}

// enums are the values some string fields can take, by JSON name.
var enums = map[string][]string{
	"verdict":    {string(audit.Consistent), string(audit.NotConsistent), string(audit.TooUniform), string(audit.Untested)},
	"mark":       {"", string(audit.MarkDeviates), string(audit.MarkTooUniform)},
	"adjustment": {string(audit.Holm), string(audit.BH)},
}

func schemaOf(t reflect.Type, name string) map[string]any {
	nullable := false
	if t.Kind() == reflect.Pointer {
		t, nullable = t.Elem(), true
	}
	typ := func(s string) any {
		if nullable {
			return []string{s, "null"}
		}
		return s
	}
	switch t.Kind() {
	case reflect.Struct:
		props := map[string]any{}
		var required []string
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			tag := f.Tag.Get("json")
			if tag == "-" || !f.IsExported() {
				continue
			}
			jname, opts, _ := strings.Cut(tag, ",")
			if jname == "" {
				jname = f.Name
			}
			props[jname] = schemaOf(f.Type, jname)
			if !strings.Contains(opts, "omitempty") {
				required = append(required, jname)
			}
		}
		return map[string]any{"type": typ("object"), "properties": props, "required": required, "additionalProperties": false}
	case reflect.Slice:
		return map[string]any{"type": []string{"array", "null"}, "items": schemaOf(t.Elem(), "")}
	case reflect.Map:
		return map[string]any{"type": []string{"object", "null"}, "additionalProperties": schemaOf(t.Elem(), "")}
	case reflect.String:
		s := map[string]any{"type": typ("string")}
		if e, ok := enums[name]; ok {
			s["enum"] = e
		}
		return s
	case reflect.Bool:
		return map[string]any{"type": typ("boolean")}
	case reflect.Int, reflect.Int64, reflect.Uint64, reflect.Int32:
		return map[string]any{"type": typ("integer")}
	case reflect.Float64:
		return map[string]any{"type": typ("number")}
	}
	panic("reports: no JSON Schema for " + t.String())
}
