//go:build !openblas

package nn

// Backend names the matrix-multiply backend of this build, for version
// reports: "pure Go" by default, "OpenBLAS" under the openblas build tag.
func Backend() string { return "pure Go" }
