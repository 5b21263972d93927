package data

import (
	"fmt"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Set is a loaded data set: one row per example.
type Set struct {
	X          *mat.Dense // rows × features; nil for a set of zero rows, or once train.Train dropped it (train.Options.DropRows)
	Y          *mat.Dense // rows × len(Classes): one-hot (single-label) or multi-hot (multi-label); nil when the file had no label column or the set has zero rows
	Classes    []string   // class names in the order of Y's columns
	Features   []string   // feature names in the order of X's columns
	Multilabel bool       // Y is multi-hot: a row may carry none, one or several classes
	Lines      []int      // 1-based line in the file of each row (for messages); may be nil for derived sets
	// Texts holds, for each feature column read as text (a category
	// column, CSVOptions.Columns[j].Text), the distinct cell texts of the
	// file in order of first appearance; X[i, j] is then the index of row
	// i's text in Texts[j]. It is nil for a file with no text columns, and
	// Texts[j] is nil for a number column. In any column, NaN in X marks a
	// missing cell (one of the missing tokens).
	Texts [][]string
	// Kept holds the text of the CSVOptions.Keep columns for each row
	// (rows × len(Keep), in Keep order), trimmed like every cell and
	// otherwise untouched; nil without Keep.
	Kept [][]string
	// Label is the name of the label column in the file's header; "" when
	// the file had none.
	Label string
}

// Rows returns the number of rows: X's, or Y's once X was dropped.
func (s *Set) Rows() int {
	switch {
	case s.X != nil:
		r, _ := s.X.Dims()
		return r
	case s.Y != nil:
		r, _ := s.Y.Dims()
		return r
	}
	return 0
}

// Labels returns the class index of each row: the argmax of its row of Y
// (the first maximum on ties). For a multi-label set it is the lowest
// class index in the row's set, or −1 for a row with no class. It returns
// nil when Y is nil.
func (s *Set) Labels() []int {
	if s.Y == nil {
		return nil
	}
	r, c := s.Y.Dims()
	out := make([]int, r)
	for i := range r {
		row := s.Y.RawRowView(i)
		if s.Multilabel {
			out[i] = -1
			for j, v := range row {
				if v != 0 {
					out[i] = j
					break
				}
			}
			continue
		}
		best := 0
		for j := 1; j < c; j++ {
			if row[j] > row[best] {
				best = j
			}
		}
		out[i] = best
	}
	return out
}

// Counts returns the number of rows of each class: Y's column sums of
// nonzero entries, so for a multi-label set a row counts once in each of
// its classes. It returns nil when Y is nil.
func (s *Set) Counts() []int {
	if s.Y == nil {
		return nil
	}
	r, c := s.Y.Dims()
	out := make([]int, c)
	if !s.Multilabel {
		for _, k := range s.Labels() {
			out[k]++
		}
		return out
	}
	for i := range r {
		for j, v := range s.Y.RawRowView(i) {
			if v != 0 {
				out[j]++
			}
		}
	}
	return out
}

// Subset returns a new set holding copies of the given rows, in that order
// (a row may repeat). Class and feature names, Texts (shared, read-only),
// the Kept rows of the given rows and Label are carried over. An index out
// of range panics. An empty rows gives a set of zero rows with nil X and Y.
func (s *Set) Subset(rows []int) *Set {
	n := s.Rows()
	for _, i := range rows {
		if i < 0 || i >= n {
			panic(fmt.Sprintf("data: Subset row %d out of range [0, %d)", i, n))
		}
	}
	out := &Set{
		Classes:    slices.Clone(s.Classes),
		Features:   slices.Clone(s.Features),
		Multilabel: s.Multilabel,
		Texts:      s.Texts, // read-only after reading: shared
		Label:      s.Label,
	}
	if s.Kept != nil {
		out.Kept = make([][]string, len(rows))
		for k, i := range rows {
			out.Kept[k] = s.Kept[i]
		}
	}
	if len(rows) == 0 {
		return out
	}
	if s.X != nil {
		out.X = pick(s.X, rows)
	}
	if s.Y != nil {
		out.Y = pick(s.Y, rows)
	}
	if s.Lines != nil {
		out.Lines = make([]int, len(rows))
		for k, i := range rows {
			out.Lines[k] = s.Lines[i]
		}
	}
	return out
}

// pick copies the given rows of m into a new matrix.
func pick(m *mat.Dense, rows []int) *mat.Dense {
	_, c := m.Dims()
	d := make([]float64, 0, len(rows)*c)
	for _, i := range rows {
		d = append(d, m.RawRowView(i)...)
	}
	return mat.NewDense(len(rows), c, d)
}
