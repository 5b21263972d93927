// Package gemm multiplies float64 matrices for package nn: C = α·op(A)·op(B)
// + β·C, row-major, op(X) = X or Xᵀ, on the calling goroutine, with no
// allocation (the caller passes scratch of BufLen elements) and no cgo.
//
// # Structure
//
// The classic layered blocking of Goto & van de Geijn (2008), "Anatomy of
// high-performance matrix multiplication", ACM TOMS 34(3):
//
//	for jc in steps of nc over the columns of C:
//	  for pc in blocks of ≤ kc over the inner dimension k:
//	    pack op(B)[pc:pc+kb, jc:jc+nc] into micro-panels of nr columns
//	    for ic in steps of mc over the rows of C:
//	      pack α·op(A)[ic:ic+mc, pc:pc+kb] into micro-panels of mr rows
//	      for each nr-column micro-panel of B, each mr-row micro-panel of A:
//	        micro-kernel: the mr×nr tile of C += (A panel)·(B panel)
//
// The packed panels are contiguous and zero-padded to whole micro-tiles,
// so the micro-kernel streams them with unit stride and never branches on
// an edge; a tile that sticks out of C is computed into scratch and its
// valid part added. Transposes are handled by packing alone: the kernel
// sees the same layout for every combination of tA and tB.
//
// # Block sizes and why
//
//   - mr×nr = 4×12: the tile of C lives in 12 of the 16 YMM registers (4
//     rows × 3 vectors of 4 float64), one more holds a broadcast value of
//     A and three a row of the B panel. Per step of k the kernel does 12
//     FMAs for 3 vector loads and 4 broadcasts, and 12 independent
//     accumulators cover the FMA latency (4 cycles) on two FMA ports.
//     The alternative 6×8 does the same 12 FMAs for 2 loads and 6
//     broadcasts; 4×12 wastes less on nn's 256-row chunks (256 = 64·4)
//     and its 12 columns fit the 10-class outputs almost exactly.
//   - kc = 256: a B micro-panel is kc·nr·8 = 24 KiB and an A micro-panel
//     8 KiB, together within a 32–48 KiB L1 data cache, so the B panel
//     stays in L1 while the kernel walks the A panels. k is split into
//     ⌈k/kc⌉ nearly equal blocks (k = 400 gives 200 + 200, not 256 + 144)
//     so that no block is short.
//   - mc = 96: the packed A block is mc·kb·8 ≤ 192 KiB, well inside L2
//     (1–2 MiB per core on current x86), beside the packed B block.
//   - nc = 480: the packed B block is at most kc·nc·8 = 960 KiB, which with
//     the A block still fits a 2 MiB L2; nn's widest product (400 columns)
//     packs op(B) once per kc block.
//
// On the 256-row chunk products of the benchmarks' 400→256→10 net the AVX2
// kernel reaches about 85% of its own rate on panels in L1 (see
// BenchmarkKernel and BenchmarkMul, and benchmarks/README.md).
//
// # Kernels and dispatch
//
// On amd64, when golang.org/x/sys/cpu reports AVX2 and FMA (which includes
// the operating system's support for the YMM state), the micro-kernel and
// the 4×4 transposes used in packing are Go assembly (kernel_amd64.s).
// Otherwise, on other architectures, and under the purego build tag, a
// portable Go kernel with the same blocking runs. Another architecture's
// kernel is one more file defining haveAsm, kernelAsm and transposeAsm.
//
// Products with fewer than mr rows (a single row predicted) are not
// packed: packing op(B) would cost as much as the product. They are
// computed directly with the same blocks, order and roundings as the
// packed path, so a row of C has the same bits whether it is computed
// alone or among others.
//
// # Order of sums and rounding
//
// Each element of C is computed as: per block of kb consecutive terms, a
// sum from 0 in increasing p, then added to C in increasing order of the
// blocks. The blocks depend only on the shapes, so results do not depend
// on the goroutine, the core or GOMAXPROCS. The assembly kernel rounds
// a·b + s once (FMA), the portable kernel twice (it converts a·b to
// float64 explicitly so that no compiler fuses it), so the last bits
// differ between a machine with AVX2+FMA, one without, and the purego
// build, as they differ from OpenBLAS; TestKernelsAgree bounds the
// difference by 1e-12 relative.
package gemm
