package ac

// portSolver is the two-port's nodal matrix (every stamp but the in port's
// source and the out port's load, Gmin on the diagonal) prepared once for a
// whole sweep: the rows' spans and memory, and a plan saying where each
// entry of each element's admittance matrix is added. At each frequency
// assemble writes the values into the same memory and factor eliminates
// them there, so a frequency allocates nothing and repeats no bookkeeping.
//
// The result is bit for bit what stamping a fresh matrix and factorising it
// gives: the plan adds the same values to the same entries in stamp's order,
// and the factorisation is sparse.factor itself, whose pivot search at every
// step is the strictest test of a stored pivot order (it keeps the order
// while the order is still partial pivoting's and changes it where not), so
// accuracy is never traded for speed.
type portSolver struct {
	m      *sparse
	lo, hi []int // each row's span before elimination
	start  []int // where each row's memory begins in m.buf
	diag   []int // m.buf index of each diagonal entry
	plan   []stampOp
	one    complex128   // the sign stamp multiplies each entry by
	rhs    []complex128 // a one-port's right-hand side
	x, y   []complex128 // the solutions for the in and the out port
}

// stampOp is one entry of one element's admittance matrix: its index in the
// flat admittance block, and the m.buf indices it is added to, subtracted
// from, subtracted from and added to, in stamp's order (−1 for a ground end).
// outside marks an entry that lands outside the spans: it was zero when they
// were drawn, and must stay zero.
type stampOp struct {
	d       int32
	at      [4]int32
	outside bool
}

// admFlat is one admittance slice per element (as admBlock), and the block
// they are cut from.
func admFlat(nw *network) ([][]complex128, []complex128) {
	total := 0
	for _, e := range nw.elems {
		total += len(e.branches) * len(e.branches)
	}
	flat := make([]complex128, total)
	d := make([][]complex128, len(nw.elems))
	buf := flat
	for i, e := range nw.elems {
		r2 := len(e.branches) * len(e.branches)
		d[i], buf = buf[:r2:r2], buf[r2:]
	}
	return d, flat
}

// newPortSolver prepares the matrix for admittances like d (the spans cover
// every entry that is not zero in d), widened to lo0/hi0 when given.
func newPortSolver(nw *network, d [][]complex128, lo0, hi0 []int) *portSolver {
	n := nw.n
	lo, hi := make([]int, n), make([]int, n)
	for i := range n {
		lo[i], hi[i] = i, i
		if lo0 != nil {
			lo[i], hi[i] = lo0[i], hi0[i]
		}
	}
	for i, e := range nw.elems {
		span(lo, hi, e.branches, d[i])
	}
	ps := &portSolver{m: newSparse(n, lo, hi), lo: lo, hi: hi, start: make([]int, n), diag: make([]int, n),
		one: 1, rhs: make([]complex128, n), x: make([]complex128, n), y: make([]complex128, n)}
	at := 0
	for i := range n {
		ps.start[i] = at
		ps.diag[i] = at + i - lo[i]
		at += ps.m.room[i]
	}
	index := func(i, j int) (int32, bool) {
		if i == ground || j == ground {
			return -1, true
		}
		if j < lo[i] || j > hi[i] {
			return -1, false
		}
		return int32(ps.start[i] + j - lo[i]), true
	}
	off := 0
	for k, e := range nw.elems {
		r := len(e.branches)
		if k != nw.source && k != nw.load {
			for a, ba := range e.branches {
				for b, bb := range e.branches {
					op := stampOp{d: int32(off + a*r + b)}
					var in [4]bool
					op.at[0], in[0] = index(ba.from, bb.from)
					op.at[1], in[1] = index(ba.from, bb.to)
					op.at[2], in[2] = index(ba.to, bb.from)
					op.at[3], in[3] = index(ba.to, bb.to)
					op.outside = !in[0] || !in[1] || !in[2] || !in[3]
					ps.plan = append(ps.plan, op)
				}
			}
		}
		off += r * r
	}
	return ps
}

// assemble writes the matrix for the admittances in flat (admFlat's block)
// into the solver's memory, undoing the last factorisation. It reports
// false, having written nothing useful, when an entry outside the spans is
// not zero.
func (ps *portSolver) assemble(flat []complex128) bool {
	m := ps.m
	buf := m.buf
	for i := range m.rows {
		// Put row i back in its own memory; where the last factorisation
		// left it there (no exchange), only its length is written, which
		// spares the garbage collector's write barrier.
		r := &m.rows[i]
		s, w := ps.start[i], ps.hi[i]-ps.lo[i]+1
		if cap(r.v) == m.room[i] && &r.v[:1][0] == &buf[s] {
			r.v = r.v[:w]
		} else {
			r.v = buf[s : s+w : s+m.room[i]]
		}
		r.lo = ps.lo[i]
		clear(r.v)
	}
	for _, k := range ps.diag {
		buf[k] += Gmin
	}
	one := ps.one
	for i := range ps.plan {
		op := &ps.plan[i]
		v := flat[op.d] * one
		if v == 0 {
			continue
		}
		if op.outside {
			return false
		}
		if t := op.at[0]; t >= 0 {
			buf[t] += v
		}
		if t := op.at[1]; t >= 0 {
			buf[t] -= v
		}
		if t := op.at[2]; t >= 0 {
			buf[t] -= v
		}
		if t := op.at[3]; t >= 0 {
			buf[t] += v
		}
	}
	return true
}
