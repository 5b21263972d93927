package data_test

import (
	"errors"
	"fmt"
	"strings"

	"github.com/seine-ml/seine/data"
)

func ExampleReadCSV() {
	const in = `height_cm,mass_kg,kind
30,4.1,cat
35,5.0,cat
60,25.0,dog
55,20.5,dog
`
	s, err := data.ReadCSV(strings.NewReader(in), data.CSVOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("rows:", s.Rows(), "classes:", s.Classes, "counts:", s.Counts())
	fmt.Println("features:", s.Features, "row 1:", s.X.RawRowView(0), "label:", s.Label)
	// Output:
	// rows: 4 classes: [cat dog] counts: [2 2]
	// features: [height_cm mass_kg] row 1: [30 4.1] label: kind
}

func ExampleError() {
	const in = "a,b,kind\n1,2,x\n3,abc,y\n"
	_, err := data.ReadCSV(strings.NewReader(in), data.CSVOptions{})
	var e *data.Error // the first problem in the file
	if errors.As(err, &e) {
		fmt.Println(e.Line, e.Row, e.Column, errors.Is(err, data.ErrNotNumber))
	}
	// Output:
	// 3 2 b true
}

func ExampleErrorList() {
	const in = "plan,tenure,churned\nbasic,12,no\nteam,?,yes\npro,,no\n"
	_, err := data.ReadCSV(strings.NewReader(in), data.CSVOptions{})
	fmt.Println(err)
	var list *data.ErrorList
	if errors.As(err, &list) {
		fmt.Println(len(list.Errors), "problems; missing values:", errors.Is(err, data.ErrMissingValue))
	}
	// Output:
	// line 2 (row 1), column "plan": "basic" is not a number; declare `type: category` for a text column
	// line 3 (row 2), column "plan": "team" is not a number; declare `type: category` for a text column
	// line 3 (row 2), column "tenure": missing value "?"; the spec's missing rule for this input is refuse: set `missing:` (e.g. mean, median, mode)
	// line 4 (row 3), column "plan": "pro" is not a number; declare `type: category` for a text column
	// line 4 (row 3), column "tenure": missing value ""; the spec's missing rule for this input is refuse: set `missing:` (e.g. mean, median, mode)
	// 5 problems; missing values: true
}

func ExampleCSVOptions_columns() {
	const in = "id,plan,tenure,churned\nc1,basic,12,no\nc2,team,NA,yes\nc3,basic,30,no\n"
	s, err := data.ReadCSV(strings.NewReader(in), data.CSVOptions{
		Columns: []data.Column{{Name: "tenure", Missing: true}, {Name: "plan", Text: true}},
		Keep:    []string{"id"},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for i := range s.Rows() {
		fmt.Println(s.Kept[i][0], s.X.RawRowView(i), s.Texts[1][int(s.X.At(i, 1))])
	}
	fmt.Println(s.Features, s.Texts, s.Label)
	// Output:
	// c1 [12 0] basic
	// c2 [NaN 1] team
	// c3 [30 0] basic
	// [tenure plan] [[] [basic team]] churned
}
