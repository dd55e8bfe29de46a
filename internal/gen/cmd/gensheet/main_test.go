package main

import (
	"bytes"
	"testing"

	"github.com/rfledger/rfledger/internal/gen"
)

func TestRun(t *testing.T) {
	want, _ := gen.Budget(500, 3)
	var out, errb bytes.Buffer
	if code := run([]string{"-n", "500", "-seed", "3"}, &out, &errb); code != 0 || !bytes.Equal(out.Bytes(), want) {
		t.Errorf("exit %d, output equals gen.Budget: %v; stderr %s", code, bytes.Equal(out.Bytes(), want), errb.String())
	}
	want, _ = gen.SumChain(20, 1)
	out.Reset()
	if code := run([]string{"-shape", "sumchain", "-n", "20"}, &out, &errb); code != 0 || !bytes.Equal(out.Bytes(), want) {
		t.Errorf("sumchain: exit %d", code)
	}
	for _, args := range [][]string{{"-shape", "ring"}, {"-n", "5"}, {"extra"}, {"-x"}} {
		out.Reset()
		errb.Reset()
		if code := run(args, &out, &errb); code != 2 || out.Len() != 0 || errb.Len() == 0 {
			t.Errorf("%q: exit %d, %d bytes out, stderr %q", args, code, out.Len(), errb.String())
		}
	}
}
