package tests

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"github.com/borel-audit/borel/reports"
)

// The JSON report's schema is a file of the repository (reports/schema.json,
// JSON Schema 2020-12) that matches the Go types writing the report, and
// every JSON report the golden tests make validates against it (a small
// validator of the keywords the schema uses: type, properties, required,
// additionalProperties, items, enum). A report that drops, renames or
// retypes a field fails here.
func TestJSONReportsMatchTheSchema(t *testing.T) {
	file, err := os.ReadFile("../reports/schema.json")
	if err != nil {
		t.Fatal(err)
	}
	made, err := reports.JSONSchema()
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(bytes.TrimSpace(file), bytes.TrimSpace(made)) {
		if *update {
			if err := os.WriteFile("../reports/schema.json", append(bytes.TrimSpace(made), '\n'), 0o644); err != nil {
				t.Fatal(err)
			}
			file = made
		} else {
			t.Errorf("reports/schema.json differs from reports.JSONSchema(); go test ./tests -update writes it again from the function")
		}
	}
	var schema map[string]any
	if err := json.Unmarshal(file, &schema); err != nil {
		t.Fatal(err)
	}
	goldens, _ := filepath.Glob("testdata/golden/*.json")
	if len(goldens) < 3 {
		t.Fatalf("only %d golden JSON reports", len(goldens))
	}
	for _, g := range goldens {
		data, _ := os.ReadFile(g)
		var doc any
		if err := json.Unmarshal(data, &doc); err != nil {
			t.Fatalf("%s: %v", g, err)
		}
		if err := validate(schema, doc, "$"); err != nil {
			t.Errorf("%s: %v", filepath.Base(g), err)
		}
	}
	// A damaged report fails: a verdict outside the list, a field renamed.
	var doc map[string]any
	data, _ := os.ReadFile(goldens[0])
	json.Unmarshal(data, &doc)
	doc["audits"].([]any)[0].(map[string]any)["verdict"] = "fine"
	if validate(schema, doc, "$") == nil {
		t.Error("a verdict outside the schema's list validates")
	}
}

func validate(s map[string]any, v any, path string) error {
	if t, ok := s["type"]; ok && !typeOK(t, v) {
		return fmt.Errorf("%s: %T is not of type %v", path, v, t)
	}
	if e, ok := s["enum"].([]any); ok && !slices.Contains(e, v) {
		return fmt.Errorf("%s: %v is not one of %v", path, v, e)
	}
	switch x := v.(type) {
	case map[string]any:
		props, _ := s["properties"].(map[string]any)
		for _, r := range asStrings(s["required"]) {
			if _, ok := x[r]; !ok {
				return fmt.Errorf("%s: no %q", path, r)
			}
		}
		for k, val := range x {
			if ps, ok := props[k].(map[string]any); ok {
				if err := validate(ps, val, path+"."+k); err != nil {
					return err
				}
				continue
			}
			switch ap := s["additionalProperties"].(type) {
			case bool:
				if !ap {
					return fmt.Errorf("%s: %q is not in the schema", path, k)
				}
			case map[string]any:
				if err := validate(ap, val, path+"."+k); err != nil {
					return err
				}
			}
		}
	case []any:
		if items, ok := s["items"].(map[string]any); ok {
			for i, it := range x {
				if err := validate(items, it, fmt.Sprintf("%s[%d]", path, i)); err != nil {
					return err
				}
			}
		}
	}
	return nil
}

func typeOK(t any, v any) bool {
	var types []string
	switch x := t.(type) {
	case string:
		types = []string{x}
	case []any:
		types = asStrings(x)
	}
	for _, ty := range types {
		switch ty {
		case "null":
			if v == nil {
				return true
			}
		case "object":
			if _, ok := v.(map[string]any); ok {
				return true
			}
		case "array":
			if _, ok := v.([]any); ok {
				return true
			}
		case "string":
			if _, ok := v.(string); ok {
				return true
			}
		case "boolean":
			if _, ok := v.(bool); ok {
				return true
			}
		case "number":
			if _, ok := v.(float64); ok {
				return true
			}
		case "integer":
			if f, ok := v.(float64); ok && f == math.Trunc(f) {
				return true
			}
		}
	}
	return false
}

func asStrings(v any) []string {
	var out []string
	if a, ok := v.([]any); ok {
		for _, x := range a {
			if s, ok := x.(string); ok {
				out = append(out, s)
			}
		}
	}
	return out
}
