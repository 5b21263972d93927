// Package score measures how well predicted class probabilities fit the
// true classes of a data set: accuracy, mean cross-entropy, the confusion
// matrix, per-class precision, recall and F1, their macro average, and for
// multi-label data the exact-set match rate and the Hamming loss.
//
// Inputs are plain matrices: P (rows × K) holds the predicted probability of
// each class for each row, Y (rows × K) the one-hot (single-label) or
// multi-hot (multi-label) truth. For a row i with true class yᵢ:
//
//	accuracy       = (1/m) Σᵢ [argmaxₖ Pᵢₖ = yᵢ]
//	cross-entropy  = −(1/m) Σᵢ ln Pᵢ,yᵢ                       (single-label)
//	               = −(1/m) Σᵢ Σₖ [Yᵢₖ ln Pᵢₖ + (1−Yᵢₖ) ln(1−Pᵢₖ)]  (multi-label)
//	precision_k    = TP_k / (TP_k + FP_k),  recall_k = TP_k / (TP_k + FN_k)
//	F1_k           = 2·precision_k·recall_k / (precision_k + recall_k)
//	macro F1       = (1/K) Σₖ F1_k
//	Hamming loss   = (1/(m·K)) Σᵢ Σₖ [decisionᵢₖ ≠ Yᵢₖ]
//
// Probabilities are clamped to [1e-300, 1] inside the logarithm so that a
// confident wrong answer gives a large finite cross-entropy, not +Inf. A
// precision or recall with a zero denominator is reported as 0 and its F1
// as 0 (common practice; the class then also counts as 0 in the macro
// average). The definitions are those of van Rijsbergen (1979) for F1 and
// of the usual confusion-matrix accounting (rows = true class, columns =
// predicted class).
//
// # Ranking (one-vs-rest)
//
// ROCCurve, PRCurve, ROCArea and AveragePrecision take one score per row
// and whether the row is positive; Rank applies them to each column of P
// with Yᵢₖ > 0.5 as positive. Rows are sorted by descending score and
// equal scores are grouped, so each distinct score s₁ > s₂ > … is one
// threshold and TPₙ, FPₙ count the positive and negative rows with score
// ≥ sₙ (P, N: all positive and negative rows):
//
//	FPRₙ = FPₙ/N,  TPRₙ = Rₙ = TPₙ/P,  Pₙ = TPₙ/(TPₙ+FPₙ)
//	ROC AUC = Σₙ (FPRₙ − FPRₙ₋₁)(TPRₙ + TPRₙ₋₁)/2          (FPR₀ = TPR₀ = 0)
//	        = U/(P·N), U = #{(i⁺, j⁻): sᵢ > sⱼ} + ½·#{sᵢ = sⱼ}  (Mann & Whitney 1947)
//	AP      = Σₙ (Rₙ − Rₙ₋₁)·Pₙ                               (R₀ = 0; no interpolation)
//
// The macro means average over the classes with both positive and
// negative rows; a class without either has NaN figures and is left out.
//
// # Calibration
//
// ReliabilityDiagram bins items by confidence c into 10 bins
// (b/10, (b+1)/10] (0 in the first) and reports per bin the count n_b,
// the accuracy acc_b and the mean confidence conf_b, and
//
//	ECE = Σ_b (n_b/N)·|acc_b − conf_b|                       (Guo et al. 2017)
//
// For single-label data an item is a row, c = maxₖ Pᵢₖ and it is right
// when the arg-max is the true class; for multi-label data an item is a
// (row, class) pair, c = Pᵢₖ and it is right when Yᵢₖ > 0.5.
//
// # Operating thresholds
//
// ChooseThreshold and ChooseThresholds pick, among the distinct
// probabilities t of a sigmoid unit (a row is decided positive when
// p ≥ t), the threshold that maximises F1 = 2TP/(2TP+FP+FN) (MaxF1),
// precision subject to recall ≥ r (TargetRecall), or recall subject to
// precision ≥ p (TargetPrecision); ties go to the highest threshold, and
// an unreachable target is ErrUnreachable.
//
// # Temperature
//
// FitTemperature finds the T > 0 minimising the mean cross-entropy of
// softmax(z/T) over each row (or of sigmoid(z/T) per unit), computed
// from the logits z by log-sum-exp and softplus (Guo et al. 2017), by a
// safeguarded Newton iteration on β = 1/T, in which the cost is convex.
// ApplyTemperature writes z/T; Probabilities applies the softmax or
// sigmoid. T = 1 leaves both bit-identical.
package score
