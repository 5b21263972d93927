// Package chart draws seine's diagnostics as PNG or SVG images: cost
// against evaluations and wall time, performance profiles, confusion
// matrices, penalty sweeps, learning curves, ROC and precision–recall
// curves with their operating points, and reliability diagrams. SVG
// output has <svg> as its document element, so it can be inlined in an
// HTML page.
//
// Every chart writes to an io.Writer in a Format; FormatOf picks the
// Format from a file name's extension so that callers at the edge can
// open the file themselves. Charts take plain slices and never open
// files or print.
//
// Conventions shared by all charts:
//
//   - Single-panel images are Width × Height (16 cm × 10 cm); the
//     two-panel cost chart is WideWidth × Height. PNG images are rendered
//     at DPI dots per inch.
//   - Each line has its own colour, dash pattern and marker shape, so
//     lines stay distinguishable when printed in grey. Colours come from
//     the palette of Okabe & Ito (2008), chosen to be distinguishable
//     with common colour-vision deficiencies.
//   - Legends are drawn below the plotting area, never over the data.
//   - On a logarithmic axis, points whose value is not positive cannot be
//     drawn; they are dropped (each chart documents where that can
//     happen). Points with NaN or infinite coordinates are dropped too.
//
// Bad input (mismatched lengths, empty series, unknown formats) returns an
// error wrapping one of the package's sentinel errors; nothing panics.
package chart
