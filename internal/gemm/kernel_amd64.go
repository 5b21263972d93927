//go:build amd64 && !purego

package gemm

import "golang.org/x/sys/cpu"

// haveAsm: the AVX2 and FMA kernel runs on this CPU. cpu.X86.HasAVX2 and
// HasFMA also check that the operating system saves the YMM registers.
var haveAsm = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// kernelFMA is kernelFunc for the 4×12 tile with AVX2 and FMA, in
// kernel_amd64.s. The pointers are the first elements of a (kc·4 values),
// b (kc·12 values) and c (4 rows of 12 values, ldc apart).
//
//go:noescape
func kernelFMA(kc int, a, b, c *float64, ldc int, add bool)

func kernelAsm(kc int, a, b, c []float64, ldc int, add bool) {
	_ = a[kc*mr-1]
	_ = b[kc*nr-1]
	_ = c[(mr-1)*ldc+nr-1]
	kernelFMA(kc, &a[0], &b[0], &c[0], ldc, add)
}

// transpose4 is in kernel_amd64.s; it needs AVX only, so it runs wherever
// the kernel does.
//
//go:noescape
func transpose4(dst, src *float64, lds, kk, ldd int)

// transposeAsm sets dst[p·ldd + i] = src[i·lds + p] for i < 4, p < kk,
// the multiple-of-4 part in assembly and the rest in Go.
func transposeAsm(dst, src []float64, lds, kk, ldd int) {
	k4 := kk &^ 3
	if k4 > 0 {
		_ = src[3*lds+k4-1]
		_ = dst[(k4-1)*ldd+3]
		transpose4(&dst[0], &src[0], lds, k4, ldd)
	}
	if k4 < kk {
		transposeGo(dst[k4*ldd:], src[k4:], lds, kk-k4, ldd)
	}
}
