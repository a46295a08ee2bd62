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
// the projection's Jacobian. A pass copies the rows of its active points into
// a reused buffer and factorises that, so the per-point work (the basis, the
// whitening, the Jacobian of the gnomonic projection) is done once per fit
// rather than once per pass, and no matrix is allocated per pass.
//
// The values are computed by exactly the arithmetic of a fresh build, so a
// pass gives the same numbers, bit for bit, as building its system anew.
type design struct {
	q     int          // basis functions per coordinate
	np    int          // columns of the full design: 2q, plus 1 for the u column
	basis []float64    // f_j(τ_i) of point i at basis[i*q : (i+1)*q]
	chol  [][3]float64 // (l11, l21, l22) of point i (see cholesky2)
	// rows holds point i's whitened ξ row at rows[2i·np:] and its η row
	// right after; rhs its whitened ξ and η right-hand sides at rhs[2i:].
	rows []float64
	rhs  []float64
	jinv [][2][2]float64 // inverse plane Jacobian of each point (plane → east, north)
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
}

// workspaces recycles the work space of finished fits (see release), which
// saves the allocation and the collection of a design-sized buffer per fit.
var workspaces = sync.Pool{New: func() any { return new(workspace) }}

// release returns d's work space for other fits to reuse; d must not be
// solved again (solutions do not refer to the work space).
func (d *design) release() {
	if d.ws != nil {
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
	d := &design{
		q:     q,
		np:    np,
		basis: make([]float64, n*q),
		chol:  make([][3]float64, n),
		rows:  make([]float64, 2*n*np),
		rhs:   make([]float64, 2*n),
		jinv:  jinv,
		ws:    workspaces.Get().(*workspace),
	}
	if len(d.jinv) != n {
		d.jinv = planeJacobians(tr)
	}
	uFixed := 0.0
	if s.Parallax == ParallaxFixed {
		uFixed = s.InvDistance
	}
	for i, p := range tr.Points {
		f := d.basis[i*q : (i+1)*q]
		m.basis(f, p.T/tr.TimeScaleDays, tr.TimeScaleDays)
		l11, l21, l22 := cholesky2(p)
		d.chol[i] = [3]float64{l11, l21, l22}
		rx := d.rows[2*i*np : (2*i+1)*np]
		ry := d.rows[(2*i+1)*np : (2*i+2)*np]
		// whitened ξ row: row/σξ
		for j := 0; j < q; j++ {
			rx[j] = f[j] / l11
		}
		// whitened η row: (row_η − l21·w_ξ)/l22
		for j := 0; j < q; j++ {
			ry[j] = -l21 * rx[j] / l22
			ry[q+j] = f[j] / l22
		}
		bx := p.Xi + uFixed*p.SiteXi
		by := p.Eta + uFixed*p.SiteEta
		wx := bx / l11
		d.rhs[2*i] = wx
		d.rhs[2*i+1] = (by - l21*wx) / l22
		if fitU {
			ux := -p.SiteXi / l11
			rx[np-1] = ux
			ry[np-1] = (-p.SiteEta - l21*ux) / l22
		}
	}
	return d
}

// system copies the rows of the active points, their first cols columns,
// into the work space and returns the whitened design (2n × cols, row-major
// with stride cols) and right-hand side (2n), with each column's sum of
// squares added into sumSq (accumulated down the rows).
func (d *design) system(active []bool, n, cols int, sumSq []float64) (a, b []float64) {
	rows := 2 * n
	ws := d.ws
	ws.a = grow(ws.a, rows*cols)
	ws.b = grow(ws.b, rows)
	a, b = ws.a, ws.b
	r := 0
	for i, on := range active {
		if !on {
			continue
		}
		k := d.src(i)
		for c := 0; c < 2; c++ {
			dst := a[(r+c)*cols : (r+c+1)*cols]
			src := d.rows[(2*k+c)*d.np:][:cols]
			for j, v := range src {
				dst[j] = v
				sumSq[j] += v * v
			}
		}
		b[r], b[r+1] = d.rhs[2*k], d.rhs[2*k+1]
		r += 2
	}
	return a, b
}

// qrSolve factorises the rows × cols matrix a (row-major, overwritten by its
// Householder QR factorisation, R in its upper triangle) and overwrites b
// with Qᵀb, its first cols entries then with the least-squares solution
// R⁻¹(Qᵀb)₁..cols. It reports false when R has a zero on its diagonal. The
// LAPACK calls are those of gonum's mat.QR (Factorize, then SolveTo), made
// on the work space so that nothing is allocated per pass.
//
// Reference: Golub & Van Loan, Matrix Computations, 4th ed. (2013), §5.2
// (Householder QR), §5.3.3 (the QR solution of least squares).
func (d *design) qrSolve(a, b []float64, rows, cols int) bool {
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
	t := blas64.Triangular{N: cols, Stride: cols, Data: a, Uplo: blas.Upper, Diag: blas.NonUnit}
	return lapack64.Trtrs(blas.NoTrans, t, blas64.General{Rows: cols, Cols: 1, Stride: 1, Data: b[:cols]})
}

// grow returns buf resliced to length n, reallocated when its capacity is
// short (the contents are not kept).
func grow(buf []float64, n int) []float64 {
	if cap(buf) < n {
		return make([]float64, n)
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
