// Package fit is the one fit layer of junco: importing a measurement file
// for a fit, choosing the fit's temperature, fitting I-V and C-V data sets,
// the Arrhenius analysis, batches of files with their statistics, and the
// records a fit leaves in a session. The command line (tui/cli) and the
// workbench (tui) both call it, so that the same file gives the same
// answer in both.
//
// Policies kept here, once:
//   - Temperature: the file's own (a temperature column, else a
//     "# temperature: 300 K" comment), else the option given, else the
//     caller's fallback (the junction's in the workbench, 300 K assumed on
//     the command line); the result always says which (Temperature.Source)
//     and a note says so when it was not the file's.
//   - Files: only regular files of at most MaxFileBytes are imported.
//   - Batches: directories are walked recursively, hidden entries skipped,
//     and files ending .csv, .tsv, .txt or .dat (any case) are taken, in
//     sorted order; one row per file in that order, whatever the number of
//     workers.
//   - Dies: a die's position comes from the dies.csv manifest of the
//     file's folder, else from the file name (x03_y07, X3Y7, r07c03 forms;
//     x/y wins over row/column); the manifest wins over the name. Limits
//     pass a fitted finite value within the band; the yield counts a
//     failed fit as failing every limit and leaves out files not run.
//   - Statistics: median, quartiles and Tukey fences, on log10 for the
//     quantities that span decades and are positive by nature (Is, Is2,
//     Rsh), linear for n and Rs (a fitted Rs of 0 is a value, not a gap).
//   - Lit curves: an I-V data set whose current has one sign at zero bias
//     and changes sign at open circuit (IsLit, in either sign convention)
//     is fitted with the lit single-diode model (LitIV), not the dark one;
//     the result says which sign convention was assumed.
//   - Records: one method name and one parameter set per model; values
//     that are not finite are left out with a note; record IDs are
//     MEASUREMENT-fit-K with the smallest free K.
//   - Model cards: the first I-V sweep is the reference (TNOM); each
//     sweep is fitted above its noise floor unless a window is given;
//     parameters nothing measured are left out with a note; the card is
//     checked in the circuit simulator only by CheckCard.
package fit
