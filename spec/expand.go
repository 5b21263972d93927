package spec

import "gopkg.in/yaml.v3"

// The parser follows aliases, so what it sees is the document with every
// alias replaced by a copy of its anchored node. A short document can
// stand for a very long one (an anchored list of levels referred to from
// every input), which would cost memory far beyond the bytes read, and
// make a Network whose written form (the spec a model stores) is far
// over the limit its reader applies. checkExpansion counts the expanded
// document against Limits.MaxBytes before anything is built from it.

// expansion measures the expanded size of a document: its length in
// bytes, plus, for every alias, the size of its anchored node less the
// alias itself ("*name"). The size of a node counts each scalar's text
// plus one byte (the least separator it needs when written) and one byte
// for each list and mapping; the size of an anchored node is computed
// once, so the count takes time linear in the document, whatever it stands
// for. Only an alias can take the count over the limit, since the
// document itself is within it.
type expansion struct {
	limit int64
	total int64
	memo  map[*yaml.Node]int64
	busy  map[*yaml.Node]bool // anchored nodes being measured (a cycle guard)
	over  *yaml.Node          // the alias at which total passed limit
}

// checkExpansion returns an ErrTooLarge *Error at the first alias at which
// the expanded document passes lim.MaxBytes, or nil. size is the
// document's length in bytes.
func checkExpansion(root *yaml.Node, size int, lim Limits) *Error {
	x := &expansion{limit: lim.MaxBytes, total: int64(size),
		memo: make(map[*yaml.Node]int64), busy: make(map[*yaml.Node]bool)}
	x.walk(root)
	if x.over == nil {
		return nil
	}
	return &Error{Line: x.over.Line, Column: x.over.Column, Err: newDetail(ErrTooLarge,
		"aliases expand the spec to more than the limit of %d bytes (each alias counts as a copy of its anchored value)", lim.MaxBytes)}
}

// walk visits n in document order, adds what each alias stands for to the
// total, and records the first alias at which the total passes the limit.
func (x *expansion) walk(n *yaml.Node) {
	if x.over != nil {
		return
	}
	if n.Kind == yaml.AliasNode {
		if n.Alias == nil {
			return
		}
		x.total = satAdd(x.total, max(x.size(n.Alias)-int64(len(n.Value))-1, 0))
		if x.total > x.limit {
			x.over = n
		}
		return
	}
	for _, c := range n.Content {
		x.walk(c)
	}
}

// size returns the expanded size of n, at most limit+1.
func (x *expansion) size(n *yaml.Node) int64 {
	if n.Kind == yaml.AliasNode {
		if n.Alias == nil {
			return 0
		}
		n = n.Alias
	}
	if k, ok := x.memo[n]; ok {
		return k
	}
	if x.busy[n] { // an anchor inside its own node; the decoder refuses it
		return 0
	}
	x.busy[n] = true
	k := own(n)
	for _, c := range n.Content {
		if k > x.limit {
			break
		}
		k = satAdd(k, x.size(c))
	}
	k = min(k, x.limit+1)
	delete(x.busy, n)
	x.memo[n] = k
	return k
}

// own is the size of n itself, without its entries.
func own(n *yaml.Node) int64 {
	if n.Kind == yaml.ScalarNode {
		return int64(len(n.Value)) + 1
	}
	return 1
}

func satAdd(a, b int64) int64 {
	if s := a + b; s >= a {
		return s
	}
	return 1<<63 - 1
}
