package nn

import (
	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/data"
	"github.com/seine-ml/seine/encode"
)

// Binding predicts from rows of raw values in a fixed column order, bound
// once: the zero-allocation path for a service whose columns do not change.
// Every value is checked against its input's rules; a bad one is an error
// naming the field (*encode.FieldError), never a panic. A Binding is safe
// for concurrent use.
type Binding struct {
	m   *Model
	lay *encode.Layout
}

// Bind binds the column names of the caller's rows. Every input of the
// model must be among names; other names are ignored.
func (m *Model) Bind(names []string) (*Binding, error) {
	if err := m.built(); err != nil {
		return nil, err
	}
	lay, err := m.enc.Layout(names)
	if err != nil {
		return nil, err
	}
	return &Binding{m: m, lay: lay}, nil
}

// probs codes row and runs it through the net; the caller puts the
// scratch back when err is nil.
func (b *Binding) probs(row []encode.Value) (*rowScratch, error) {
	m := b.m
	sc := m.pool.Get().(*rowScratch)
	if err := b.lay.Code(sc.coded, row); err != nil {
		m.pool.Put(sc)
		return nil, err
	}
	m.rowProbs(sc, sc.coded)
	return sc, nil
}

// Probabilities writes the class probabilities of row (one value per bound
// column) into dst, allocated when nil or too short, and returns it. It
// allocates nothing after warm-up when dst is large enough.
func (b *Binding) Probabilities(dst []float64, row []encode.Value) ([]float64, error) {
	sc, err := b.probs(row)
	if err != nil {
		return nil, err
	}
	k := len(b.m.classes)
	if cap(dst) < k {
		dst = make([]float64, k)
	}
	dst = dst[:k]
	copy(dst, sc.probs)
	b.m.pool.Put(sc)
	return dst, nil
}

// Predict returns the index in Classes of the class decided for row, as
// Model.Predict decides.
// It allocates nothing after warm-up.
func (b *Binding) Predict(row []encode.Value) (int, error) {
	sc, err := b.probs(row)
	if err != nil {
		return -1, err
	}
	k := b.m.decide(sc.probs)
	b.m.pool.Put(sc)
	return k, nil
}

// recordProbs codes the record rec and runs it through the net; the caller
// puts the scratch back when err is nil.
func (m *Model) recordProbs(rec map[string]any) (*rowScratch, error) {
	if err := m.built(); err != nil {
		return nil, err
	}
	sc := m.pool.Get().(*rowScratch)
	if _, err := m.enc.CodeRecord(sc.coded, rec); err != nil {
		m.pool.Put(sc)
		return nil, err
	}
	m.rowProbs(sc, sc.coded)
	return sc, nil
}

// ProbabilitiesRecord writes the class probabilities of the record rec (a
// value per input name; see encode.Encoder.CodeRecord for the value types)
// into dst, allocated when nil or too short, and returns it. A missing
// field, a missing value or an unknown level that the input's rule refuses,
// or a value of the wrong type is an *encode.FieldError.
func (m *Model) ProbabilitiesRecord(dst []float64, rec map[string]any) ([]float64, error) {
	sc, err := m.recordProbs(rec)
	if err != nil {
		return nil, err
	}
	k := len(m.classes)
	if cap(dst) < k {
		dst = make([]float64, k)
	}
	dst = dst[:k]
	copy(dst, sc.probs)
	m.pool.Put(sc)
	return dst, nil
}

// PredictRecord returns the index in Classes of the class decided for the
// record rec, as Predict decides (see ProbabilitiesRecord for the record).
func (m *Model) PredictRecord(rec map[string]any) (int, error) {
	sc, err := m.recordProbs(rec)
	if err != nil {
		return -1, err
	}
	k := m.decide(sc.probs)
	m.pool.Put(sc)
	return k, nil
}

// ProbabilitiesSet returns the class probabilities of every row of set, a
// data set read with the model's columns (encode.Encoder.Columns), as a
// rows × NumClasses matrix. Every value is checked by the encoder first; the
// problems are reported with their lines (see encode.Encoder.EncodeSet).
func (m *Model) ProbabilitiesSet(set *data.Set) (*mat.Dense, error) {
	if err := m.built(); err != nil {
		return nil, err
	}
	u, err := m.enc.EncodeSet(set)
	if err != nil {
		return nil, err
	}
	r, _ := u.Dims()
	out := mat.NewDense(r, len(m.classes), nil)
	sc := m.batchPool.Get().(*batchScratch)
	defer m.batchPool.Put(sc)
	for start := 0; start < r; start += batchBlock {
		n := min(batchBlock, r-start)
		block := u.Slice(start, start+n, 0, m.net.Inputs()).(*mat.Dense)
		o := m.net.Forward(sc.ws, m.fwd, block)
		for i := 0; i < n; i++ {
			toClassProbs(out.RawRowView(start+i), o.RawRowView(i))
		}
	}
	return out, nil
}
