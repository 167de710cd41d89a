package bringin

import (
	"bytes"
	"strings"
	"testing"
)

// FuzzScanRows: the rows scanRows cuts a CSV into, after its header, are
// the file again, byte for byte, each row starting at the line counted,
// and the blocks of eachBlock each carry the header and hold the rows in
// order (pitcard's own splitting rule, no source).
func FuzzScanRows(f *testing.F) {
	for _, s := range []string{
		"date,time,track\n2026-06-13,20:40,Salt Creek\n",
		"# a comment\n\ndate,time,notes\n1,2,\"over\ntwo lines\"\n3,4,x\n",
		"date,time\n# \"quote in a comment\n1,2\n\"unclosed\n3,4",
		"",
		"\n\n",
		"a\r\nb\r\n",
	} {
		f.Add([]byte(s), 2)
	}
	f.Fuzz(func(t *testing.T, data []byte, block int) {
		var got bytes.Buffer
		line := 0
		err := scanRows(bytes.NewReader(data), func(h []byte, n int) error {
			got.Write(h)
			if n != bytes.Count(h, []byte("\n")) {
				t.Errorf("head %q: %d lines counted", h, n)
			}
			line = n + 1
			return nil
		}, func(row []byte, at, n int) error {
			if at != line {
				t.Errorf("row %q at line %d, want %d", row, at, line)
			}
			got.Write(row)
			line += n
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got.Bytes(), data) {
			t.Fatalf("rows %q, want %q", got.Bytes(), data)
		}
		block = 1 + max(block, -block)%5
		var head []byte
		_ = scanRows(bytes.NewReader(data), func(h []byte, _ int) error { head = h; return nil }, func([]byte, int, int) error { return nil })
		got.Reset()
		got.Write(head)
		err = eachBlock(bytes.NewReader(data), block, func(b []byte, _ int) error {
			if !bytes.HasPrefix(b, head) {
				t.Errorf("block %q without the header %q", b, head)
			}
			if len(b) > len(head) || !strings.HasSuffix(string(head), "\n") {
				got.Write(b[len(head):])
			}
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got.Bytes(), data) {
			t.Fatalf("blocks of %d: %q, want %q", block, got.Bytes(), data)
		}
	})
}
