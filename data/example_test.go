package data_test

import (
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
	// By hand: height mean 45, SD √(650/3) = 14.72; mass mean 13.65,
	// SD √(341.77/3) = 10.67, so row 1 scales to (−15/14.72, −9.55/10.67).
	sc, _ := data.FitScaler(s.X)
	row := make([]float64, len(s.Features))
	sc.TransformRow(row, s.X.RawRowView(0))
	fmt.Println("rows:", s.Rows(), "classes:", s.Classes, "counts:", s.Counts())
	fmt.Printf("height mean %.4g, SD %.4g; row 1 scaled: %.4g\n", sc.Mean[0], sc.Scale[0], row)
	// Output:
	// rows: 4 classes: [cat dog] counts: [2 2]
	// height mean 45, SD 14.72; row 1 scaled: [-1.019 -0.8947]
}

func ExampleError() {
	const in = "a,b,kind\n1,2,x\n3,abc,y\n"
	_, err := data.ReadCSV(strings.NewReader(in), data.CSVOptions{})
	fmt.Println(err)
	// Output:
	// line 3 (row 2), column "b": "abc" is not a number
}
