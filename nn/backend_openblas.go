//go:build openblas

package nn

// Backend names the matrix-multiply backend of this build, for version
// reports: "OpenBLAS (cgo)" under the openblas build tag.
func Backend() string { return "OpenBLAS (cgo)" }
