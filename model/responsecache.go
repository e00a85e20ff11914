package model

// What a road case's per-frequency solve needs that does not depend on
// the dampers, kept per case so that neither the fixed-point sweeps nor
// the setups rebuild it.
//
// At grid frequency ω a channel solves
//
//	(K - ω²M + iωC) y = (Bk + iωBc) w,
//
// with K, M, Bk, Bc and the road's inputs w fixed for the case and only
// C holding the dampers. The cache keeps K - ω²M (n² reals) and the
// right-hand side (n·ns complex numbers: n = 4 and 3 with one source
// each for a symmetric car, 7 with two sources for the general path) at
// every grid point: 312 bytes a point for a symmetric car and 616 for
// the general path, 75 KB and 148 KB a case on the default 241-point
// grid. An Evaluator caches cases until cacheBudget is spent and
// computes the rest as before; the cache is written once in
// NewEvaluator and only read after, so goroutines share it.

// cacheBudget bounds an Evaluator's cache (bytes): 32 MiB holds 107
// symmetric cases on a 1001-point grid; cases past it are not cached.
const cacheBudget = 32 << 20

// channelCache is one channel's cached parts at every grid point.
type channelCache struct {
	// kd is K - ω²M, n×n row-major per grid point.
	kd []float64
	// rhs is (Bk + iωBc) w, n×ns row-major per grid point.
	rhs []complex128
}

// sourceCount is the number of uncorrelated sources of a channel kind
// (what caseGrid.sourceInputs writes).
func sourceCount(kind int) int {
	if kind == sourceGeneral {
		return 2
	}
	return 1
}

// cacheBytes is the size of the cache of channels chs on a grid of
// points frequencies.
func cacheBytes(chs []channel, points int) int {
	b := 0
	for i := range chs {
		n := chs[i].n
		b += points * (8*n*n + 16*n*sourceCount(chs[i].kind))
	}
	return b
}

// springMass writes K - ω²M of the channel, n×n row-major, into dst.
func (ch *channel) springMass(om float64, dst []float64) {
	n := ch.n
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			dst[r*n+c] = ch.k[r][c]
		}
		dst[r*n+r] = ch.k[r][r] - om*om*ch.m[r]
	}
}

// forcing writes the right-hand sides (Bk + iωBc) w_j of the channel's
// ns sources into the columns of rhs.
func (ch *channel) forcing(om float64, w *[maxRHS][nIn]complex128, ns int, rhs *[nDOF][maxRHS]complex128) {
	for r := 0; r < ch.n; r++ {
		for j := 0; j < ns; j++ {
			var s complex128
			for q := 0; q < nIn; q++ {
				if w[j][q] != 0 {
					s += complex(ch.bk[r][q], om*ch.bc[r][q]) * w[j][q]
				}
			}
			rhs[r][j] = s
		}
	}
}

// newResponseCache tabulates the cache of channels chs (any damping: it
// reads only K, M, Bk and Bc) for case grid cg at frequencies omega.
func newResponseCache(chs []channel, cg *caseGrid, omega []float64) []channelCache {
	cache := make([]channelCache, len(chs))
	var w [maxRHS][nIn]complex128
	var rhs [nDOF][maxRHS]complex128
	for ci := range chs {
		ch := &chs[ci]
		n, ns := ch.n, sourceCount(ch.kind)
		cc := channelCache{kd: make([]float64, len(omega)*n*n), rhs: make([]complex128, len(omega)*n*ns)}
		for k, om := range omega {
			ch.springMass(om, cc.kd[k*n*n:(k+1)*n*n])
			cg.sourceInputs(ch.kind, k, &w)
			ch.forcing(om, &w, ns, &rhs)
			f := cc.rhs[k*n*ns : (k+1)*n*ns]
			for r := 0; r < n; r++ {
				copy(f[r*ns:(r+1)*ns], rhs[r][:ns])
			}
		}
		cache[ci] = cc
	}
	return cache
}
