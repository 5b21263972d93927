package spec

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"

	"gopkg.in/yaml.v3"
)

// WriteYAML writes n in the canonical form of the format: keys in the
// order of the package documentation, classes as a flow list (or
// `units: K` when the classes are "0" … "K-1"), the inputs as a count or,
// when n has feature names, as a list whose entries are bare names for
// plain numbers (the zero Input) and otherwise mappings with only their
// non-default keys (name, type, levels as a flow list, missing, unknown),
// missing_tokens only when they differ from DefaultMissingTokens, penalty
// and init always, train only with its set (non-zero) fields, class
// weights as `balanced` or a mapping in class order.
//
// Parse of the output gives a Network equal to n (reflect.DeepEqual) for
// every n that Parse returns, and for any valid n whose empty Hidden is
// nil, whose MissingTokens is set, and whose Types is set when Features
// is (a nil Types reads back as zero Inputs, a nil MissingTokens as
// DefaultMissingTokens: the same meaning, another value).
//
// WriteYAML first checks n as Validate does, without the size limits, and
// writes nothing if n is invalid.
func (n *Network) WriteYAML(w io.Writer) error {
	if err := asError(n.check(Limits{MaxParams: math.MaxInt, MaxClasses: math.MaxInt, MaxLevels: math.MaxInt})); err != nil {
		return err
	}
	root := &yaml.Node{Kind: yaml.MappingNode}
	root.Content = pair(root.Content, "version", num(n.Version))
	if n.Name != "" {
		root.Content = pair(root.Content, "name", str(n.Name))
	}
	if n.Features != nil {
		in := &yaml.Node{Kind: yaml.SequenceNode}
		for i, name := range n.Features {
			in.Content = append(in.Content, input(name, n.Input(i)))
		}
		root.Content = pair(root.Content, "inputs", in)
	} else {
		root.Content = pair(root.Content, "inputs", num(n.Inputs))
	}
	if n.MissingTokens != nil && !slices.Equal(n.MissingTokens, DefaultMissingTokens) {
		root.Content = pair(root.Content, "missing_tokens", seq(yaml.FlowStyle, n.MissingTokens))
	}
	if len(n.Hidden) > 0 {
		h := &yaml.Node{Kind: yaml.SequenceNode}
		for _, l := range n.Hidden {
			m := &yaml.Node{Kind: yaml.MappingNode}
			m.Content = pair(m.Content, "units", num(l.Units))
			m.Content = pair(m.Content, "activation", plain(l.Activation.String()))
			h.Content = append(h.Content, m)
		}
		root.Content = pair(root.Content, "hidden", h)
	}

	o := &yaml.Node{Kind: yaml.MappingNode}
	if numbered(n.Output.Classes) {
		o.Content = pair(o.Content, "units", num(len(n.Output.Classes)))
	} else {
		o.Content = pair(o.Content, "classes", seq(yaml.FlowStyle, n.Output.Classes))
	}
	o.Content = pair(o.Content, "activation", plain(n.Output.Activation.String()))
	if n.Output.Multilabel {
		o.Content = pair(o.Content, "multilabel", plain("true"))
	}
	root.Content = pair(root.Content, "output", o)

	p := &yaml.Node{Kind: yaml.MappingNode}
	p.Content = pair(p.Content, "l2", float(n.Penalty.L2))
	p.Content = pair(p.Content, "l1", float(n.Penalty.L1))
	p.Content = pair(p.Content, "bias", plain(strconv.FormatBool(n.Penalty.Bias)))
	root.Content = pair(root.Content, "penalty", p)

	in := &yaml.Node{Kind: yaml.MappingNode}
	in.Content = pair(in.Content, "scheme", plain(n.Init.Scheme.String()))
	if n.Init.Scale != 0 {
		in.Content = pair(in.Content, "scale", float(n.Init.Scale))
	}
	in.Content = pair(in.Content, "seed", plain(strconv.FormatUint(n.Init.Seed, 10)))
	root.Content = pair(root.Content, "init", in)

	t := &yaml.Node{Kind: yaml.MappingNode}
	if n.Train.Optimizer != 0 {
		t.Content = pair(t.Content, "optimizer", plain(n.Train.Optimizer.String()))
	}
	if n.Train.Iterations != 0 {
		t.Content = pair(t.Content, "iterations", num(n.Train.Iterations))
	}
	if n.Train.Batch != 0 {
		t.Content = pair(t.Content, "batch", num(n.Train.Batch))
	}
	if n.Train.Rate != 0 {
		t.Content = pair(t.Content, "rate", float(n.Train.Rate))
	}
	if n.Train.Tolerance != 0 {
		t.Content = pair(t.Content, "tolerance", float(n.Train.Tolerance))
	}
	if cw := n.Train.ClassWeights; cw.Balanced {
		t.Content = pair(t.Content, "class_weights", plain("balanced"))
	} else if len(cw.By) > 0 {
		m := &yaml.Node{Kind: yaml.MappingNode}
		for _, c := range n.Output.Classes {
			if w, ok := cw.By[c]; ok {
				m.Content = append(m.Content, str(c), float(w))
			}
		}
		t.Content = pair(t.Content, "class_weights", m)
	}
	if len(t.Content) > 0 {
		root.Content = pair(root.Content, "train", t)
	}

	enc := yaml.NewEncoder(w)
	enc.SetIndent(2)
	if err := enc.Encode(root); err != nil {
		return fmt.Errorf("spec: write: %w", err)
	}
	if err := enc.Close(); err != nil {
		return fmt.Errorf("spec: write: %w", err)
	}
	return nil
}

// input writes one entry of `inputs`: a bare name for the zero Input,
// else a mapping with the keys that differ from their defaults, in the
// order name, type, levels, missing, unknown.
func input(name string, in Input) *yaml.Node {
	if in.IsZero() {
		return str(name)
	}
	m := &yaml.Node{Kind: yaml.MappingNode}
	m.Content = pair(m.Content, "name", str(name))
	if in.Type != NumberInput {
		m.Content = pair(m.Content, "type", plain(in.Type.String()))
	}
	if in.Levels != nil {
		m.Content = pair(m.Content, "levels", seq(yaml.FlowStyle, in.Levels))
	}
	switch in.Missing {
	case MissingRefuse:
	case MissingConstant:
		m.Content = pair(m.Content, "missing", float(in.Fill))
	default:
		m.Content = pair(m.Content, "missing", plain(in.Missing.String()))
	}
	if in.Unknown != UnknownRefuse {
		m.Content = pair(m.Content, "unknown", plain(in.Unknown.String()))
	}
	return m
}

// numbered reports whether classes are exactly "0" … "K-1", the names that
// `units: K` gives.
func numbered(classes []string) bool {
	for i, c := range classes {
		if c != strconv.Itoa(i) {
			return false
		}
	}
	return len(classes) > 0
}

func pair(c []*yaml.Node, key string, v *yaml.Node) []*yaml.Node {
	return append(c, plain(key), v)
}

// plain is a scalar written as is: names, numbers and booleans.
func plain(s string) *yaml.Node { return &yaml.Node{Kind: yaml.ScalarNode, Value: s} }

// str is a string scalar, quoted by the encoder when it would otherwise
// read back as a number, boolean or null.
func str(s string) *yaml.Node { return &yaml.Node{Kind: yaml.ScalarNode, Tag: "!!str", Value: s} }

func num(i int) *yaml.Node { return plain(strconv.Itoa(i)) }

// float writes the shortest decimal that reads back as exactly v.
func float(v float64) *yaml.Node { return plain(strconv.FormatFloat(v, 'g', -1, 64)) }

func seq(style yaml.Style, list []string) *yaml.Node {
	s := &yaml.Node{Kind: yaml.SequenceNode, Style: style}
	for _, x := range list {
		s.Content = append(s.Content, str(x))
	}
	return s
}
