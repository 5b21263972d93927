package score_test

import (
	"fmt"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/score"
)

// Score probabilities against targets: six rows of a binary problem worked
// by hand. The most probable class is right on five rows (one positive
// scores 0.4); ranked by the positive class's probability, 8 of the 9
// positive–negative pairs are in order, so the ROC area is 8/9.
func ExampleEvaluate() {
	p := mat.NewDense(6, 2, []float64{
		0.9, 0.1, // no
		0.8, 0.2, // no
		0.3, 0.7, // yes
		0.6, 0.4, // yes, scored below the 0.5 line
		0.1, 0.9, // yes
		0.55, 0.45, // no
	})
	y := mat.NewDense(6, 2, []float64{1, 0, 1, 0, 0, 1, 0, 1, 0, 1, 1, 0})
	r, err := score.Evaluate(p, y, []string{"no", "yes"}, score.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("accuracy %.4f, ROC area of yes %.4f, AP of yes %.4f\n", r.Accuracy, *r.PerClass[1].ROCAUC, *r.PerClass[1].AveragePrecision)
	fmt.Println("confusion:", r.Confusion)
	// Output:
	// accuracy 0.8333, ROC area of yes 0.8889, AP of yes 0.9167
	// confusion: [[3 0] [1 2]]
}
