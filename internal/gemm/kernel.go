package gemm

// kernelFunc computes the mr×nr micro-tile T = Σ_{p<kc} a_p·b_pᵀ, where
// a_p = a[p·mr : (p+1)·mr] is column p of a packed micro-panel of op(A)
// and b_p = b[p·nr : (p+1)·nr] row p of a packed micro-panel of op(B),
// each element summed in order of p starting from 0. It then adds T to the
// mr×nr block of C at c (row stride ldc) when add is true, or stores it
// there when add is false. A kernel for another architecture is one file
// that defines kernelAsm and haveAsm for it (see kernel_amd64.go).
type kernelFunc func(kc int, a, b, c []float64, ldc int, add bool)

// transposeFunc sets dst[p·ldd + i] = src[i·lds + p] for i < 4, p < kk;
// the packing routines use it to turn four rows into columns.
type transposeFunc func(dst, src []float64, lds, kk, ldd int)

// kernelGo is the portable kernel: the 4×12 tile in six 2×4 blocks, so
// that the eight sums, two values of a and four of b fit in registers.
// The conversions float64(a·b) forbid the compiler to fuse the multiply
// and the add (it may on arm64 and others; the Go specification,
// "Arithmetic operators"), so the portable kernel rounds alike everywhere
// and agrees with the unpacked path for few rows (small).
func kernelGo(kc int, a, b, c []float64, ldc int, add bool) {
	a = a[:kc*mr]
	b = b[:kc*nr]
	_ = c[(mr-1)*ldc+nr-1]
	for i := 0; i < mr; i += 2 {
		for j := 0; j < nr; j += 4 {
			var s00, s01, s02, s03, s10, s11, s12, s13 float64
			ap := a[i:]
			bp := b[j:]
			for len(ap) >= 2 && len(bp) >= 4 {
				a0, a1 := ap[0], ap[1]
				b0, b1, b2, b3 := bp[0], bp[1], bp[2], bp[3]
				s00 += float64(a0 * b0)
				s01 += float64(a0 * b1)
				s02 += float64(a0 * b2)
				s03 += float64(a0 * b3)
				s10 += float64(a1 * b0)
				s11 += float64(a1 * b1)
				s12 += float64(a1 * b2)
				s13 += float64(a1 * b3)
				if len(ap) < mr || len(bp) < nr {
					break
				}
				ap = ap[mr:]
				bp = bp[nr:]
			}
			r0 := c[i*ldc+j : i*ldc+j+4 : i*ldc+j+4]
			r1 := c[(i+1)*ldc+j : (i+1)*ldc+j+4 : (i+1)*ldc+j+4]
			if add {
				r0[0] += s00
				r0[1] += s01
				r0[2] += s02
				r0[3] += s03
				r1[0] += s10
				r1[1] += s11
				r1[2] += s12
				r1[3] += s13
			} else {
				r0[0], r0[1], r0[2], r0[3] = s00, s01, s02, s03
				r1[0], r1[1], r1[2], r1[3] = s10, s11, s12, s13
			}
		}
	}
}

// transposeGo sets dst[p·ldd + i] = src[i·lds + p] for i < 4, p < kk:
// four rows of src become kk groups of four values, ldd apart.
func transposeGo(dst, src []float64, lds, kk, ldd int) {
	if kk == 0 {
		return
	}
	r0 := src[:kk:kk]
	r1 := src[lds : lds+kk : lds+kk]
	r2 := src[2*lds : 2*lds+kk : 2*lds+kk]
	r3 := src[3*lds : 3*lds+kk : 3*lds+kk]
	_ = dst[(kk-1)*ldd+3]
	for p, v := range r0 {
		d := dst[p*ldd : p*ldd+4 : p*ldd+4]
		d[0], d[1], d[2], d[3] = v, r1[p], r2[p], r3[p]
	}
}
