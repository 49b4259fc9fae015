package tests

import (
	"go/ast"
	"go/parser"
	"go/token"
	"io/fs"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// The libraries under stats/ and internal/ never name a command-line flag in a string
// (their messages name options by their Go names, and cmd/borel renames
// them, cmd/borel/names.go): every string literal of their non-test files
// is read.
func TestLibrariesNameNoFlags(t *testing.T) {
	flag := regexp.MustCompile(`(^|[\s(])--[a-z]`)
	fset := token.NewFileSet()
	for _, root := range []string{"../stats", "../internal"} {
		walkStrings(t, fset, root, flag)
	}
}

func walkStrings(t *testing.T, fset *token.FileSet, root string, flag *regexp.Regexp) {
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() || !strings.HasSuffix(path, ".go") || strings.HasSuffix(path, "_test.go") {
			return err
		}
		f, err := parser.ParseFile(fset, path, nil, 0)
		if err != nil {
			return err
		}
		ast.Inspect(f, func(n ast.Node) bool {
			if lit, ok := n.(*ast.BasicLit); ok && lit.Kind == token.STRING && flag.MatchString(lit.Value) {
				t.Errorf("%s: a library string names a flag: %s", fset.Position(lit.Pos()), lit.Value)
			}
			return true
		})
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
}
