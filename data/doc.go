// Package data reads data sets from CSV into matrices and deals rows into
// stratified splits and folds. Encoding the values for a net (fill values,
// levels, standardisation) is package encode's job.
// It imports no other package of the module.
//
// # CSV
//
// ReadCSV reads RFC 4180 text (Shafranovich, 2005): fields separated by
// commas (or CSVOptions.Comma), a field in double quotes may hold the
// separator, line breaks and doubled quotes (""), and lines may end in LF
// or CRLF. A carriage return (CR) outside quotes that no LF follows is an
// error (ErrLineEnds): a file whose lines end in CR alone would otherwise
// read as one long line. A UTF-8 byte order mark at the start is skipped,
// blank lines are skipped, and spaces around a value are trimmed.
//
// The first row must be a header naming the columns; names are trimmed and
// must be distinct. A first row that is all numbers is reported as a
// missing header. The label column is CSVOptions.Label, or the last column;
// every other column is a feature unless CSVOptions.Features or
// CSVOptions.Columns pick columns by name, in any order of the file, and
// the rest are ignored. Every data row must have as many fields as the
// header. A label is a class name (a word or an integer) matched exactly
// after trimming; in a multi-label file a label cell lists classes
// separated by '|', and an empty cell means no class. Set.Label is the
// label column's name.
//
// # Feature cells
//
// A number column's cell must be a finite decimal number: a non-number,
// NaN, ±Inf or a value beyond the float64 range is an error. A text column
// (Column.Text, a category) keeps its trimmed text: X[i, j] is the index of
// row i's text in Set.Texts[j], the column's distinct texts in order of
// first appearance, so that X is still a matrix of float64 and the texts
// come back out without loss.
//
// A cell whose trimmed text is one of the missing tokens
// (CSVOptions.MissingTokens; by default "", "?" and "NA") is missing, in a
// number or a text column alike. Where the column allows it
// (Column.Missing) the cell reads as NaN, never an index or a number;
// elsewhere, and in every column read by Features or by default, it is an
// error wrapping ErrMissingValue (and ErrEmptyField when the cell is
// empty). Label cells are never missing: a token there is a class name.
//
// Columns named in CSVOptions.Keep (an id, a timestamp) are copied as text
// to Set.Kept, one row of len(Keep) strings per data row, to join results
// back to the file; a kept column may also be a feature or the label.
// Subset and Split carry Texts, Kept and Label to the sets they make.
//
// # Errors
//
// A problem is a *Error naming the 1-based line (as an editor shows it),
// the 1-based data row and the column, for example
//
//	line 7 (row 6), column "plan": "team" is not a number; declare `type: category` for a text column
//
// and wrapping a sentinel such as ErrNotNumber; a hint ends the message
// where one fits (a text in a number column, a missing value where the
// column refuses one, a '|' in a single-label cell). Problems in cells are
// collected over the whole file into an *ErrorList, so that a file can be
// fixed in one pass: the first MaxListed (20) in file order, then a line
// "and N more in column "x"" per column with more, which keeps the list's
// memory bounded whatever the file. A problem with the structure (the
// header, a row's field count, a quote, line ends, a size limit) stops
// reading: it ends the list, or stands alone when no cell problem came
// before it. errors.As with a *Error finds the first problem either way.
// Size limits (columns, bytes per line, rows) bound the memory a hostile
// file can make ReadCSV use.
//
// # Targets
//
// For K classes, Set.Y has K columns. Single-label: row i is one-hot,
// Y[i][c] = 1 when the row's class is c, else 0. Multi-label: row i is
// multi-hot, Y[i][c] = 1 for every class c listed in its cell.
//
// # Stratification
//
// Split and Folds are stratified by class (for a multi-label set, by the
// lowest-numbered class of the row, with rows of no class as a stratum of
// their own), so that every part has close to the class shares of the
// whole, which keeps rare classes present in each part (Kohavi, 1995,
// recommends stratified cross-validation). Split takes ⌊h·n_c⌋ holdout
// rows from class c and gives one more to the classes with the largest
// fractional parts h·n_c − ⌊h·n_c⌋ until the total is round(h·n)
// (the largest remainder method of apportionment, Hamilton, 1792), so each
// class's holdout count is within one row of h·n_c; a class never gives up
// its last training row (so with tiny classes the holdout may come out
// smaller than round(h·n)). Folds shuffles each class, lays the classes end
// to end and deals position p to fold p mod k. Both draw from
// math/rand/v2's PCG (O'Neill, 2014) seeded by the caller, so the same seed
// gives the same parts on every platform.
//
// References:
//   - Y. Shafranovich (2005), RFC 4180, Common Format and MIME Type for
//     Comma-Separated Values (CSV) Files.
//   - T. F. Chan, G. H. Golub, R. J. LeVeque (1983), Algorithms for
//     computing the sample variance: analysis and recommendations, The
//     American Statistician 37(3).
//   - R. Kohavi (1995), A study of cross-validation and bootstrap for
//     accuracy estimation and model selection, IJCAI.
//   - M. E. O'Neill (2014), PCG: a family of simple fast space-efficient
//     statistically good algorithms for random number generation.
package data
