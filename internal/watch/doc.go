// Package watch re-renders a worksheet whenever one of the files it depends
// on changes, writes the result atomically, and can optionally serve the
// rendered page on a loopback address with automatic browser refresh.
//
// Run is the entry point. It calls a Render function once, writes its output
// with WriteAtomic, and then watches the directories that hold every file the
// render reported. Watching directories rather than files keeps the watch alive
// when an editor saves by writing a temporary file and renaming it over the
// original, or by removing and re-creating the file. Bursts of events are
// debounced into a single recalculation, and the set of watched files is
// re-read after each render, so parts pulled in or dropped by the worksheet
// are followed automatically.
//
// A failing render never touches the output file: the last good report stays
// in place, the full error goes to Options.Errors and a one-line summary to
// Options.Status. The next successful render writes the output again.
//
// When Options.Serve is set, Run also serves a read-only HTML view of the
// Markdown output (rendered with goldmark and its GitHub-flavoured extensions;
// raw HTML in the Markdown is not passed through) under a status bar that stays
// in view: the verdict and focus value from Options.Summary, the time of the last
// recalculation, whether Options.Refine is still filling in the Monte Carlo, and
// the error while the sheet does not evaluate. The page holds a Server-Sent
// Events connection to /events and, on each new version, fetches /state (the bar
// and the report as JSON) and puts them in place without a reload, keeping the
// scroll position. Only the served HTML is reshaped for narrow windows (tables in
// boxes of their own, long sweep tables folded, numbers bound to their units);
// the output file stays as rendered. A bare port or ":port" binds 127.0.0.1 only.
package watch
