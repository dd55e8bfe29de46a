//go:build unix

package main

import (
	"os/exec"
	"path/filepath"
	"testing"
	"time"

	"github.com/rfledger/rfledger/internal/gen"
	"github.com/rfledger/rfledger/internal/watch"
)

// TestMeasure times two saves of a small generated sheet with the real command: each time
// includes at least watch's debounce (a page that came sooner was not the save's own, which
// is what the tool first measured before it compared the page's text).
func TestMeasure(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs rfledger watch")
	}
	goBin, err := exec.LookPath("go")
	if err != nil {
		t.Skip("no go command on PATH to build rfledger with")
	}
	bin := filepath.Join(t.TempDir(), "rfledger")
	if out, err := exec.Command(goBin, "build", "-o", bin, "github.com/rfledger/rfledger/cmd/rfledger").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	for _, e := range gen.Edits {
		times, err := measure(bin, 300, 2, e)
		if err != nil {
			t.Fatalf("%s: %v", e.Name, err)
		}
		if len(times) != 2 {
			t.Fatalf("%s: %d times, want 2", e.Name, len(times))
		}
		for _, d := range times {
			if d < watch.DefaultDebounce || d > time.Minute {
				t.Errorf("%s: a save took %v to show, want between the debounce (%v) and a minute", e.Name, d, watch.DefaultDebounce)
			}
		}
	}
}

func TestRunUsage(t *testing.T) {
	for _, args := range [][]string{{}, {"-bin", "x", "-saves", "0"}, {"-bin", "x", "-edit", "title"}} {
		if code := run(args, nil, discard{}); code != 2 {
			t.Errorf("%q: exit %d, want 2", args, code)
		}
	}
}

type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }
