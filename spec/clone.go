package spec

import (
	"maps"
	"slices"
)

// Clone returns a deep copy of n: no slice is shared with n.
func (n *Network) Clone() *Network {
	if n == nil {
		return nil
	}
	c := *n
	c.Features = slices.Clone(n.Features)
	if n.Types != nil {
		c.Types = make([]Input, len(n.Types))
		for i, t := range n.Types {
			t.Levels = slices.Clone(t.Levels)
			c.Types[i] = t
		}
	}
	c.MissingTokens = slices.Clone(n.MissingTokens)
	c.Train.ClassWeights.By = maps.Clone(n.Train.ClassWeights.By)
	c.Hidden = slices.Clone(n.Hidden)
	c.Output.Classes = slices.Clone(n.Output.Classes)
	return &c
}
