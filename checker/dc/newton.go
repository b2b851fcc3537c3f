package dc

import (
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// Newton iteration limits and tolerances. The tolerances are tight because
// rules compare currents to 0.1 %, and Newton's last step is quadratic: a step
// of 1e-7 relative leaves a current error far below that.
const (
	maxNewton   = 100  // iterations of one Newton attempt
	maxStepIter = 60   // iterations of one continuation step
	maxSteps    = 200  // continuation steps of one fall-back
	relTol      = 1e-7 // relative change of an unknown between iterations
	voltTol     = 1e-9 // V, absolute change of a node voltage
	ampTol      = 1e-12
	// junctionTol bounds how far a junction may sit from the voltage its
	// transistor was linearised at: the current error is about
	// ½·(step/VT)², so 1e-7 V leaves KCL balanced to 1e-11.
	junctionTol = 1e-7 // V
	// settleIters is how many iterations in a row the unknowns may meet
	// their tolerances while a junction, limited by rounding, still misses
	// junctionTol, before the answer is accepted anyway.
	settleIters = 3
	gminStart   = 1e-2 // S, the first extra shunt of gmin stepping
	gminFloor   = 1e-13
)

// outcome of one Newton attempt.
type outcome int

const (
	converged outcome = iota
	diverged
	singular
)

// solver holds the matrices of one Solve, reused across every iteration.
// The linear solves go over the matrix's non-zero entries (sparseLU), with
// exactly the arithmetic of gonum's LAPACK LU with partial pivoting (Getrf,
// Getrs), which the solver falls back to where that equivalence does not
// hold (a value that is not finite). mat.LU would also estimate the
// condition number on every factorisation; the solver needs only to know
// about an exactly zero pivot (bad scaling is judged by the KCL balance
// instead).
type solver struct {
	nl    *netlist
	n     int
	m     *sparseLU // the matrix of the current iteration, and its factors
	base  []float64 // linear part of the matrix, by m's slots
	diag  []int     // m's slot of each node's diagonal entry
	jac   [][9]int  // m's slots of each transistor's nine stamps (-1: gnd)
	bsrc  []float64 // right-hand side of the sources at full strength
	a     blas64.General
	rhs   blas64.General // n×1; holds the solution after a solve
	piv   []int
	dense bool      // the last factorisation was the dense fall-back's
	x     []float64 // current solution
	res   []float64 // KCL residual of each net, scratch for balanced
	mag   []float64 // Σ|current| at each net, scratch for balanced
	floor []float64 // what rounding leaves of each net's residual
	save  []float64
	saveJ []float64 // junction state of every transistor, for a step that fails
	iters int       // Newton iterations, all attempts of the current method
	// the unknown with the smallest pivot when the matrix was singular
	singularAt int
	// where plain Newton gave up, kept to explain a failure of the fall-backs
	firstTry []float64

	// The field-effect transistors (fet.go): m's slots of each one's
	// stamps, and their state for a step that fails.
	fetSlot [][16]int
	saveF   []float64
}

// jacobian lists the (row, column) of a transistor's stamps in the order
// stamp adds them.
func (q *bjt) jacobian() [9][2]int {
	return [9][2]int{{q.c, q.b}, {q.c, q.e}, {q.c, q.c}, {q.b, q.b}, {q.b, q.e}, {q.b, q.c}, {q.e, q.b}, {q.e, q.e}, {q.e, q.c}}
}

func newSolver(nl *netlist) *solver {
	n := nl.size
	s := &solver{nl: nl, n: n, bsrc: make([]float64, n)}
	s.rhs = blas64.General{Rows: n, Cols: 1, Stride: 1, Data: make([]float64, n)}
	s.x = make([]float64, n)
	s.res = make([]float64, n)
	s.mag = make([]float64, n)
	s.floor = make([]float64, n)
	s.save = make([]float64, n)
	s.saveJ = make([]float64, 2*len(nl.bjts))

	// The pattern: every entry the linear part or a transistor may touch.
	pat := newSlotter(n)
	pat.keys = make([]int, 0, nl.nodes+4*len(nl.conds)+5*len(nl.sources)+9*len(nl.bjts))
	for i := 0; i < nl.nodes; i++ {
		pat.mark(i, i)
	}
	for _, c := range nl.conds {
		pat.mark(c.a, c.a)
		pat.mark(c.b, c.b)
		pat.mark(c.a, c.b)
		pat.mark(c.b, c.a)
	}
	for _, v := range nl.sources {
		pat.mark(v.p, v.row)
		pat.mark(v.m, v.row)
		pat.mark(v.row, v.p)
		pat.mark(v.row, v.m)
		pat.mark(v.row, v.row)
	}
	for k := range nl.bjts {
		for _, e := range nl.bjts[k].jacobian() {
			pat.mark(e[0], e[1])
		}
	}
	nl.markFETs(pat)
	s.m = pat.build()
	s.fetSlot = nl.fetSlots(s.m)
	s.base = make([]float64, len(s.m.vals))
	s.diag = make([]int, nl.nodes)
	for i := range s.diag {
		s.diag[i] = s.m.slot(i, i)
	}
	s.jac = make([][9]int, len(nl.bjts))
	for k := range nl.bjts {
		for e, rc := range nl.bjts[k].jacobian() {
			s.jac[k][e] = s.m.slot(rc[0], rc[1])
		}
	}
	s.load()
	return s
}

// load writes the netlist's linear part into base and bsrc, for a new
// solver or after a Plan wrote a case's values into the netlist.
func (s *solver) load() {
	nl := s.nl
	clear(s.base)
	clear(s.bsrc)
	add := func(i, j int, v float64) {
		if i != gnd && j != gnd {
			s.base[s.m.slot(i, j)] += v
		}
	}
	for i := 0; i < nl.nodes; i++ {
		s.base[s.diag[i]] += gminModel
	}
	for _, c := range nl.conds {
		add(c.a, c.a, c.g)
		add(c.b, c.b, c.g)
		add(c.a, c.b, -c.g)
		add(c.b, c.a, -c.g)
	}
	for _, v := range nl.sources {
		add(v.p, v.row, 1)
		add(v.m, v.row, -1)
		add(v.row, v.p, 1)
		add(v.row, v.m, -1)
		add(v.row, v.row, -v.r)
		s.bsrc[v.row] += v.e
	}
	for _, no := range nl.nortons {
		s.bsrc[no.n] += no.i
	}
}

// factorSolve factorises the iteration's matrix and overwrites s.rhs with
// the solution. ok is false for a singular matrix.
func (s *solver) factorSolve() bool {
	ok, dense := s.m.factor()
	s.dense = dense
	if dense {
		n := s.n
		if s.a.Data == nil {
			s.a = blas64.General{Rows: n, Cols: n, Stride: n, Data: make([]float64, n*n)}
			s.piv = make([]int, n)
		}
		s.m.dense(s.a.Data)
		if ok = lapack64.Getrf(s.a, s.piv); ok {
			lapack64.Getrs(blas.NoTrans, s.a, s.rhs, s.piv)
		}
		return ok
	}
	if ok {
		s.m.solve(s.rhs.Data)
	}
	return ok
}

// volt is the voltage of unknown i in x (gnd is 0).
func volt(x []float64, i int) float64 {
	if i == gnd {
		return 0
	}
	return x[i]
}

// newton iterates from s.x at source strength scale with an extra shunt
// gshunt from every net to gnd. With initJct the first iteration linearises
// every transistor at the critical base-emitter voltage instead of at s.x.
// On success s.x holds the solution.
func (s *solver) newton(scale, gshunt float64, maxIter int, initJct bool) outcome {
	nl := s.nl
	ad := s.m.vals
	bd := s.rhs.Data
	settled := 0
	for it := 0; it < maxIter; it++ {
		s.iters++
		copy(ad, s.base)
		for i := range bd {
			bd[i] = scale * s.bsrc[i]
		}
		if gshunt > 0 {
			for i := 0; i < nl.nodes; i++ {
				ad[s.diag[i]] += gshunt
			}
		}
		anyLimited := false
		for k := range nl.bjts {
			q := &nl.bjts[k]
			var vbe, vbc float64
			if initJct && it == 0 {
				vbe, vbc = q.vcrit, 0
				q.moved, q.limited = math.Inf(1), true
			} else {
				rbe := q.pol * (volt(s.x, q.b) - volt(s.x, q.e))
				rbc := q.pol * (volt(s.x, q.b) - volt(s.x, q.c))
				var l1, l2 bool
				vbe, l1 = limitJunction(rbe, q.vbe, nl.vt, q.vcrit)
				vbc, l2 = limitJunction(rbc, q.vbc, nl.vt, q.vcrit)
				q.moved = math.Max(math.Abs(rbe-q.vbe), math.Abs(rbc-q.vbc))
				q.limited = l1 || l2
			}
			anyLimited = anyLimited || q.limited
			q.vbe, q.vbc = vbe, vbc
			s.stamp(k, ad, bd)
		}
		if s.stampFETs(ad, bd, initJct && it == 0) {
			anyLimited = true
		}

		if !s.factorSolve() {
			s.singularAt = s.smallestPivot()
			return singular
		}
		xn := bd
		small := !anyLimited
		for i, v := range xn {
			if !finite(v) {
				return diverged
			}
			tol := ampTol
			if i < nl.nodes {
				tol = voltTol
			}
			if math.Abs(v-s.x[i]) > relTol*math.Max(math.Abs(v), math.Abs(s.x[i]))+tol {
				small = false
			}
		}
		copy(s.x, xn)
		if !small {
			settled = 0
			// A net held only by tiny conductances beside large ones (a
			// floating base next to milliohms) is ill-conditioned: its
			// voltage wanders by more than the step tolerance from one
			// solve to the next. Accept the point when every net already
			// balances to what the arithmetic can resolve.
			if !anyLimited && it >= 4 && s.balanced(scale, gshunt) {
				return converged
			}
			continue
		}
		settled++
		if settled >= settleIters || s.junctionsSettled() {
			return converged
		}
	}
	return diverged
}

// balanced reports whether KCL, evaluated with the exact model at s.x,
// holds at every net to 1e-9 of the currents through it, or to what double
// precision can resolve there: a conductance g between voltages Va and Vb
// carries a current known only to 4ε·g·(|Va| + |Vb|), so a net in a cluster
// of milliohms, held to gnd by nothing but 1e-12 S, cannot balance better.
func (s *solver) balanced(scale, gshunt float64) bool {
	const eps4 = 4 * 0x1p-52
	nl := s.nl
	res, mag, floor := s.res, s.mag, s.floor
	clear(res)
	clear(mag)
	clear(floor)
	leave := func(i int, cur, tol float64) { // cur leaves net i, known to ±tol
		if i != gnd {
			res[i] += cur
			mag[i] += math.Abs(cur)
			floor[i] += tol + eps4*math.Abs(cur)
		}
	}
	for i := 0; i < nl.nodes; i++ {
		leave(i, (gminModel+gshunt)*s.x[i], 0)
	}
	for _, c := range nl.conds {
		va, vb := volt(s.x, c.a), volt(s.x, c.b)
		cur, tol := c.g*(va-vb), eps4*c.g*(math.Abs(va)+math.Abs(vb))
		leave(c.a, cur, tol)
		leave(c.b, -cur, tol)
	}
	for _, v := range nl.sources {
		leave(v.p, s.x[v.row], 0)
		leave(v.m, -s.x[v.row], 0)
	}
	for _, no := range nl.nortons {
		leave(no.n, -scale*no.i, 0)
	}
	for k := range nl.bjts {
		q := &nl.bjts[k]
		vc, vb, ve := volt(s.x, q.c), volt(s.x, q.b), volt(s.x, q.e)
		vbe, vbc := q.pol*(vb-ve), q.pol*(vb-vc)
		p := q.eval(vbe, vbc, nl.vt)
		// junction voltages are known to 4ε·(|Vb| + |Ve| + |Vc|)
		tol := (math.Abs(p.dicDvbe) + math.Abs(p.dicDvbc) + math.Abs(p.dibDvbe) + math.Abs(p.dibDvbc)) *
			eps4 * (math.Abs(vb) + math.Abs(ve) + math.Abs(vc))
		leave(q.c, q.pol*p.ic, tol)
		leave(q.b, q.pol*p.ib, tol)
		leave(q.e, -q.pol*(p.ic+p.ib), tol)
	}
	s.balanceFETs(leave)
	for i := 0; i < nl.nodes; i++ {
		if !(math.Abs(res[i]) <= 1e-9*mag[i]+floor[i]) {
			return false
		}
	}
	return true
}

// junctionsSettled reports whether every junction at s.x lies within
// junctionTol of the voltage its transistor was linearised at.
func (s *solver) junctionsSettled() bool {
	for k := range s.nl.bjts {
		q := &s.nl.bjts[k]
		vbe := q.pol * (volt(s.x, q.b) - volt(s.x, q.e))
		vbc := q.pol * (volt(s.x, q.b) - volt(s.x, q.c))
		if math.Abs(vbe-q.vbe) > junctionTol || math.Abs(vbc-q.vbc) > junctionTol {
			return false
		}
	}
	return s.fetsSettled()
}

// stamp adds transistor k, linearised at its junction state, to the matrix
// values ad (by slot) and right-hand side bd. The Jacobian with respect to
// node voltages does not depend on polarity; the currents change sign for a
// PNP.
func (s *solver) stamp(k int, ad, bd []float64) {
	q := &s.nl.bjts[k]
	p := q.eval(q.vbe, q.vbc, s.nl.vt)
	slots := &s.jac[k]
	// Collector row: IC(vbe, vbc) with vbe = pol(Vb − Ve), vbc = pol(Vb − Vc).
	gcb := p.dicDvbe + p.dicDvbc
	gbb := p.dibDvbe + p.dibDvbc
	eqC := q.pol * (p.ic - p.dicDvbe*q.vbe - p.dicDvbc*q.vbc)
	eqB := q.pol * (p.ib - p.dibDvbe*q.vbe - p.dibDvbc*q.vbc)

	// In the order of q.jacobian; the emitter row is −(collector + base).
	for e, v := range [9]float64{gcb, -p.dicDvbe, -p.dicDvbc, gbb, -p.dibDvbe, -p.dibDvbc,
		-gcb - gbb, p.dicDvbe + p.dibDvbe, p.dicDvbc + p.dibDvbc} {
		if slots[e] >= 0 {
			ad[slots[e]] += v
		}
	}
	if q.c != gnd {
		bd[q.c] -= eqC
	}
	if q.b != gnd {
		bd[q.b] -= eqB
	}
	if q.e != gnd {
		bd[q.e] += eqC + eqB
	}
}

// smallestPivot names the unknown whose column has the smallest pivot in the
// last factorisation (U's diagonal): the one the network does not determine.
func (s *solver) smallestPivot() int {
	best, at := math.Inf(1), 0
	for k := 0; k < s.n; k++ {
		v := s.m.pivot(k)
		if s.dense {
			v = math.Abs(s.a.Data[k*s.n+k])
		}
		if v < best || math.IsNaN(v) {
			best, at = v, k
		}
	}
	return at
}

func (s *solver) push() {
	copy(s.save, s.x)
	for k := range s.nl.bjts {
		s.saveJ[2*k], s.saveJ[2*k+1] = s.nl.bjts[k].vbe, s.nl.bjts[k].vbc
	}
	s.saveFETs()
}

func (s *solver) pop() {
	copy(s.x, s.save)
	for k := range s.nl.bjts {
		s.nl.bjts[k].vbe, s.nl.bjts[k].vbc = s.saveJ[2*k], s.saveJ[2*k+1]
	}
	s.restoreFETs()
}

func (s *solver) reset() {
	clear(s.x)
	for k := range s.nl.bjts {
		s.nl.bjts[k].vbe, s.nl.bjts[k].vbc = 0, 0
	}
	s.resetFETs()
	s.iters = 0
}

// gminStepping solves with a large shunt from every net to gnd, then lowers
// it step by step to nothing, each step starting from the last solution.
func (s *solver) gminStepping() outcome {
	s.reset()
	g := gminStart
	if o := s.newton(1, g, maxNewton, true); o != converged {
		return o
	}
	factor := 10.0
	for step := 0; step < maxSteps; step++ {
		next := g / factor
		if next < gminFloor {
			next = 0
		}
		s.push()
		switch s.newton(1, next, maxStepIter, false) {
		case converged:
			if next == 0 {
				return converged
			}
			g = next
			factor = math.Min(factor*factor, 10)
		case singular:
			return singular
		default:
			s.pop()
			factor = math.Sqrt(factor)
			if factor < 1.0001 {
				return diverged
			}
		}
	}
	return diverged
}

// sourceStepping raises every supply from zero to full strength, each step
// starting from the last solution.
func (s *solver) sourceStepping() outcome {
	s.reset()
	level, step := 0.0, 0.1
	for k := 0; k < maxSteps; k++ {
		next := math.Min(1, level+step)
		s.push()
		switch s.newton(next, 0, maxStepIter, false) {
		case converged:
			if next == 1 {
				return converged
			}
			level = next
			step = math.Min(step*2, 0.25)
		case singular:
			return singular
		default:
			s.pop()
			step /= 4
			if step < 1e-5 {
				return diverged
			}
		}
	}
	return diverged
}
