package fit

import (
	"fmt"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/spec"
)

// ClassWeights returns the per-class cost factors that the spec's
// train.class_weights asks for on the training rows set, in class order,
// or nil when it asks for none:
//
//	balanced:  w_k = m / (K·m_k)   (m rows, K classes, m_k rows of class k;
//	           for multi-label rows, m_k counts the rows carrying class k)
//	a mapping: w_k as given; classes not named weigh 1
//
// A class with no training rows cannot be balanced: it gets 1, with a
// warning.
func ClassWeights(s *spec.Network, set *data.Set) (weights []float64, warnings []string) {
	cw := s.Train.ClassWeights
	if !cw.Set() {
		return nil, nil
	}
	classes := s.Output.Classes
	weights = make([]float64, len(classes))
	for k := range weights {
		weights[k] = 1
	}
	if cw.Balanced {
		m, K := float64(set.Rows()), float64(len(classes))
		for k, n := range set.Counts() {
			if n == 0 {
				warnings = append(warnings, fmt.Sprintf("class %q has no training rows: its balanced class weight is 1", classes[k]))
				continue
			}
			weights[k] = m / (K * float64(n))
		}
		return weights, warnings
	}
	for k, c := range classes {
		if w, ok := cw.By[c]; ok {
			weights[k] = w
		}
	}
	return weights, nil
}
