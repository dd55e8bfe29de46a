// Package chart renders the link-budget charts of the budget page as small,
// deterministic SVG files: a sweep chart (Line), a Monte Carlo histogram
// (Histogram), a signed contribution bar chart (Bars) and a level diagram
// (Levels).
//
// The same input always gives byte-identical output: the SVG holds no
// timestamps or generated ids, and fonts are referenced by family name
// ("Liberation Sans", the metric family the layout is computed with, falling
// back to the viewer's sans-serif) rather than embedded, which keeps each
// file to a few tens of kilobytes. Colours come from the colour-blind-safe
// palette of Okabe and Ito, and lines also differ by dash pattern so charts
// stay legible in greyscale.
//
// Non-finite values (NaN, ±Inf, and values <= 0 on a log axis) are skipped;
// input with nothing left to draw is an error.
package chart
