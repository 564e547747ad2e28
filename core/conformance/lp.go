package conformance

import (
	"math"
)

// lp is a linear program min c·x subject to A x = b, x ≥ 0, whose A and c stay fixed while b
// changes from one solve to the next: the marking equation of one net, asked again for every
// search state. That shape allows a warm start. The first solve runs the primal simplex (phase 1
// with artificial variables, then phase 2) and ends in an optimal basis; an optimal basis is dual
// feasible whatever b is, so every later solve starts from the basis the previous one ended in and
// runs the dual simplex, which typically needs a few pivots because neighbouring search states have
// nearly the same b (Chvátal, "Linear Programming", 1983, chapters 2, 8 and 10).
//
// The basis inverse is kept dense (m × m) and updated in product form at each pivot, and computed
// afresh every refactorEvery pivots so rounding does not build up. Rows that are linear
// combinations of others are dropped when the program is built (a workflow net's place rows often
// are), so every basis is square and invertible. Cost per solve: O(m²) to price b, plus
// O(m² + nnz(A)) per pivot.
type lp struct {
	m, n  int
	cols  [][]lpEntry // A's columns, sparse
	c     []float64
	basic []int     // the column basic in each row
	row   []int     // the row a basic column sits in, else -1
	binv  []float64 // the basis inverse, m × m, row-major
	d     []float64 // reduced costs of the structural columns
	x     []float64 // values of the basic columns
	// art is the sign of each row's artificial column (sign·e_row), chosen so the artificial
	// basis is feasible for the b of the first solve.
	art []float64
	// pivots counts pivots since the last refactorisation.
	pivots int
	ready  bool
	// lastB is the b that x was priced for; the next solve prices only the difference, since
	// nodes solved one after another are usually neighbours with nearly the same b. fresh is false
	// until x has been priced in full since the last refactorisation.
	lastB  []float64
	fresh  bool
	priced int // incremental pricings since the last full one
	// scratch
	u, alpha []float64
}

type lpEntry struct {
	i int
	v float64
}

const (
	lpEps         = 1e-9
	refactorEvery = 100
	lpMaxPivots   = 5000
)

// newLP builds the program over the columns (each a sparse column of A over rows 0..rows-1) and
// their costs. Rows dependent on earlier ones are dropped; keep tells the caller which rows stayed
// (and so which entries of b to pass to solve).
func newLP(rows int, cols [][]lpEntry, c []float64) (p *lp, keep []int) {
	keep = independentRows(rows, cols)
	at := make([]int, rows)
	for i := range at {
		at[i] = -1
	}
	for k, i := range keep {
		at[i] = k
	}
	p = &lp{m: len(keep), n: len(cols), c: c}
	p.cols = make([][]lpEntry, len(cols))
	for j, col := range cols {
		for _, e := range col {
			if at[e.i] >= 0 && e.v != 0 {
				p.cols[j] = append(p.cols[j], lpEntry{at[e.i], e.v})
			}
		}
	}
	p.basic = make([]int, p.m)
	p.row = make([]int, p.n+p.m)
	p.binv = make([]float64, p.m*p.m)
	p.d = make([]float64, p.n+p.m)
	p.x = make([]float64, p.m)
	p.u = make([]float64, p.m)
	p.alpha = make([]float64, p.n+p.m)
	p.art = make([]float64, p.m)
	p.lastB = make([]float64, p.m)
	return p, keep
}

// independentRows keeps each row of A that is not a combination of the rows kept before it
// (Gaussian elimination with partial pivoting on a dense copy).
func independentRows(rows int, cols [][]lpEntry) []int {
	n := len(cols)
	dense := make([][]float64, rows)
	for i := range dense {
		dense[i] = make([]float64, n)
	}
	for j, col := range cols {
		for _, e := range col {
			dense[e.i][j] += e.v
		}
	}
	var keep []int
	var basis [][]float64 // reduced kept rows, each with a leading column
	var lead []int
	for i := 0; i < rows; i++ {
		r := dense[i]
		for k, br := range basis {
			if f := r[lead[k]]; f != 0 {
				for j := range r {
					r[j] -= f * br[j]
				}
			}
		}
		best, at := 1e-7, -1
		for j, v := range r {
			if math.Abs(v) > best {
				best, at = math.Abs(v), j
			}
		}
		if at < 0 {
			continue
		}
		f := r[at]
		for j := range r {
			r[j] /= f
		}
		// keep the kept rows reduced against the new leading column too
		for _, br := range basis {
			if g := br[at]; g != 0 {
				for j := range br {
					br[j] -= g * r[j]
				}
			}
		}
		basis, lead, keep = append(basis, r), append(lead, at), append(keep, i)
	}
	return keep
}

// column returns u = B⁻¹ a_j for a structural (j < n) or artificial (j ≥ n: art[r]·e_r with
// r = j−n) column.
func (p *lp) column(j int, u []float64) {
	m := p.m
	if j >= p.n {
		r := j - p.n
		for i := 0; i < m; i++ {
			u[i] = p.binv[i*m+r] * p.art[r]
		}
		return
	}
	clear(u)
	for _, e := range p.cols[j] {
		for i := 0; i < m; i++ {
			u[i] += p.binv[i*m+e.i] * e.v
		}
	}
}

// rowTimes returns (row r of B⁻¹) · a_j.
func (p *lp) rowTimes(r, j int) float64 {
	m := p.m
	if j >= p.n {
		return p.binv[r*m+j-p.n] * p.art[j-p.n]
	}
	s := 0.0
	for _, e := range p.cols[j] {
		s += p.binv[r*m+e.i] * e.v
	}
	return s
}

// pivot brings column q into the basis in row r, with u = B⁻¹ a_q.
func (p *lp) pivot(r, q int, u []float64) {
	m := p.m
	theta := p.x[r] / u[r]
	for i := 0; i < m; i++ {
		p.x[i] -= theta * u[i]
	}
	p.x[r] = theta
	br := p.binv[r*m : r*m+m]
	inv := 1 / u[r]
	for k := range br {
		br[k] *= inv
	}
	for i := 0; i < m; i++ {
		if i == r || u[i] == 0 {
			continue
		}
		f := u[i]
		bi := p.binv[i*m : i*m+m]
		for k := range bi {
			bi[k] -= f * br[k]
		}
	}
	p.row[p.basic[r]] = -1
	p.basic[r] = q
	p.row[q] = r
	p.pivots++
}

// price sets x = B⁻¹ b: in full after a refactorisation, else as x + B⁻¹ (b − lastB), which is
// the same while x = B⁻¹ lastB holds (pivots keep it) and touches only the entries that changed.
func (p *lp) price(b []float64) {
	m := p.m
	if p.priced++; p.priced > 1000 {
		p.fresh = false // bound the rounding that incremental updates build up
	}
	if !p.fresh {
		p.priced = 0
		clear(p.x)
		clear(p.lastB)
		p.fresh = true
	}
	for k, v := range b {
		d := v - p.lastB[k]
		if d == 0 {
			continue
		}
		for i := 0; i < m; i++ {
			p.x[i] += p.binv[i*m+k] * d
		}
	}
	copy(p.lastB, b)
}

// reducedCosts sets d_j = c_j − c_B B⁻¹ a_j for every column, with cost(j) the cost in use.
func (p *lp) reducedCosts(cost func(j int) float64) {
	m := p.m
	y := p.u
	clear(y)
	for r := 0; r < m; r++ {
		cb := cost(p.basic[r])
		if cb == 0 {
			continue
		}
		for k := 0; k < m; k++ {
			y[k] += cb * p.binv[r*m+k]
		}
	}
	for j := 0; j < p.n+p.m; j++ {
		if p.row[j] >= 0 {
			p.d[j] = 0
			continue
		}
		s := cost(j)
		if j >= p.n {
			s -= y[j-p.n] * p.art[j-p.n]
		} else {
			for _, e := range p.cols[j] {
				s -= y[e.i] * e.v
			}
		}
		p.d[j] = s
	}
}

// refactor recomputes B⁻¹ from the basic columns by Gauss–Jordan elimination with partial
// pivoting. It reports false if the basis is singular (rounding gone wrong).
func (p *lp) refactor() bool {
	m := p.m
	a := make([]float64, m*m)
	for r, j := range p.basic {
		if j >= p.n {
			a[(j-p.n)*m+r] = p.art[j-p.n]
			continue
		}
		for _, e := range p.cols[j] {
			a[e.i*m+r] = e.v
		}
	}
	inv := p.binv
	clear(inv)
	for i := 0; i < m; i++ {
		inv[i*m+i] = 1
	}
	for c := 0; c < m; c++ {
		piv, best := -1, 1e-10
		for i := c; i < m; i++ {
			if v := math.Abs(a[i*m+c]); v > best {
				piv, best = i, v
			}
		}
		if piv < 0 {
			return false
		}
		if piv != c {
			for k := 0; k < m; k++ {
				a[c*m+k], a[piv*m+k] = a[piv*m+k], a[c*m+k]
				inv[c*m+k], inv[piv*m+k] = inv[piv*m+k], inv[c*m+k]
			}
		}
		f := 1 / a[c*m+c]
		for k := 0; k < m; k++ {
			a[c*m+k] *= f
			inv[c*m+k] *= f
		}
		for i := 0; i < m; i++ {
			if i == c {
				continue
			}
			if g := a[i*m+c]; g != 0 {
				for k := 0; k < m; k++ {
					a[i*m+k] -= g * a[c*m+k]
					inv[i*m+k] -= g * inv[c*m+k]
				}
			}
		}
	}
	p.pivots = 0
	p.fresh = false
	return true
}

func (p *lp) cost(j int) float64 {
	if j >= p.n {
		return 0
	}
	return p.c[j]
}

// start finds an optimal basis for b by the two-phase primal simplex. It reports false if b is
// infeasible.
func (p *lp) start(b []float64) bool {
	m := p.m
	// phase 1: the artificial basis, one unit column per row, signed so that it is feasible
	for i := range p.row {
		p.row[i] = -1
	}
	clear(p.binv)
	for i := 0; i < m; i++ {
		p.art[i] = 1
		if b[i] < 0 {
			p.art[i] = -1
		}
		p.basic[i] = p.n + i
		p.row[p.n+i] = i
		p.binv[i*m+i] = p.art[i] // B = diag(art) is its own inverse
	}
	p.pivots = 0
	p.fresh = false
	p.price(b)
	phase1 := func(j int) float64 {
		if j >= p.n {
			return 1
		}
		return 0
	}
	if !p.primal(phase1, true) {
		return false
	}
	total := 0.0
	for r := 0; r < m; r++ {
		if p.basic[r] >= p.n {
			total += math.Abs(p.x[r])
		}
	}
	if total > 1e-7 {
		return false
	}
	// drive artificial columns at level 0 out of the basis
	for r := 0; r < m; r++ {
		if p.basic[r] < p.n {
			continue
		}
		for j := 0; j < p.n; j++ {
			if p.row[j] < 0 && math.Abs(p.rowTimes(r, j)) > 1e-7 {
				p.column(j, p.u)
				p.pivot(r, j, p.u)
				break
			}
		}
	}
	if !p.refactor() {
		return false
	}
	p.price(b)
	if !p.primal(p.cost, false) {
		return false
	}
	p.reducedCosts(p.cost)
	p.ready = true
	return true
}

// primal runs primal simplex iterations with the given costs (Dantzig's rule, Bland's after a
// run of degenerate pivots), artificial columns entering only in phase 1.
func (p *lp) primal(cost func(int) float64, phase1 bool) bool {
	u := make([]float64, p.m)
	degenerate := 0
	for it := 0; it < lpMaxPivots; it++ {
		p.reducedCosts(cost)
		q := -1
		best := -lpEps
		limit := p.n
		if phase1 {
			limit = p.n + p.m
		}
		for j := 0; j < limit; j++ {
			if p.row[j] >= 0 || p.d[j] >= best {
				continue
			}
			if j >= p.n && !phase1 {
				continue
			}
			q, best = j, p.d[j]
			if degenerate > 50 {
				break // Bland: the first improving column
			}
		}
		if q < 0 {
			return true
		}
		p.column(q, u)
		r := -1
		ratio := math.Inf(1)
		for i := 0; i < p.m; i++ {
			if u[i] > lpEps {
				v := p.x[i] / u[i]
				if v < ratio-1e-12 || (v < ratio+1e-12 && r >= 0 && p.basic[i] < p.basic[r]) {
					ratio, r = v, i
				}
			}
		}
		if r < 0 {
			return false // unbounded: cannot happen with costs ≥ 0
		}
		if ratio < 1e-12 {
			degenerate++
		} else {
			degenerate = 0
		}
		p.pivot(r, q, u)
		if p.pivots >= refactorEvery {
			p.refactor()
		}
	}
	return false
}

// solve returns the optimum of the program for b (len m, rows as kept by newLP), or +Inf if b
// is infeasible. After it, value(j) gives the solution.
func (p *lp) solve(b []float64) float64 {
	if !p.ready {
		if !p.start(b) {
			return math.Inf(1)
		}
		return p.objective()
	}
	p.price(b)
	for it := 0; it < lpMaxPivots; it++ {
		// leaving row: the most negative basic value
		r, worst := -1, -1e-9
		for i, v := range p.x {
			if v < worst {
				r, worst = i, v
			}
		}
		if r < 0 {
			return p.objective()
		}
		// entering column: the ratio test on row r over columns with a negative entry
		q, ratio, size := -1, math.Inf(1), 0.0
		for j := 0; j < p.n; j++ {
			if p.row[j] >= 0 {
				continue
			}
			a := p.rowTimes(r, j)
			p.alpha[j] = a
			if a >= -lpEps {
				continue
			}
			v := p.d[j] / -a
			if v < ratio-1e-12 || (v < ratio+1e-12 && -a > size) {
				q, ratio, size = j, v, -a
			}
		}
		if q < 0 {
			return math.Inf(1) // the dual is unbounded: no x ≥ 0 solves A x = b
		}
		aq := p.alpha[q]
		f := p.d[q] / aq
		leaving := p.basic[r]
		for j := 0; j < p.n; j++ {
			if p.row[j] < 0 && j != q {
				p.d[j] -= f * p.alpha[j]
			}
		}
		p.d[q] = 0
		p.column(q, p.u)
		p.pivot(r, q, p.u)
		if leaving < p.n {
			p.d[leaving] = -f
		}
		if p.pivots >= refactorEvery {
			if !p.refactor() {
				p.ready = false
				return p.solve(b)
			}
			p.reducedCosts(p.cost)
			p.price(b)
		}
	}
	p.ready = false // cycling: start over next time
	return math.Inf(-1)
}

func (p *lp) objective() float64 {
	s := 0.0
	for r, j := range p.basic {
		if j < p.n {
			s += p.c[j] * p.x[r]
		}
	}
	return s
}

// value is x_j in the last solution.
func (p *lp) value(j int) float64 {
	if r := p.row[j]; r >= 0 {
		return p.x[r]
	}
	return 0
}
