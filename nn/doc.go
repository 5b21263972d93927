// Package nn compiles a spec into a net, lays out its params, and evaluates
// the cost, its gradient and the output probabilities.
//
// # Params layout
//
// A net with layer widths n_0 (inputs), n_1 … n_{L−1} (hidden), n_L
// (output units) has L weight layers. params is one flat []float64 holding,
// for l = 0 … L−1 in order (input side first), the block of layer l: its
// weight matrix W_l (n_{l+1} × n_l, row-major: row j holds the weights into
// unit j) immediately followed by its bias vector b_l (n_{l+1} values). So
// len(params) = Σ_l (n_l + 1)·n_{l+1}; Net.Block gives the offsets and
// Net.Weights and Net.Bias give views.
//
// # Forward pass
//
// Rows of the data are examples. For a row x:
//
//	a_0 = x,   z_{l+1} = W_l a_l + b_l,   a_{l+1} = g_{l+1}(z_{l+1}),
//
// with the hidden activation g of each hidden layer and, on the output
// layer, either σ(z_k) = 1/(1+e^(−z_k)) per unit or
// softmax_k(z) = e^(z_k)/Σ_j e^(z_j). The output h = a_L holds the
// probabilities. On a block of r rows A_l (r × n_l) this is
// Z_{l+1} = A_l·W_lᵀ + 1·b_lᵀ, computed with gonum's blas64.Gemm.
//
// # Cost
//
// Over m rows with targets y (values in [0, 1]):
//
//	sigmoid output (K units; K = 1 for two classes, target y_1):
//	  J₀ = −(1/m) Σ_i Σ_k [y_k ln h_k + (1−y_k) ln(1−h_k)]
//	     =  (1/m) Σ_i Σ_k [softplus(z_k) − y_k z_k],
//	softmax output:
//	  J₀ = −(1/m) Σ_i Σ_k y_k ln h_k = (1/m) Σ_i Σ_k y_k (lse(z) − z_k),
//
// where softplus(z) = ln(1+e^z) = max(z,0) + ln(1+e^(−|z|)) and
// lse(z) = max_j z_j + ln Σ_j e^(z_j − max_j z_j). Both are computed from the
// output pre-activations z, so a saturated unit (|z| in the thousands) gives
// a finite cost and gradient, never Inf or NaN. J₀ is the cross-entropy that
// Objective.Loss returns. The cost adds the penalty
//
//	J = J₀ + λ/(2m) Σ w² + λ₁/m Σ |w|,
//
// summed over every weight and, only when Penalty.Bias is set, every bias
// (λ = Penalty.L2, λ₁ = Penalty.L1). The L1 term uses the subgradient
// sign(w), 0 at w = 0.
//
// With class weights w_k (ObjectiveOptions.ClassWeights) each row's term is
// weighted by its classes, and the penalty is not:
//
//	softmax:  J₀ = (1/m) Σ_i Σ_k w_k y_k (lse(z) − z_k)
//	sigmoid:  J₀ = (1/m) Σ_i Σ_k [a_k softplus(−z_k) + b_k softplus(z_k)],
//	          a_k = pos_k y_k, b_k = neg_k (1 − y_k),
//
// where a binary sigmoid unit takes pos = w_1 and neg = w_0 (the weights of
// its two classes) and multi-label units take pos_k = w_k and neg_k = 1 (a
// weight on the positive side of each class). Weights of 1 give the cost
// above bit for bit. Balanced weights w_k = m/(K·m_k), with m_k the rows
// of class k, make every class weigh as much in total (common practice).
//
// A mini-batch B_k of b_k rows has the cost
//
//	J_k = (1/b_k) Σ_{i∈B_k} loss_i + (the same penalty, with the full m),
//
// so that Σ_k (b_k/m)·J_k = J: the batch costs weighted by their share
// average to the full cost.
//
// # Gradient
//
// Backpropagation (Rumelhart, Hinton & Williams 1986), fused with the cost
// in one pass. On a block of rows the output delta is
//
//	Δ_L = H − Y                      (sigmoid; and softmax with Σ_k y_k = 1)
//	Δ_L = (Σ_k y_k)·H − Y, per row   (softmax in general)
//	Δ_L = (A + B) ⊙ H − A            (weighted sigmoid)
//	Δ_L = (Σ_k w_k y_k)·H − W ⊙ Y    (weighted softmax)
//
// and, for l = L−1 … 0,
//
//	∂J₀/∂W_l = (1/m) Δ_{l+1}ᵀ A_l,   ∂J₀/∂b_l = (1/m) Δ_{l+1}ᵀ 1,
//	Δ_l = (Δ_{l+1} W_l) ⊙ g′(Z_l),
//
// with g′ = a(1−a) for sigmoid, 1−a² for tanh, [z > 0] for relu,
// 1 or 0.01 for leaky-relu, σ(z) for softplus and 1 for identity. The
// penalty adds (λ/m)·w + (λ₁/m)·sign(w).
//
// # Initialisation
//
// Net.Init draws each weight of W_l from U(−r, r): r = √(6/(n_l+n_{l+1}))
// for glorot-uniform (Glorot & Bengio 2010), r = √(6/n_l) for he-uniform
// (He et al. 2015), r = Init.Scale for uniform. Biases start at 0.
//
// # Evaluation and determinism
//
// An Objective splits its rows into chunks of ObjectiveOptions.Chunk
// consecutive rows (default 256), independent of the machine. A bounded pool
// of goroutines evaluates the chunks, each with its own workspace; the
// chunks' partial costs and gradients are added in chunk order, so the
// result is bit-identical for any Workers or GOMAXPROCS. After the first
// call, Eval, EvalBatch and Loss allocate nothing.
package nn
