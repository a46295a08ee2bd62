package fit

import (
	"math"
	"sync"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// design holds what one [Fit] needs of every point of its track and that
// stays the same through the passes of the outlier rejection: the model's
// basis values, the Cholesky factor of the point's covariance, the whitened
// (not yet column-scaled) design rows and right-hand side, and the inverse of
// the projection's Jacobian. The per-point work (the basis, the whitening,
// the Jacobian of the gnomonic projection) is done once per fit rather than
// once per pass, and the arrays live in a recycled work space, so that no
// matrix is allocated per pass.
//
// A pass does not factorise all its rows at once: the rows are compressed
// night by night into small triangular blocks (see [design.factorNights]),
// and a pass refactorises only the nights whose active points changed since
// the last one — one night per flagged outlier, none for a cross-validation
// fold, which leaves a whole night out.
type design struct {
	q     int          // basis functions per coordinate
	np    int          // columns of the full design: 2q, plus 1 for the u column
	basis []float64    // f_j(τ_i) of point i at basis[i*q : (i+1)*q]
	chol  [][3]float64 // (l11, l21, l22) of point i (see cholesky2)
	// pts are the points the arrays were built for and uFixed the fixed
	// inverse distance of the right-hand side (0 unless ParallaxFixed):
	// with basis and chol they give each point's whitened rows, which
	// rowsOf computes when a night is factorised rather than storing them.
	pts    []Point
	uFixed float64
	jinv   [][2][2]float64 // inverse plane Jacobian of each point (plane → east, north)
	// at maps the points of the track being fitted to the points the arrays
	// above were built for (nil: the same points); see gather.
	at []int
	ws *workspace
}

// workspace is the memory the passes of a fit (and the folds of a
// cross-validation, one after the other) reuse.
type workspace struct {
	a, b, tau, work []float64
	// chi2 holds each point's normalised χ² under the latest solution (see
	// pointChi2).
	chi2 []float64
	// The arrays of the design that holds the work space (see newDesign).
	basis []float64
	chol  [][3]float64
	jinv  [][2][2]float64 // when the design computed its own
	row   []float64       // one point's two rows (rowsOf)
	// nights is the night-by-night compression of the design's rows.
	nights nightBlocks
}

// nightBlocks holds, for each night of the fitted track, the triangular
// block of its active rows (see [design.factorNights]) and the active flags
// it was computed for.
type nightBlocks struct {
	owner *design // the design the blocks belong to; nil: none yet
	cols  int     // columns factorised
	// of is the night group of each point of the fitted track; the points
	// of group g are idx[start[g]:start[g+1]].
	of, idx, start []int
	state          []bool // each point's active flag when its group was factorised
	valid          []bool // the group's block matches state
	// r holds group g's nr[g] rows (cols each) at r[g·cols²:], c their
	// right-hand side at c[g·cols:], ss the group's column sums of squares
	// at ss[g·cols:].
	r, c, ss []float64
	nr       []int
}

// workspaces recycles the work space of finished fits (see release), which
// saves the allocation and the collection of a design-sized buffer per fit.
var workspaces = sync.Pool{New: func() any { return new(workspace) }}

// release returns d's work space for other fits to reuse; d must not be
// solved again (solutions do not refer to the work space).
func (d *design) release() {
	if d.ws != nil {
		d.ws.nights.owner = nil
		workspaces.Put(d.ws)
		d.ws = nil
	}
}

// src returns the index into the design's arrays of point i of the fitted
// track.
func (d *design) src(i int) int {
	if d.at == nil {
		return i
	}
	return d.at[i]
}

// numPoints returns the number of points of the fitted track.
func (d *design) numPoints() int {
	if d.at == nil {
		return len(d.chol)
	}
	return len(d.at)
}

// newDesign builds the design of model m for every point of tr, with the
// inverse-distance column when fitU, and the parallax applied with the fixed
// inverse distance when s.Parallax is ParallaxFixed. jinv are the inverse
// plane Jacobians of tr's points when the caller has them (nil computes
// them); they depend on the plane and the point's ξ, η only, so one set
// serves every model fitted to a track. A pass without the u
// column (see [solve]) uses the first 2q columns of the same rows: with fitU
// the right-hand side carries no fixed parallax, as a fit with the parallax
// off has none.
func newDesign(tr *Track, m Model, s Settings, fitU bool, jinv [][2][2]float64) *design {
	q := m.NumPerCoord()
	np := 2 * q
	if fitU {
		np++
	}
	n := len(tr.Points)
	ws := workspaces.Get().(*workspace)
	ws.nights.owner = nil
	ws.basis = grow(ws.basis, n*q)
	ws.chol = grow(ws.chol, n)
	ws.row = grow(ws.row, 2*np)
	d := &design{
		q:     q,
		np:    np,
		basis: ws.basis,
		chol:  ws.chol,
		pts:   tr.Points,
		jinv:  jinv,
		ws:    ws,
	}
	if len(d.jinv) != n {
		ws.jinv = grow(ws.jinv, n)
		d.jinv = planeJacobiansTo(ws.jinv, tr)
	}
	if s.Parallax == ParallaxFixed {
		d.uFixed = s.InvDistance
	}
	for i, p := range tr.Points {
		f := d.basis[i*q : (i+1)*q]
		m.basis(f, p.T/tr.TimeScaleDays, tr.TimeScaleDays)
		l11, l21, l22 := cholesky2(p)
		d.chol[i] = [3]float64{l11, l21, l22}
	}
	return d
}

// rowsOf returns the whitened ξ and η rows of point k of the design (np
// entries each, one after the other, in the work space) and their
// right-hand sides:
//
//	ξ row: f/l11 (ξ columns), 0 (η columns), −SiteXi/l11 (u)
//	η row: −l21·(ξ row)/l22, f/l22, (−SiteEta − l21·ux)/l22
//	rhs:   wx = (ξ + uFixed·SiteXi)/l11, ((η + uFixed·SiteEta) − l21·wx)/l22
//
// (the ξ row divided by σξ, the η row whitened by L⁻¹, L the Cholesky factor
// of cholesky2).
func (d *design) rowsOf(k int) (rows []float64, bx, by float64) {
	q, np := d.q, d.np
	p := &d.pts[k]
	f := d.basis[k*q : (k+1)*q]
	c := d.chol[k]
	l11, l21, l22 := c[0], c[1], c[2]
	rows = d.ws.row[:2*np]
	rx, ry := rows[:np], rows[np:]
	// whitened ξ row: row/σξ
	for j := 0; j < q; j++ {
		rx[j] = f[j] / l11
		rx[q+j] = 0
	}
	// whitened η row: (row_η − l21·w_ξ)/l22
	for j := 0; j < q; j++ {
		ry[j] = -l21 * rx[j] / l22
		ry[q+j] = f[j] / l22
	}
	if np > 2*q {
		ux := -p.SiteXi / l11
		rx[np-1] = ux
		ry[np-1] = (-p.SiteEta - l21*ux) / l22
	}
	wx := (p.Xi + d.uFixed*p.SiteXi) / l11
	return rows, wx, ((p.Eta + d.uFixed*p.SiteEta) - l21*wx) / l22
}

// factorNights brings the night blocks of d up to date for the active
// points of tr, the track being fitted, with the first cols columns, and adds
// each column's sum of squares over the active rows into sumSq.
//
// Each night's active rows (whitened, not column-scaled) are reduced by
// Householder QR to at most cols rows: R_g and the first cols entries of
// Q_gᵀb_g (a night with no more rows than columns keeps its rows as they
// are). Stacking the blocks of all nights and factorising the stack gives the
// R and Qᵀb of the whole system, so the least-squares solution is that of the
// full factorisation:
//
//	A = [A_1; …; A_K] = diag(Q_1, …, Q_K)·[R_1; …; R_K]
//
// (exact algebra: diag(Q_1, …, Q_K) is orthogonal, and the QR factorisation
// of the stack completes that of A; the least-squares problem is invariant
// under an orthogonal transformation of its rows, Golub & Van Loan, Matrix
// Computations, 4th ed. (2013), §5.3.3). A night is factorised again only when the active flags of its
// points changed; a night with no active point drops out of the stack and
// keeps its block, so the folds of a leave-one-night-out cross-validation are
// solved from the blocks of the full fit without refactorising any
// observation rows.
//
// The blocks are factorised without the column scaling: for a diagonal D,
// the R factor of A·D is R·D, so the scaling is applied to the stacked blocks
// (see stackSolve); Householder QR is columnwise backward stable, so scaling
// before it changes nothing beyond rounding (Higham, Accuracy and Stability
// of Numerical Algorithms, 2nd ed. (2002), Theorem 19.4, §19.4).
func (d *design) factorNights(tr *Track, active []bool, cols int, sumSq []float64) {
	nb := &d.ws.nights
	if nb.owner != d || len(nb.of) != len(active) {
		d.groupNights(tr)
	}
	if nb.cols != cols {
		nb.cols = cols
		ng := len(nb.nr)
		nb.r = grow(nb.r, ng*cols*cols)
		nb.c = grow(nb.c, ng*cols)
		nb.ss = grow(nb.ss, ng*cols)
		clear(nb.valid)
	}
	for g := range nb.nr {
		members := nb.idx[nb.start[g]:nb.start[g+1]]
		some, same := false, nb.valid[g]
		for _, i := range members {
			some = some || active[i]
			same = same && active[i] == nb.state[i]
		}
		if !some {
			continue // out of the stack; its block is kept
		}
		if !same {
			d.factorNight(g, members, active, cols)
		}
		for j, v := range nb.ss[g*cols : (g+1)*cols] {
			sumSq[j] += v
		}
	}
}

// groupNights sorts the points of tr, the track being fitted, into night
// groups for factorNights and marks every group's block stale.
func (d *design) groupNights(tr *Track) {
	nb := &d.ws.nights
	nb.owner = d
	n := len(tr.Points)
	nb.of = grow(nb.of, n)
	nb.idx = grow(nb.idx, n)
	nb.state = grow(nb.state, n)
	// Night numbers are small (0-based, −1 for a point without one): a
	// slice maps them to groups, in the order they first appear.
	lo, hi := 0, 0
	for _, p := range tr.Points {
		lo, hi = min(lo, p.Night), max(hi, p.Night)
	}
	gi := make([]int, hi-lo+1)
	for i := range gi {
		gi[i] = -1
	}
	var count []int
	for i, p := range tr.Points {
		g := gi[p.Night-lo]
		if g < 0 {
			g = len(count)
			gi[p.Night-lo] = g
			count = append(count, 0)
		}
		nb.of[i] = g
		count[g]++
	}
	ng := len(count)
	nb.start = grow(nb.start, ng+1)
	nb.start[0] = 0
	for g, c := range count {
		nb.start[g+1] = nb.start[g] + c
	}
	fill := append([]int(nil), nb.start[:ng]...)
	for i, g := range nb.of {
		nb.idx[fill[g]] = i
		fill[g]++
	}
	nb.nr = grow(nb.nr, ng)
	nb.valid = grow(nb.valid, ng)
	clear(nb.valid)
	nb.cols = 0 // the blocks are sized on first use
}

// nightChunkRows is the number of observation rows factorisation takes in at
// a time (see factorNight): with the triangle carried from the rows before,
// a chunk of at most 8 columns fits in a few tens of kilobytes, in cache.
const nightChunkRows = 256

// factorNight factorises the active rows of group g (the points members),
// storing its block, its column sums of squares and the active flags.
//
// A night with more rows than columns is reduced chunk by chunk: the
// triangle R and Qᵀb of the rows so far are stacked on the next
// nightChunkRows rows and the stack is factorised again (a sequential
// row-block update of the QR factorisation, Golub & Van Loan, Matrix
// Computations, 4th ed. (2013), §6.5.3; exact algebra for the same reason as
// the night blocks of [design.factorNights]), so that the work stays in cache
// however many rows the night has.
func (d *design) factorNight(g int, members []int, active []bool, cols int) {
	nb := &d.ws.nights
	ws := d.ws
	rows := 0
	for _, i := range members {
		if active[i] {
			rows += 2
		}
	}
	ss := nb.ss[g*cols : (g+1)*cols]
	clear(ss)
	blk := nb.r[g*cols*cols : (g+1)*cols*cols]
	rhs := nb.c[g*cols : (g+1)*cols]
	if rows <= cols {
		r := 0
		for _, i := range members {
			nb.state[i] = active[i]
			if !active[i] {
				continue
			}
			r += d.copyRows(blk[r*cols:], rhs[r:], i, cols, ss)
		}
		nb.nr[g] = rows
		nb.valid[g] = true
		return
	}
	size := cols + nightChunkRows
	ws.a = grow(ws.a, size*cols)
	ws.b = grow(ws.b, size)
	a, b := ws.a, ws.b
	top, r := 0, 0 // rows of the carried triangle; rows in the buffer
	flush := func() {
		d.qrFactor(a, b, r, cols)
		k := min(r, cols)
		for i := 0; i < k; i++ { // keep R (zero below the diagonal) and (Qᵀb)₁..k
			row := a[i*cols : (i+1)*cols]
			clear(row[:i])
		}
		top, r = k, k
	}
	for _, i := range members {
		nb.state[i] = active[i]
		if !active[i] {
			continue
		}
		if r+2 > size {
			flush()
		}
		r += d.copyRows(a[r*cols:], b[r:], i, cols, ss)
	}
	if r > top {
		flush()
	}
	clear(blk)
	for i := 0; i < cols; i++ {
		copy(blk[i*cols+i:(i+1)*cols], a[i*cols+i:(i+1)*cols])
	}
	copy(rhs, b[:cols])
	nb.nr[g] = cols
	nb.valid[g] = true
}

// copyRows copies point i's two whitened rows (their first cols columns)
// to dst and their right-hand sides to rhs, adds their squares into ss and
// returns 2.
func (d *design) copyRows(dst, rhs []float64, i, cols int, ss []float64) int {
	rows, bx, by := d.rowsOf(d.src(i))
	for c := 0; c < 2; c++ {
		out := dst[c*cols : (c+1)*cols]
		src := rows[c*d.np:][:cols]
		for j, v := range src {
			out[j] = v
			ss[j] += v * v
		}
	}
	rhs[0], rhs[1] = bx, by
	return 2
}

// stackSolve stacks the blocks of the nights with active points (as
// factorNights left them for active), each column divided by its scale,
// factorises the stack and solves the least-squares problem. It returns the
// factorised stack a (R in the upper triangle of its first cols rows,
// row-major with stride cols) and b, whose first cols entries hold the
// solution of the scaled problem, and false when R has a zero on its
// diagonal.
func (d *design) stackSolve(active []bool, cols int, scale []float64) (a, b []float64, ok bool) {
	nb := &d.ws.nights
	ws := d.ws
	in := func(g int) bool {
		for _, i := range nb.idx[nb.start[g]:nb.start[g+1]] {
			if active[i] {
				return true
			}
		}
		return false
	}
	total := 0
	for g, nr := range nb.nr {
		if in(g) {
			total += nr
		}
	}
	ws.a = grow(ws.a, total*cols)
	ws.b = grow(ws.b, total)
	a, b = ws.a, ws.b
	r := 0
	for g, nr := range nb.nr {
		if !in(g) {
			continue
		}
		blk := nb.r[g*cols*cols:]
		for i := 0; i < nr; i++ {
			dst := a[(r+i)*cols : (r+i+1)*cols]
			for j, v := range blk[i*cols : (i+1)*cols] {
				dst[j] = v / scale[j]
			}
			b[r+i] = nb.c[g*cols+i]
		}
		r += nr
	}
	return a, b, d.qrSolve(a, b, total, cols)
}

// qrFactor factorises the rows × cols matrix a (row-major, overwritten by its
// Householder QR factorisation, R in its upper triangle) and overwrites b
// with Qᵀb. The LAPACK calls are those of gonum's mat.QR (Factorize, then
// SolveTo), made on the work space so that nothing is allocated per pass.
//
// Reference: Golub & Van Loan, Matrix Computations, 4th ed. (2013), §5.2
// (Householder QR), §5.3.3 (the QR solution of least squares).
func (d *design) qrFactor(a, b []float64, rows, cols int) {
	ws := d.ws
	ag := blas64.General{Rows: rows, Cols: cols, Stride: cols, Data: a}
	ws.tau = grow(ws.tau, cols)
	var query [1]float64
	lapack64.Geqrf(ag, ws.tau, query[:], -1)
	ws.work = grow(ws.work, int(query[0]))
	lapack64.Geqrf(ag, ws.tau, ws.work, len(ws.work))

	bg := blas64.General{Rows: rows, Cols: 1, Stride: 1, Data: b}
	lapack64.Ormqr(blas.Left, blas.Trans, ag, ws.tau, bg, query[:], -1)
	ws.work = grow(ws.work, int(query[0]))
	lapack64.Ormqr(blas.Left, blas.Trans, ag, ws.tau, bg, ws.work, len(ws.work))
}

// qrSolve factorises a and b as [design.qrFactor] does, then overwrites the
// first cols entries of b with the least-squares solution R⁻¹(Qᵀb)₁..cols;
// it reports false when R has a zero on its diagonal.
func (d *design) qrSolve(a, b []float64, rows, cols int) bool {
	d.qrFactor(a, b, rows, cols)
	t := blas64.Triangular{N: cols, Stride: cols, Data: a, Uplo: blas.Upper, Diag: blas.NonUnit}
	return lapack64.Trtrs(blas.NoTrans, t, blas64.General{Rows: cols, Cols: 1, Stride: 1, Data: b[:cols]})
}

// grow returns buf resliced to length n, reallocated when its capacity is
// short (the contents are not kept).
func grow[T any](buf []T, n int) []T {
	if cap(buf) < n {
		return make([]T, n)
	}
	return buf[:n]
}

// fits reports whether d, built by [newDesign] for the points of tr, serves
// a fit of m with the settings s: the same number of points and basis
// functions, and either the same columns or the u column to be left out of a
// design whose right-hand side carries no fixed parallax. A nil d does not.
func (d *design) fits(tr *Track, m Model, s Settings, fitU bool) bool {
	if d == nil || d.numPoints() != len(tr.Points) || d.q != m.NumPerCoord() {
		return false
	}
	np := 2 * d.q
	if fitU {
		np++
	}
	return d.np == np || (d.np == np+1 && s.Parallax == ParallaxFit)
}

// gather returns the design of the points idx (indices into the points d was
// built for, in order), for a subset of the track such as a
// cross-validation fold: it shares d's rows, which depend each on its own
// point only, and d's work space (the folds are fitted one after another).
func (d *design) gather(idx []int) *design {
	g := *d
	g.at = idx
	return &g
}

// subsetJacobians returns the inverse plane Jacobians of sub's points taken
// from jinv, those of tr's points, when sub holds points of tr in tr's order
// on the same plane (as Track.Subset makes); otherwise nil. A point is
// matched by its ξ, η, which with the plane are all its Jacobian depends on.
func subsetJacobians(tr, sub *Track, jinv [][2][2]float64) [][2][2]float64 {
	if len(jinv) != len(tr.Points) || sub.Plane != tr.Plane {
		return nil
	}
	if sub == tr {
		return jinv
	}
	out := make([][2][2]float64, 0, len(sub.Points))
	for i, p := range tr.Points {
		if k := len(out); k < len(sub.Points) && sub.Points[k].Xi == p.Xi && sub.Points[k].Eta == p.Eta {
			out = append(out, jinv[i])
		}
	}
	if len(out) != len(sub.Points) {
		return nil
	}
	return out
}

// pointChi2 stores in the work space each point's normalised χ² under sol
// (the arithmetic of [residualOf], from the cached basis values and Cholesky
// factors) and returns their sum over the active points.
func (d *design) pointChi2(sol *Solution, active []bool) float64 {
	n := d.numPoints()
	d.ws.chi2 = grow(d.ws.chi2, n)
	q := d.q
	u := sol.InvDistance
	var sum float64
	for i, p := range sol.Track.Points {
		k := d.src(i)
		f := d.basis[k*q : (k+1)*q]
		var cx, ce float64
		for j := 0; j < q; j++ {
			cx += sol.Params[j] * f[j]
			ce += sol.Params[q+j] * f[j]
		}
		if !math.IsNaN(u) {
			cx -= u * p.SiteXi
			ce -= u * p.SiteEta
		}
		c := d.chol[k]
		z1 := (p.Xi - cx) / c[0]
		z2 := ((p.Eta - ce) - c[1]*z1) / c[2]
		chi2 := z1*z1 + z2*z2
		d.ws.chi2[i] = chi2
		if active[i] {
			sum += chi2
		}
	}
	return sum
}
