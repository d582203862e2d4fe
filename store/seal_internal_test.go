package store

import (
	"errors"
	"fmt"
	"go/ast"
	"go/parser"
	"go/token"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// The seal is CRC-32C. Check values: the CRC catalogue's "check" for
// CRC-32/ISCSI (the Castagnoli polynomial, as in RFC 3720) over the ASCII
// "123456789" is 0xE3069283, and RFC 3720 §B.4's first example, 32 bytes of
// zeros, gives the bytes aa 36 91 8a, i.e. 0x8A9136AA (both from memory).
func TestSealIsCRC32C(t *testing.T) {
	cases := []struct {
		name       string
		key, value []byte
		want       uint32
	}{
		{"catalogue check value, all in the value", nil, []byte("123456789"), 0xE3069283},
		{"key and value are one stream", []byte("1234"), []byte("56789"), 0xE3069283},
		{"RFC 3720 B.4, 32 zero bytes", nil, make([]byte, 32), 0x8A9136AA},
	}
	for _, c := range cases {
		if got := sealSum(c.key, c.value); got != c.want {
			t.Errorf("%s: %08x, want %08x", c.name, got, c.want)
		}
	}
}

// Every bit of a sealed value or of its key matters: flipping any one is
// reported as damage (CRC-32C detects every single-bit error).
func TestUnsealEveryBit(t *testing.T) {
	key, payload := []byte("athlete-key"), []byte(`{"id":1,"name":"T"}`)
	v := seal(key, payload)
	if p, err := unseal(key, v); err != nil || string(p) != string(payload) {
		t.Fatalf("unseal(seal) = %q, %v", p, err)
	}
	for i := range 8 * len(v) {
		bad := append([]byte(nil), v...)
		bad[i/8] ^= 1 << (i % 8)
		if p, err := unseal(key, bad); !errors.Is(err, ErrDamaged) {
			t.Fatalf("value bit %d flipped: got %q, %v; want ErrDamaged", i, p, err)
		}
	}
	for i := range 8 * len(key) {
		bad := append([]byte(nil), key...)
		bad[i/8] ^= 1 << (i % 8)
		if _, err := unseal(bad, v); !errors.Is(err, ErrDamaged) {
			t.Fatalf("key bit %d flipped: %v; want ErrDamaged", i, err)
		}
	}
	if _, err := unseal(key, v[:3]); !errors.Is(err, ErrDamaged) {
		t.Errorf("3-byte value: %v, want ErrDamaged", err)
	}
}

// A write or sync refused for space or quota is the disk-full kind; other
// write errors are not.
func TestCommitFailedDiskFull(t *testing.T) {
	var g txGuard
	for _, c := range []struct {
		err  error
		full bool
	}{
		{&fs.PathError{Op: "write", Path: "x.db", Err: syscall.ENOSPC}, true},
		{fmt.Errorf("fdatasync: %w", syscall.EDQUOT), true},
		{&fs.PathError{Op: "write", Path: "x.db", Err: syscall.EIO}, false},
		{errors.New("tx closed"), false},
	} {
		err := g.commitFailed(c.err)
		if errors.Is(err, ErrDiskFull) != c.full {
			t.Errorf("commitFailed(%v) = %v; disk full %v, want %v", c.err, err, !c.full, c.full)
		}
		if !errors.Is(err, c.err) {
			t.Errorf("commitFailed(%v) lost the cause: %v", c.err, err)
		}
	}
}

// No file of the package writes or decodes a stored value past the seal
// helpers: a bucket added later through them is sealed too.
func TestNoUnsealedAccess(t *testing.T) {
	files, err := filepath.Glob("*.go")
	if err != nil {
		t.Fatal(err)
	}
	fset := token.NewFileSet()
	for _, name := range files {
		if strings.HasSuffix(name, "_test.go") || name == "seal.go" {
			continue
		}
		src, err := os.ReadFile(name)
		if err != nil {
			t.Fatal(err)
		}
		f, err := parser.ParseFile(fset, name, src, 0)
		if err != nil {
			t.Fatal(err)
		}
		ast.Inspect(f, func(n ast.Node) bool {
			call, ok := n.(*ast.CallExpr)
			if !ok {
				return true
			}
			sel, ok := call.Fun.(*ast.SelectorExpr)
			if !ok {
				return true
			}
			x, _ := sel.X.(*ast.Ident)
			switch {
			case sel.Sel.Name == "Put" && len(call.Args) == 2:
				t.Errorf("%s: a bbolt Put outside seal.go: use putValue, putJSON or putTime", fset.Position(call.Pos()))
			case sel.Sel.Name == "Unmarshal" && x != nil && x.Name == "json":
				t.Errorf("%s: json.Unmarshal of a stored value outside seal.go: use getJSON or decodeJSON", fset.Position(call.Pos()))
			}
			return true
		})
	}
}
