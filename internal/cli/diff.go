package cli

import (
	"bytes"
	"fmt"
	"io/fs"
	"os/exec"
	"path/filepath"
	"strings"
	"testing/fstest"

	"github.com/rfledger/rfledger/analysis"
	"github.com/rfledger/rfledger/engine"
	"github.com/rfledger/rfledger/units"
)

func cmdDiff(e *Env, args []string) int {
	fs := newFlags(e, "diff")
	rev := fs.String("rev", "", "compare the worksheet as committed at git revision `REV` with the working file")
	format := fs.String("format", "markdown", "output `markdown|json`")
	exitCode := fs.Bool("exit-code", false, "exit 1 when a requirement flips from pass to fail or the focus gets worse by more than --tolerance")
	tolText := fs.String("tolerance", "0", "with --exit-code, how much worse the focus may get: `X` such as 0.5dB, a plain number in the focus's unit (default 0)")
	trials := fs.Int("trials", analysis.DefaultTrials, "run `N` Monte Carlo trials on each side (0: compare the worst cases and solves only)")
	seed := fs.Uint64("seed", 1, "Monte Carlo seed `N`, the same for both sides")
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if *format != "markdown" && *format != "json" {
		return usageErr(e, "diff", "--format is markdown or json, not %q", *format)
	}
	if *trials < 0 || *trials > analysis.MaxTrials {
		return usageErr(e, "diff", "--trials must be between 0 and %d", analysis.MaxTrials)
	}
	ao := &analysis.Options{Trials: *trials, Seed: *seed, SkipMonteCarlo: *trials == 0}
	tol, _, err := units.Parse(*tolText)
	if err != nil || tol.V < 0 {
		return usageErr(e, "diff", "--tolerance wants a non-negative amount such as 0.5dB, not %q", *tolText)
	}
	var oldEv, newEv *evaluated
	var oldName, newName string
	var oldFS sourceFS // where the old sheet was read from, for the excerpts under its errors
	switch {
	case *rev != "" && len(pos) == 1:
		gfs, name, err := gitFS(pos[0], *rev)
		if err != nil {
			fmt.Fprintf(e.Stderr, "rfledger diff: %v\n", err)
			return ExitBadSheet
		}
		oldName, newName = pos[0]+" at "+*rev, pos[0]
		oldEv, oldFS = evaluate(name, nil, gfs, ao), gfs
		newEv = evaluate(pos[0], nil, nil, ao)
	case *rev == "" && len(pos) == 2:
		oldName, newName = pos[0], pos[1]
		oldEv = evaluate(pos[0], nil, nil, ao)
		newEv = evaluate(pos[1], nil, nil, ao)
	default:
		return usageErr(e, "diff", "want OLD NEW, or SHEET --rev REV")
	}
	printDiagsFrom(e, oldEv.diags, oldFS)
	printDiags(e, newEv.diags)
	if !oldEv.ok() || !newEv.ok() {
		return ExitBadSheet
	}
	reg, err := regressions(oldEv.result, newEv.result, tol)
	if err != nil {
		return usageErr(e, "diff", "--tolerance: %v", err)
	}
	cases, err := diffCases(oldEv, newEv, tol, &reg)
	if err != nil {
		return usageErr(e, "diff", "--tolerance: %v", err)
	}
	if *format == "json" {
		doc := diffDocOf(oldName, newName, oldEv.result, newEv.result, reg)
		doc.Cases = cases
		doc.Solves, doc.Tolerance = solvesDiff(oldEv.analysis, newEv.analysis), toleranceDiff(oldEv.analysis, newEv.analysis)
		_, _ = e.Stdout.Write(encode(doc))
	} else {
		md := diffMarkdown(oldName, newName, oldEv.result, newEv.result)
		md = append(md, solvesMarkdown(solvesDiff(oldEv.analysis, newEv.analysis))...)
		md = append(md, toleranceMarkdown(toleranceDiff(oldEv.analysis, newEv.analysis))...)
		_, _ = e.Stdout.Write(append(md, casesMarkdown(cases)...))
	}
	if *exitCode && (reg.focusWorse || len(reg.flipped) > 0) {
		for _, that := range reg.flipped {
			fmt.Fprintf(e.Stderr, "rfledger diff: %s passed and now fails\n", that)
		}
		if reg.focusWorse {
			fmt.Fprintf(e.Stderr, "rfledger diff: focus %s got worse by %s (tolerance %s)\n", newEv.sheet.Focus, reg.focusChange, *tolText)
		}
		return ExitFail
	}
	return ExitOK
}

// gitFS reads a worksheet and its parts as committed at rev.
func gitFS(sheet, rev string) (fs.FS, string, error) {
	dir, err := filepath.Abs(filepath.Dir(sheet))
	if err != nil {
		return nil, "", err
	}
	prefix, err := exec.Command("git", "-C", dir, "rev-parse", "--show-prefix").Output()
	if err != nil {
		return nil, "", fmt.Errorf("%s is not in a git work tree", sheet)
	}
	if strings.HasPrefix(rev, "-") || exec.Command("git", "-C", dir, "rev-parse", "--verify", "--quiet", rev+"^{commit}").Run() != nil {
		return nil, "", fmt.Errorf("--rev %s: no such revision in the git history of %s; git log --oneline lists the revisions", rev, sheet)
	}
	path := strings.TrimSpace(string(prefix)) + filepath.Base(sheet)
	if exec.Command("git", "-C", dir, "cat-file", "-e", rev+":"+path).Run() != nil {
		return nil, "", fmt.Errorf("--rev %s: %s was not committed at that revision", rev, sheet)
	}
	return &revFS{dir: dir, rev: rev, prefix: strings.TrimSpace(string(prefix))}, filepath.Base(sheet), nil
}

type revFS struct{ dir, rev, prefix string }

func (r *revFS) Open(name string) (fs.File, error) {
	if !fs.ValidPath(name) || strings.HasPrefix(r.rev, "-") {
		return nil, &fs.PathError{Op: "open", Path: name, Err: fs.ErrInvalid}
	}
	out, err := exec.Command("git", "-C", r.dir, "show", r.rev+":"+r.prefix+name).Output()
	if err != nil {
		return nil, &fs.PathError{Op: "open", Path: name + " at " + r.rev, Err: fs.ErrNotExist}
	}
	return fstest.MapFS{name: {Data: out}}.Open(name)
}

// diffMarkdown writes what changed in the results, as Markdown.
func diffMarkdown(oldName, newName string, ra, rb *engine.Result) []byte {
	a, b := ra.Sheet(), rb.Sheet()
	var w bytes.Buffer
	title := b.Title
	if title == "" {
		title = "worksheet"
	}
	fmt.Fprintf(&w, "# Changes in %s\n\nOld: `%s` (hash `%s`). New: `%s` (hash `%s`).\n\n", title, oldName, a.Hash, newName, b.Hash)
	fmt.Fprintf(&w, "## Verdict\n\n| | old | new |\n| --- | --- | --- |\n")
	if renamed, _ := focusRedefined(a, b); renamed {
		fmt.Fprintf(&w, "| focus | %s | %s |\n", focusValue(ra), focusValue(rb))
	} else if f, ok := b.Quantity(b.Focus); ok {
		old := "—"
		if g, ok := a.Quantity(b.Focus); ok {
			old = ra.Display(g)
		}
		ch := change(ra, rb, f)
		if ch != "" {
			ch = " (" + ch + ")"
		}
		fmt.Fprintf(&w, "| focus `%s` | %s | %s%s |\n", f.Name, old, rb.Display(f), ch)
	}
	for _, p := range pairRequires(a, b) {
		switch {
		case p.new == nil:
			fmt.Fprintf(&w, "| `%s` | %s | (removed) |\n", p.old.That, passText(ra, p.old))
		case p.old == nil:
			fmt.Fprintf(&w, "| `%s` | (new) | %s |\n", p.new.That, passText(rb, p.new))
		case p.old.That != p.new.That:
			fmt.Fprintf(&w, "| `%s` (was `%s`) | %s | %s |\n", p.new.That, p.old.That, passText(ra, p.old), passText(rb, p.new))
		default:
			fmt.Fprintf(&w, "| `%s` | %s | %s |\n", p.new.That, passText(ra, p.old), passText(rb, p.new))
		}
	}
	if f := focusMarkdown(ra, rb); f != "" {
		fmt.Fprintf(&w, "\n%s", f)
	}
	var rows []string
	for _, q := range b.Quantities() {
		old, ok := a.Quantity(q.Name)
		switch {
		case !ok:
			rows = append(rows, fmt.Sprintf("| `%s` | (new) | %s | |", q.Name, rb.Display(q)))
		case ra.Display(old) != rb.Display(q) || old.Formula != q.Formula || old.Text != q.Text:
			how := ""
			if old.Formula != q.Formula {
				how = " (formula changed)"
			}
			rows = append(rows, fmt.Sprintf("| `%s` | %s | %s | %s%s |", q.Name, ra.Display(old), rb.Display(q), change(ra, rb, q), how))
		}
	}
	for _, q := range a.Quantities() {
		if _, ok := b.Quantity(q.Name); !ok {
			rows = append(rows, fmt.Sprintf("| `%s` | %s | (removed) | |", q.Name, ra.Display(q)))
		}
	}
	fmt.Fprintf(&w, "\n## Quantities\n\n")
	if len(rows) == 0 {
		fmt.Fprintf(&w, "No value changed.\n")
		return w.Bytes()
	}
	fmt.Fprintf(&w, "| quantity | old | new | change |\n| --- | ---: | ---: | ---: |\n%s\n", strings.Join(rows, "\n"))
	return w.Bytes()
}

// focusValue is a sheet's focus and its value, for a verdict row.
func focusValue(r *engine.Result) string {
	sh := r.Sheet()
	if q, ok := sh.Quantity(sh.Focus); ok {
		return "`" + q.Name + "` = " + r.Display(q)
	}
	return "none"
}

func passText(r *engine.Result, rq *engine.Require) string {
	pass, known := r.Pass(rq)
	switch {
	case !known:
		return "cannot evaluate"
	case pass:
		return "PASS"
	}
	return "**FAIL**"
}

// change writes the difference new − old of a quantity when both are comparable.
func change(ra, rb *engine.Result, q *engine.Quantity) string {
	old, ok := ra.Sheet().Quantity(q.Name)
	if !ok {
		return ""
	}
	ov, ok1 := ra.Value(old)
	nv, ok2 := rb.Value(q)
	if !ok1 || !ok2 || ov.D != nv.D || ov.K != nv.K {
		return ""
	}
	d, err := units.Sub(nv, ov)
	if err != nil || d.V == 0 {
		return ""
	}
	s := d.String()
	if d.V > 0 {
		s = "+" + s
	}
	return s
}
