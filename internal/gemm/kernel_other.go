//go:build !amd64 || purego

package gemm

// haveAsm is false: this architecture or build (the purego tag) has only
// the portable kernel.
const haveAsm = false

var kernelAsm = kernelGo

var transposeAsm = transposeGo
