//go:build unix

// Command rendertime times whole `rfledger` processes on generated farm-network sheets of
// several sizes and fits how the time grows with the size:
//
//	go build -o /tmp/rfledger ./cmd/rfledger
//	go run ./internal/gen/cmd/rendertime -bin /tmp/rfledger -runs 5
//
// For each size it writes the sheet (internal/gen, seed 1) to a temporary folder, runs
// `BIN render SHEET -o PAGE` (or `BIN check SHEET` with -cmd check) -runs times, and prints
// the median wall time and the largest peak resident set size. The last line is the exponent
// k of time ≈ c·N^k, a least-squares fit of log(median time) against log(N); N·log N over
// 1,000 to 100,000 fits as k ≈ 1.1.
package main

import (
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/rfledger/rfledger/internal/gen"
)

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }

func run(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("rendertime", flag.ContinueOnError)
	fs.SetOutput(stderr)
	bin := fs.String("bin", "", "the rfledger `binary` to time (required)")
	runs := fs.Int("runs", 5, "runs per size; the median is reported")
	sizes := fs.String("sizes", "1000,2000,5000,10000,20000,50000,100000", "sheet sizes in quantities, comma-separated")
	cmd := fs.String("cmd", "render", "`render` (page and charts, with the analyses) or check (load and evaluate)")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	ns, err := parseSizes(*sizes)
	if err != nil || *bin == "" || *runs < 1 || (*cmd != "render" && *cmd != "check") {
		fmt.Fprintln(stderr, "rendertime: want -bin BINARY, -runs ≥ 1, -cmd render|check and -sizes N,N,...", err)
		return 2
	}
	dir, err := os.MkdirTemp("", "rendertime")
	if err != nil {
		fmt.Fprintln(stderr, "rendertime:", err)
		return 1
	}
	defer os.RemoveAll(dir)
	fmt.Fprintf(stdout, "%10s %12s %12s %12s\n", "N", "median s", "min s", "max RSS MB")
	var xs, ys []float64
	for _, n := range ns {
		times, rss, err := timeSize(*bin, *cmd, dir, n, *runs)
		if err != nil {
			fmt.Fprintln(stderr, "rendertime:", err)
			return 1
		}
		med := median(times)
		fmt.Fprintf(stdout, "%10d %12.3f %12.3f %12.1f\n", n, med, slices.Min(times), float64(rss)/1024)
		xs, ys = append(xs, float64(n)), append(ys, med)
	}
	if len(xs) >= 2 {
		k, r2 := fitPowerLaw(xs, ys)
		fmt.Fprintf(stdout, "fitted exponent: time ~ N^%.3f (R² %.3f, %s, N %d to %d)\n", k, r2, *cmd, ns[0], ns[len(ns)-1])
	}
	return 0
}

func parseSizes(s string) ([]int, error) {
	var out []int
	for _, f := range strings.Split(s, ",") {
		n, err := strconv.Atoi(strings.TrimSpace(f))
		if err != nil {
			return nil, err
		}
		out = append(out, n)
	}
	return out, nil
}

// timeSize writes the sheet of n quantities and times runs processes on it. RSS is in KiB.
func timeSize(bin, cmd, dir string, n, runs int) ([]float64, int64, error) {
	src, err := gen.Budget(n, 1)
	if err != nil {
		return nil, 0, err
	}
	sheet := filepath.Join(dir, fmt.Sprintf("farm-%d.toml", n))
	if err := os.WriteFile(sheet, src, 0o644); err != nil {
		return nil, 0, err
	}
	args := []string{"check", sheet}
	if cmd == "render" {
		args = []string{"render", sheet, "-o", filepath.Join(dir, fmt.Sprintf("farm-%d.md", n))}
	}
	var times []float64
	var rss int64
	for range runs {
		c := exec.Command(bin, args...)
		start := time.Now()
		out, err := c.CombinedOutput()
		elapsed := time.Since(start)
		if err != nil {
			return nil, 0, fmt.Errorf("%s %s: %v\n%s", bin, strings.Join(args, " "), err, out)
		}
		times = append(times, elapsed.Seconds())
		if ru, ok := c.ProcessState.SysUsage().(*syscall.Rusage); ok {
			rss = max(rss, int64(ru.Maxrss))
		}
	}
	return times, rss, nil
}

func median(xs []float64) float64 {
	s := slices.Clone(xs)
	slices.Sort(s)
	if len(s)%2 == 1 {
		return s[len(s)/2]
	}
	return (s[len(s)/2-1] + s[len(s)/2]) / 2
}

// fitPowerLaw fits y = c·x^k by least squares on (log x, log y) and returns k and the
// coefficient of determination R² of that line.
func fitPowerLaw(xs, ys []float64) (k, r2 float64) {
	n := float64(len(xs))
	var sx, sy, sxx, sxy, syy float64
	for i := range xs {
		lx, ly := math.Log(xs[i]), math.Log(ys[i])
		sx, sy = sx+lx, sy+ly
		sxx, sxy, syy = sxx+lx*lx, sxy+lx*ly, syy+ly*ly
	}
	vx, vy, cxy := sxx-sx*sx/n, syy-sy*sy/n, sxy-sx*sy/n
	k = cxy / vx
	if vy == 0 {
		return k, 1
	}
	return k, cxy * cxy / (vx * vy)
}
