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
package score
