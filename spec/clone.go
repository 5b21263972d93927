package spec

import "slices"

// Clone returns a deep copy of n: no slice is shared with n.
func (n *Network) Clone() *Network {
	if n == nil {
		return nil
	}
	c := *n
	c.Features = slices.Clone(n.Features)
	c.Hidden = slices.Clone(n.Hidden)
	c.Output.Classes = slices.Clone(n.Output.Classes)
	return &c
}
