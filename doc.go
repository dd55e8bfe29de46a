// Package rfledger is the entry point for Go programs that use rfledger worksheets: a
// production test rig that checks a unit against its budget, a firmware build step that
// writes the header, a service that serves the page.
//
// Three packages make up the API:
//
//   - [github.com/rfledger/rfledger/engine] loads a worksheet into a read-only [engine.Sheet]
//     and evaluates it into an [engine.Result] (values, requirement outcomes, warnings);
//   - [github.com/rfledger/rfledger/analysis] works on a Result: sensitivity, where the budget
//     goes, worst case, RSS and Monte Carlo tolerance, sweeps, solves and chain cascades;
//   - this package, rfledger, supplies the built-in formula functions ([Library]; [Load] and [LoadFS]
//     use them), and the writers of the rfledger command: the Markdown page
//     ([WriteMarkdown]), the JSON contract ([WriteJSON], schema in [RenderSchema]) and the C
//     header ([WriteCHeader]).
//
// A program that checks a worksheet:
//
//	sh, diags := rfledger.Load("field-probe-uplink.toml")
//	if diags.HasErrors() {
//		log.Fatal(diags) // FILE:LINE:COL: NAME: message; hint — every problem at once
//	}
//	r, _ := sh.Eval(engine.Override{Name: "tx.power", Value: "11 dBm"}) // as measured
//	margin, _ := sh.Quantity("link.margin")
//	fmt.Println(r.Display(margin)) // 9.50 dB
//	for _, rq := range sh.Requires {
//		pass, known := r.Pass(rq)
//		fmt.Println(rq.That, pass && known)
//	}
//
// The writers give the same bytes as the rfledger command for the same evaluation, so a page
// or header written by a program and one written by the command can be compared.
package rfledger
