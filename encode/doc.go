// Package encode turns raw records — numbers, category levels as text,
// missing values — into the input vector of a net, the same way in
// training, evaluation, prediction and the Go API. Nothing else in seine
// encodes a value.
//
// # The encoder
//
// An Encoder is fitted on training rows only (Fit) and then travels inside
// the model file, so a service encodes exactly as training did. For raw
// input i it holds:
//
//	number:    one unit  u = (x − Mean) / Scale,  x = Fill when missing
//	category:  L units, one-hot in level order; L+1 with the rule `level`,
//	           whose last unit marks a missing value; all 0 for a level
//	           never seen in training under the rule `ignore`
//
// Fill comes from the input's missing rule, computed on the training rows:
// the mean, the median (the middle value, or the mean of the two middle
// values), the mode (the most frequent value, the smallest on ties; for a
// category the first level in level order), or the spec's constant. Mean
// and Scale standardise the filled column (sample standard deviation,
// divisor n − 1, as gonum's stat.MeanStdDev); one-hot units are not
// scaled. Levels not declared in the
// spec are learned from the training rows and ordered numerically when
// every level is an integer, else by byte order, so that the order does not
// depend on the order of the rows.
//
// # Coding and expanding
//
// Values pass through two steps. Coding checks each raw value against its
// input's rules and gives one float64 per input: the number, the index of a
// category's level (−1 for an unknown level that is ignored), or NaN for a
// missing value that the rule fills. This is the step that fails, with an
// error naming the field (FieldError) or the file position (data.Error):
// a missing value or an unknown level that the rule refuses, text that is
// not a number, a number where a level is expected. Expanding turns a coded
// row into the units; it cannot fail and allocates nothing.
//
// Three ways in:
//
//   - Encoder.CodeRecord: a record by name (map[string]any), as decoded
//     from JSON: numbers, strings, nil for missing.
//   - Encoder.Layout: bind a column order once, then Layout.Code rows of
//     Values without looking names up and without allocating.
//   - Encoder.EncodeSet and CodeSet: a data set read from CSV with
//     Encoder.Columns (or ColumnsFor a spec), reporting every bad cell with
//     its line.
//
// nn.Model wraps these (Bind, PredictRecord, ProbabilitiesSet), so most
// programs never call this package directly except to build Values.
package encode
