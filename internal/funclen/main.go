// Command funclen lists the functions of a Go source tree longer than a
// number of lines, longest first: the evidence behind "no function over 80
// lines" in DEVELOPERS.md. It reads non-test .go files (testdata left out)
// and counts a function from its func line to its closing brace. It does
// not judge whether a long function should be split.
//
//	go run ./internal/funclen [-over 80] [DIR]
package main

import (
	"flag"
	"fmt"
	"go/ast"
	"go/parser"
	"go/token"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// fn is one function and its length in lines.
type fn struct {
	where string // "prep/view.go: newView"
	lines int
}

func main() {
	over := flag.Int("over", 80, "list functions longer than this many lines")
	flag.Parse()
	root := "."
	if flag.NArg() > 0 {
		root = flag.Arg(0)
	}
	long, total, err := scan(root, *over)
	if err != nil {
		fmt.Fprintln(os.Stderr, "funclen:", err)
		os.Exit(1)
	}
	report(os.Stdout, long, total, *over)
}

// scan is every function under root longer than over lines, longest
// first, and how many functions there are in all.
func scan(root string, over int) ([]fn, int, error) {
	var long []fn
	total := 0
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			if name := d.Name(); path != root && (name == "testdata" || strings.HasPrefix(name, ".")) {
				return filepath.SkipDir
			}
			return nil
		}
		if !strings.HasSuffix(path, ".go") || strings.HasSuffix(path, "_test.go") {
			return nil
		}
		rel, _ := filepath.Rel(root, path)
		fns, err := lengths(path, filepath.ToSlash(rel))
		if err != nil {
			return err
		}
		total += len(fns)
		for _, f := range fns {
			if f.lines > over {
				long = append(long, f)
			}
		}
		return nil
	})
	slices.SortStableFunc(long, func(a, b fn) int { return b.lines - a.lines })
	return long, total, err
}

// lengths is every function with a body in the file at path (named rel in
// the answer), with its length.
func lengths(path, rel string) ([]fn, error) {
	fset := token.NewFileSet()
	f, err := parser.ParseFile(fset, path, nil, 0)
	if err != nil {
		return nil, err
	}
	var out []fn
	for _, d := range f.Decls {
		fd, ok := d.(*ast.FuncDecl)
		if !ok || fd.Body == nil {
			continue
		}
		n := fset.Position(fd.End()).Line - fset.Position(fd.Pos()).Line + 1
		out = append(out, fn{where: rel + ": " + funcName(fd), lines: n})
	}
	return out, nil
}

// funcName is a function's name, a method's with its receiver's type:
// "Folder.SaveLogbook".
func funcName(fd *ast.FuncDecl) string {
	if fd.Recv == nil || len(fd.Recv.List) == 0 {
		return fd.Name.Name
	}
	t := fd.Recv.List[0].Type
	if s, ok := t.(*ast.StarExpr); ok {
		t = s.X
	}
	if g, ok := t.(*ast.IndexExpr); ok { // a generic receiver
		t = g.X
	}
	if id, ok := t.(*ast.Ident); ok {
		return id.Name + "." + fd.Name.Name
	}
	return fd.Name.Name
}

// report prints the list and its count.
func report(w io.Writer, long []fn, total, over int) {
	for _, f := range long {
		fmt.Fprintf(w, "%4d %s\n", f.lines, f.where)
	}
	fmt.Fprintf(w, "%d of %d functions over %d lines\n", len(long), total, over)
}
