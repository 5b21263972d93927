package nn

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sync"
	"time"

	"gonum.org/v1/gonum/mat"

	"github.com/seine-ml/seine/encode"
	"github.com/seine-ml/seine/optim"
	"github.com/seine-ml/seine/spec"
)

// Model is a trained net ready to answer queries: the spec, the params, the
// encoder fitted on the training rows (levels, fill values, scaling), the
// class names and a summary of how it was trained.
//
// A Model is safe for concurrent use by many goroutines once built: its
// prediction methods only read the params and take their scratch space from
// an internal pool, so a single-row prediction allocates nothing after
// warm-up. Its parts are read through methods and set only through
// functions that check them (NewModel, SetDecision, SetLabel, SetSummary,
// Load), so a Model is usable or it is an error: a zero Model's methods
// report that it was not built.
//
// The float64 prediction methods take coded rows: one value per raw input,
// in the order of Features() — a number for a number input, the index in its
// levels for a category input, NaN for a missing value (see
// encode.Encoder). For a model whose inputs are all numbers that is simply
// the raw feature row. The model expands and scales it itself before the
// forward pass. Rows from outside the program go through Bind,
// PredictRecord or ProbabilitiesRecord, which check every value and return
// errors instead.
type Model struct {
	spec     *spec.Network // the resolved spec: category inputs hold their levels
	params   []float64
	classes  []string
	features []string // the raw inputs' names, from the encoder
	label    string   // the name of the label column in the training file; "" if unknown
	summary  Summary
	// decision holds the temperature and operating thresholds chosen on
	// holdout rows; the zero value changes nothing.
	decision Decision

	enc       *encode.Encoder
	fwd       []float64 // the params predictions use: Params, or a tempered copy
	net       *Net
	pool      sync.Pool // *rowScratch
	batchPool sync.Pool // *batchScratch
}

// Summary records how a model was trained. Figures that do not apply are
// zero (counts) or NaN (costs and accuracies are written as null).
type Summary struct {
	Method          string        `json:"method"`
	Iterations      int           `json:"iterations"`
	Evaluations     float64       `json:"evaluations"`
	Elapsed         time.Duration `json:"-"`                // wall time of the run; the model file holds it in seconds
	Status          optim.Status  `json:"status"`           // why the run stopped; optim.Running for a checkpoint
	Cost            float64       `json:"cost"`             // final training cost, with penalty
	TrainRows       int           `json:"train_rows"`       //
	TrainAccuracy   float64       `json:"train_accuracy"`   // share of training rows classified right
	HoldoutRows     int           `json:"holdout_rows"`     // 0 when no holdout was used
	HoldoutCost     float64       `json:"holdout_cost"`     // mean cross-entropy on the holdout
	HoldoutAccuracy float64       `json:"holdout_accuracy"` //
	Seed            uint64        `json:"seed"`             // initialisation seed
	Library         string        `json:"library"`          // seine version that trained it
	// ClassWeights are the per-class factors the cross-entropy was
	// weighted by (spec train.class_weights), in class order; nil when
	// unweighted.
	ClassWeights []float64 `json:"class_weights,omitempty"`
	// Operating holds, for each class with an operating threshold
	// (Decision), the holdout figures at that threshold.
	Operating []OperatingPoint `json:"operating,omitempty"`
	// HoldoutECE and HoldoutECEBefore are the holdout expected calibration
	// error with and without the model's temperature; NaN when not
	// measured.
	HoldoutECE       float64 `json:"holdout_ece"`
	HoldoutECEBefore float64 `json:"holdout_ece_before"`
}

// OperatingPoint is a class's operating threshold with the holdout
// figures there.
type OperatingPoint struct {
	Class     string  `json:"class"`
	Threshold float64 `json:"threshold"`
	Precision float64 `json:"precision"`
	Recall    float64 `json:"recall"`
	F1        float64 `json:"f1"`
}

// Version is the library version written into model summaries.
const Version = "0.2.0"

// rowScratch is the per-call space of a single-row prediction.
type rowScratch struct {
	ws    *Workspace
	coded []float64 // coded row (Bind)
	in    []float64 // expanded input units
	out   []float64 // output units
	probs []float64 // class probabilities
}

// ErrModel is wrapped by errors about a model's contents.
var ErrModel = errors.New("nn: invalid model")

// NewModel checks the parts of a model against each other and returns it
// ready for prediction. s is the resolved spec (enc.Resolve of the spec
// trained); params is used as is (not copied). enc nil means inputs that
// are all plain numbers, unscaled, named by s.Features (or "x1" … when s
// gives a count). classes may be nil, meaning the spec's.
func NewModel(s *spec.Network, params []float64, enc *encode.Encoder, classes []string) (*Model, error) {
	m := &Model{spec: s, params: params, classes: classes, enc: enc}
	if err := m.init(); err != nil {
		return nil, err
	}
	return m, nil
}

// init compiles the net and checks every part; it is the one place where a
// model, built in Go or read from a file, becomes usable.
func (m *Model) init() error {
	if m.spec == nil {
		return fmt.Errorf("%w: no spec", ErrModel)
	}
	net, err := Compile(m.spec)
	if err != nil {
		return fmt.Errorf("%w: %w", ErrModel, err)
	}
	if len(m.params) != net.NumParams() {
		return fmt.Errorf("%w: %d params, the spec needs %d", ErrModel, len(m.params), net.NumParams())
	}
	for i, v := range m.params {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: param %d is %v", ErrModel, i, v)
		}
	}
	if m.enc == nil {
		if m.spec.Features != nil && len(m.spec.Features) != m.spec.Inputs {
			return fmt.Errorf("%w: %d feature names for %d inputs", ErrModel, len(m.spec.Features), m.spec.Inputs)
		}
		if m.enc, err = encode.Numbers(m.spec.Features, make([]float64, m.spec.Inputs), ones(m.spec.Inputs)); err != nil {
			return fmt.Errorf("%w: %w", ErrModel, err)
		}
	}
	if err := m.enc.CheckSpec(m.spec); err != nil {
		return fmt.Errorf("%w: the encoder disagrees with the spec: %w", ErrModel, err)
	}
	if m.enc.Width() != net.Inputs() {
		return fmt.Errorf("%w: the encoder makes %d input units, the net takes %d", ErrModel, m.enc.Width(), net.Inputs())
	}
	m.features = m.enc.Names()
	if m.classes == nil {
		m.classes = m.spec.Output.Classes
	}
	if len(m.classes) != len(m.spec.Output.Classes) {
		return fmt.Errorf("%w: %d class names for %d classes", ErrModel, len(m.classes), len(m.spec.Output.Classes))
	}
	for k, c := range m.classes {
		if c != m.spec.Output.Classes[k] {
			return fmt.Errorf("%w: classes: class %d is %q, the spec's output.classes say %q", ErrModel, k+1, c, m.spec.Output.Classes[k])
		}
	}
	if m.label != "" && slices.Contains(m.features, m.label) {
		return fmt.Errorf("%w: label: the label column %q is also an input", ErrModel, m.label)
	}
	if err := m.decision.check(m.spec); err != nil {
		return err
	}
	m.net = net
	m.fwd = m.tempered()
	if err := m.probe(); err != nil {
		return err
	}
	n := m.enc.NumInputs()
	m.batchPool.New = func() any {
		return &batchScratch{ws: net.NewWorkspace(batchBlock), in: mat.NewDense(batchBlock, net.Inputs(), nil), coded: make([]float64, n), probs: make([]float64, len(m.classes))}
	}
	m.pool.New = func() any {
		return &rowScratch{ws: net.NewWorkspace(1), coded: make([]float64, n), in: make([]float64, net.Inputs()), out: make([]float64, net.Outputs()), probs: make([]float64, len(m.classes))}
	}
	return nil
}

// probeUnits are the input-unit values a model must answer finitely at:
// the training mean of every standardised input and three standard
// deviations either side (one-hot units take the same values, which
// covers 0 and 1 in between).
var probeUnits = []float64{0, 3, -3}

// probe refuses params that overflow on inputs near the training data:
// with finite params a forward pass can still overflow (identity layers
// with weights near ±1e308 give NaN probabilities on ordinary rows), and
// a model that cannot answer for typical rows must not load.
func (m *Model) probe() error {
	ws := m.net.NewWorkspace(1)
	in := make([]float64, m.net.Inputs())
	out := make([]float64, m.net.Outputs())
	for _, v := range probeUnits {
		for i := range in {
			in[i] = v
		}
		m.net.ForwardRow(out, ws, m.fwd, in)
		for _, p := range out {
			if !(p >= 0 && p <= 1) {
				return fmt.Errorf("%w: params: the output is %v for inputs at %+g standard deviations from the training mean: the params overflow on ordinary rows", ErrModel, p, v)
			}
		}
	}
	return nil
}

func ones(n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 1
	}
	return v
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Net returns the compiled net of m.
func (m *Model) Net() *Net { return m.net }

// built reports a Model that was not made by NewModel, Load, LoadFS,
// ReadModel or train.Train (a zero or hand-filled Model), which cannot
// predict.
func (m *Model) built() error {
	if m == nil || m.net == nil || m.enc == nil {
		return fmt.Errorf("%w: the model was not built: make models with nn.NewModel, nn.Load or train.Train", ErrModel)
	}
	return nil
}

// Spec returns a copy of the model's resolved spec: the spec trained, with
// the levels that its category inputs learned written in, so that
// nn.Compile(m.Spec()) gives the model's net.
// It is nil for a model that was not built.
func (m *Model) Spec() *spec.Network {
	if m.spec == nil {
		return nil
	}
	return m.spec.Clone()
}

// Params returns a copy of the model's params, in the layout of Net.
func (m *Model) Params() []float64 { return slices.Clone(m.params) }

// Classes returns the class names in the order of the output units and
// of every probability row; the caller must not modify it.
func (m *Model) Classes() []string { return m.classes }

// Features returns the raw inputs' names, in the order of coded rows; the
// caller must not modify it.
func (m *Model) Features() []string { return m.features }

// Label returns the name of the label column in the training file, or ""
// when it is not known (models of format version 1 and models built in Go).
func (m *Model) Label() string { return m.label }

// Summary returns how the model was trained.
func (m *Model) Summary() Summary { return m.summary }

// Decision returns the temperature and operating thresholds the model
// predicts with.
func (m *Model) Decision() Decision { return m.decision }

// SetLabel records the name of the label column of the training file,
// which predict and evaluate look for; it refuses a name that is one of
// the model's inputs. Like SetDecision and SetSummary, call it before the
// model is shared between goroutines.
func (m *Model) SetLabel(name string) error {
	if err := m.built(); err != nil {
		return err
	}
	if slices.Contains(m.features, name) {
		return fmt.Errorf("%w: label: the label column %q is also an input", ErrModel, name)
	}
	m.label = name
	return nil
}

// SetSummary records how the model was trained. The summary describes the
// model and changes no prediction.
func (m *Model) SetSummary(s Summary) { m.summary = s }

// Encoder returns the model's encoder.
func (m *Model) Encoder() *encode.Encoder { return m.enc }

// Inputs returns the number of raw inputs: the length of a coded row.
func (m *Model) Inputs() int { return m.enc.NumInputs() }

// NumClasses returns the number of classes.
func (m *Model) NumClasses() int { return len(m.classes) }

// Multilabel reports whether a row may carry several classes.
func (m *Model) Multilabel() bool { return m.spec.Output.Multilabel }

// classProbs runs one coded row through the net and returns pooled scratch
// whose probs hold the class probabilities (see toClassProbs); the caller
// puts it back.
func (m *Model) classProbs(x []float64) *rowScratch {
	if err := m.built(); err != nil {
		panic(err.Error())
	}
	if len(x) != m.enc.NumInputs() {
		panic(fmt.Sprintf("nn: row has %d values, the model takes %d inputs", len(x), m.enc.NumInputs()))
	}
	sc := m.pool.Get().(*rowScratch)
	m.rowProbs(sc, x)
	return sc
}

// rowProbs expands the coded row x into sc, runs it through the net and
// leaves its class probabilities in sc.probs.
func (m *Model) rowProbs(sc *rowScratch, x []float64) {
	m.enc.Expand(sc.in, x)
	m.net.ForwardRow(sc.out, sc.ws, m.fwd, sc.in)
	toClassProbs(sc.probs, sc.out)
}

// toClassProbs writes into p the class probabilities of the net outputs o:
// o itself, or for the binary sigmoid net (one unit, the probability q of
// Classes[1], and two classes) [1−q, q].
func toClassProbs(p, o []float64) {
	if len(o) == 1 && len(p) == 2 {
		p[0], p[1] = 1-o[0], o[0]
		return
	}
	copy(p, o)
}

// Probabilities writes the probability of each class for the coded row
// x into dst and returns it; dst is allocated when it is nil or too short.
// For softmax outputs the entries sum to 1; for sigmoid outputs each entry is
// the independent probability of its class. It panics if len(x) is not
// Inputs(): check rows from outside the program first.
func (m *Model) Probabilities(dst, x []float64) []float64 {
	k := len(m.classes)
	if cap(dst) < k {
		dst = make([]float64, k)
	}
	dst = dst[:k]
	sc := m.classProbs(x)
	copy(dst, sc.probs)
	m.pool.Put(sc)
	return dst
}

// Predict returns the index in Classes of the class decided for the coded
// row x: the most probable class (the first one on a tie), or for a binary
// sigmoid model with an operating threshold t (Decision), class 1 when its
// probability is at least t. For a multi-label model it is the most
// probable class; Labels gives the set. It allocates nothing after warm-up.
func (m *Model) Predict(x []float64) int {
	sc := m.classProbs(x)
	k := m.decide(sc.probs)
	m.pool.Put(sc)
	return k
}

func argmax(p []float64) int {
	best := 0
	for i, v := range p {
		if v > p[best] {
			best = i
		}
	}
	return best
}

// Labels appends to dst the indices of the classes whose probability is at
// least threshold, in class order, and returns it. A threshold ≤ 0 means
// the model's own: its operating thresholds (Decision) for a multi-label
// model that has them, else 0.5. It is meant for multi-label models; for a
// softmax model it returns the classes above the threshold just the same.
func (m *Model) Labels(dst []int, x []float64, threshold float64) []int {
	sc := m.classProbs(x)
	for i, v := range sc.probs {
		t := threshold
		if t <= 0 {
			t = m.threshold(i)
		}
		if v >= t {
			dst = append(dst, i)
		}
	}
	m.pool.Put(sc)
	return dst
}

// ProbabilitiesBatch writes the class probabilities of each coded row of x
// into the rows of dst, which must be r × NumClasses for r = rows of x, or
// empty (then it is sized). Rows go through the net in blocks of pooled
// workspace, so a call allocates almost nothing after warm-up.
func (m *Model) ProbabilitiesBatch(dst *mat.Dense, x mat.Matrix) {
	r, _ := x.Dims()
	k := len(m.classes)
	if dst.IsEmpty() {
		dst.ReuseAs(r, k)
	} else if dr, dc := dst.Dims(); dr != r || dc != k {
		panic("nn: ProbabilitiesBatch: dst has the wrong shape")
	}
	m.eachRow(x, func(i int, p []float64) { copy(dst.RawRowView(i), p) })
}

// PredictBatch writes the class decided (as by Predict) for each coded row of x into dst
// (len = rows of x) and returns it; dst is allocated when it is too short.
func (m *Model) PredictBatch(dst []int, x mat.Matrix) []int {
	r, _ := x.Dims()
	if cap(dst) < r {
		dst = make([]int, r)
	}
	dst = dst[:r]
	m.eachRow(x, func(i int, p []float64) { dst[i] = m.decide(p) })
	return dst
}

// batchBlock is the number of rows a batch prediction sends through the net
// at once.
const batchBlock = 512

// batchScratch is the pooled space of a batch prediction.
type batchScratch struct {
	ws    *Workspace
	in    *mat.Dense // batchBlock × input units: expanded rows
	coded []float64  // one coded row, for rows not held in a raw matrix
	probs []float64  // class probabilities of one row
}

// eachRow runs the coded rows of x through the net in blocks and calls emit
// with each row's index and class probabilities (valid during the call).
func (m *Model) eachRow(x mat.Matrix, emit func(i int, p []float64)) {
	r, c := x.Dims()
	if c != m.enc.NumInputs() {
		panic(fmt.Sprintf("nn: rows have %d values, the model takes %d inputs", c, m.enc.NumInputs()))
	}
	sc := m.batchPool.Get().(*batchScratch)
	defer m.batchPool.Put(sc)
	raw, isRaw := x.(mat.RawMatrixer)
	for start := 0; start < r; start += batchBlock {
		n := min(batchBlock, r-start)
		for i := 0; i < n; i++ {
			row := sc.in.RawRowView(i)
			if isRaw {
				b := raw.RawMatrix()
				m.enc.Expand(row, b.Data[(start+i)*b.Stride:(start+i)*b.Stride+c])
			} else {
				for j := range sc.coded {
					sc.coded[j] = x.At(start+i, j)
				}
				m.enc.Expand(row, sc.coded)
			}
		}
		block := sc.in
		if n < batchBlock {
			block = sc.in.Slice(0, n, 0, m.net.Inputs()).(*mat.Dense)
		}
		out := m.net.Forward(sc.ws, m.fwd, block)
		for i := 0; i < n; i++ {
			toClassProbs(sc.probs, out.RawRowView(i))
			emit(start+i, sc.probs)
		}
	}
}
