package dc

import (
	"math"
	"slices"
	"sort"
)

// sparseLU solves the Newton systems over the matrix's non-zero entries
// only. A dense factorisation costs n³ per iteration, which dominates the
// analysis of a circuit with a few hundred nets, while a nodal matrix holds a
// handful of entries per row and fills in little.
//
// It performs exactly the arithmetic of the dense LAPACK routines the solver
// used before (gonum's Dgetrf and Dgetrs: partial pivoting on the first
// largest |a|, the column scaled by the pivot's reciprocal, the update
// a + (−l)·u, the triangular solves skipping zero coefficients, each result
// scaled by the diagonal's reciprocal), in the same order for every entry;
// it only leaves out the operations that add a zero. Their results are
// therefore bit for bit the same as long as every value stays finite: then
// a left-out operation can change no more than the sign of a zero, and a
// zero takes no part in the solves. Where a value is not finite, or a pivot
// is subnormal (LAPACK then divides instead of multiplying), factor reports
// it and the caller uses the dense routines.
type sparseLU struct {
	n int
	// The assembled matrix: row i's entries are cols/vals[start[i]:start[i+1]],
	// columns ascending; the pattern is fixed for the solver's life.
	start []int
	cols  []int
	vals  []float64

	// The factorisation, by physical row (a row keeps its number through
	// exchanges): its entries, columns ascending, cut from the arena.
	rc     [][]int
	rv     [][]float64
	pos    []int   // physical row → position
	at     []int   // position → physical row
	next   []int   // per row: index of its first entry at or right of the current column
	colOf  [][]int // per column: the rows that have an entry there
	ipiv   []int   // LAPACK's: at step k, positions k and ipiv[k] were exchanged
	arenaC []int
	arenaV []float64
	// pat is, per physical row, the columns the last factorisation filled
	// (nil before the first). The next one starts every row on them, with
	// explicit zeros where the matrix has no entry, so that the Newton
	// iterations after the first update their rows in place: an explicit
	// zero takes part in nothing (see update), so the arithmetic is the same.
	pat    [][]int
	patBuf []int
	filled bool  // the current factorisation filled a row beyond its pattern
	hit    []int // scratch of update
	tmpC   []int
	tmpV   []float64
}

// slotter builds the fixed pattern: entries are marked, then frozen by
// build and addressed by slot.
type slotter struct {
	n    int
	keys []int // i·n + j of every marked entry, repeats included
}

func newSlotter(n int) *slotter { return &slotter{n: n} }

// mark records that entry (i, j) may be non-zero; gnd rows and columns are
// ignored.
func (s *slotter) mark(i, j int) {
	if i != gnd && j != gnd {
		s.keys = append(s.keys, i*s.n+j)
	}
}

// build freezes the pattern.
func (s *slotter) build() *sparseLU {
	n := s.n
	slices.Sort(s.keys)
	keys := slices.Compact(s.keys)
	m := &sparseLU{n: n, start: make([]int, n+1), cols: make([]int, len(keys))}
	for e, k := range keys {
		m.cols[e] = k % n
		m.start[k/n+1]++
	}
	for i := 0; i < n; i++ {
		m.start[i+1] += m.start[i]
	}
	m.vals = make([]float64, len(m.cols))
	// Room for the fill and the rows it rewrites, so that the arena rarely grows.
	m.arenaC, m.arenaV = make([]int, 0, 4*len(m.cols)), make([]float64, 0, 4*len(m.cols))
	m.rc, m.rv = make([][]int, n), make([][]float64, n)
	m.pos, m.at, m.next = make([]int, n), make([]int, n), make([]int, n)
	// Each column's row list, cut from one block with room for twice the
	// column's entries (fill adds some): appending to n lists one by one
	// was most of a case's allocations.
	count := make([]int, n)
	for _, j := range m.cols {
		count[j]++
	}
	block := make([]int, 2*len(m.cols))
	m.colOf = make([][]int, n)
	for j, c := range count {
		m.colOf[j], block = block[:0:2*c], block[2*c:]
	}
	m.ipiv = make([]int, n)
	return m
}

// slot is the index in vals of entry (i, j), which must be in the pattern;
// -1 for a gnd row or column.
func (m *sparseLU) slot(i, j int) int {
	if i == gnd || j == gnd {
		return -1
	}
	lo, hi := m.start[i], m.start[i+1]
	for lo < hi {
		mid := (lo + hi) / 2
		switch c := m.cols[mid]; {
		case c == j:
			return mid
		case c < j:
			lo = mid + 1
		default:
			hi = mid
		}
	}
	panic("dc: entry outside the matrix pattern")
}

// dense writes the assembled matrix into a (row-major n×n, overwritten).
func (m *sparseLU) dense(a []float64) {
	clear(a)
	for i := 0; i < m.n; i++ {
		for k := m.start[i]; k < m.start[i+1]; k++ {
			a[i*m.n+m.cols[k]] = m.vals[k]
		}
	}
}

// factor factorises the assembled matrix. ok is false for a zero pivot (the
// dense routine's "singular"); dense is true when the dense routine must be
// used instead (see sparseLU).
func (m *sparseLU) factor() (ok, dense bool) {
	n := m.n
	for _, v := range m.vals {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false, true
		}
	}
	if m.pat == nil {
		m.pat = make([][]int, n)
		for i := range n {
			m.pat[i] = m.cols[m.start[i]:m.start[i+1]]
		}
	}
	m.arenaC, m.arenaV = m.arenaC[:0], m.arenaV[:0]
	for j := range m.colOf {
		m.colOf[j] = m.colOf[j][:0]
	}
	for i := 0; i < n; i++ {
		// Row i on its pattern: the matrix's entries, zeros elsewhere.
		a := len(m.arenaC)
		e, end := m.start[i], m.start[i+1]
		for _, j := range m.pat[i] {
			v := 0.0
			if e < end && m.cols[e] == j {
				v = m.vals[e]
				e++
			}
			m.arenaC = append(m.arenaC, j)
			m.arenaV = append(m.arenaV, v)
			m.colOf[j] = append(m.colOf[j], i)
		}
		m.pos[i], m.at[i], m.next[i] = i, i, 0
		m.rc[i] = m.arenaC[a:len(m.arenaC):len(m.arenaC)]
	}
	for i, a := 0, 0; i < n; i++ {
		b := a + len(m.rc[i])
		m.rc[i], m.rv[i] = m.arenaC[a:b:b], m.arenaV[a:b:b] // the arena may have moved
		a = b
	}
	m.filled = false
	ok = true
	for k := 0; k < n; k++ {
		// Pivot: the first largest |a| in column k, in position order.
		best, bestPos := math.Abs(m.entry(m.at[k], k)), k
		for _, r := range m.colOf[k] {
			if p := m.pos[r]; p > k {
				if v := math.Abs(m.entry(r, k)); v > best || v == best && p < bestPos {
					best, bestPos = v, p
				}
			}
		}
		m.ipiv[k] = bestPos
		if best == 0 {
			ok = false // LAPACK goes on; the column below is zero, nothing to eliminate
			continue
		}
		if bestPos != k {
			r, s := m.at[k], m.at[bestPos]
			m.at[k], m.at[bestPos] = s, r
			m.pos[s], m.pos[r] = k, bestPos
		}
		pr := m.at[k]
		aj := m.entry(pr, k)
		if math.Abs(aj) < 0x1p-1022 {
			return false, true
		}
		inv := 1 / aj
		if inv == 0 {
			return false, true
		}
		pi := m.next[pr] // its entry in column k
		pc, pv := m.rc[pr][pi+1:], m.rv[pr][pi+1:]
		for _, r := range m.colOf[k] {
			if m.pos[r] <= k {
				continue
			}
			i := m.next[r]
			if m.rc[r][i] != k {
				continue
			}
			l := m.rv[r][i] * inv
			m.rv[r][i] = l
			if l != 0 {
				m.update(r, i, l, pc, pv, k)
			}
		}
	}
	for _, v := range m.arenaV {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false, true
		}
	}
	if m.filled {
		m.patBuf = m.patBuf[:0]
		for r := range m.rc {
			m.patBuf = append(m.patBuf, m.rc[r]...)
		}
		for r, a := 0, 0; r < n; r++ {
			b := a + len(m.rc[r])
			m.pat[r] = m.patBuf[a:b:b]
			a = b
		}
	}
	return ok, false
}

// entry is row r's entry in column k, the current column: it moves the row's
// cursor up to k.
func (m *sparseLU) entry(r, k int) float64 {
	c, i := m.rc[r], m.next[r]
	for i < len(c) && c[i] < k {
		i++
	}
	m.next[r] = i
	if i < len(c) && c[i] == k {
		return m.rv[r][i]
	}
	return 0
}

// update subtracts l times the pivot row's entries right of column k (pc, pv)
// from row r, whose entry in column k is at index i: a + (−l)·u where both
// have an entry, (−l)·u where only the pivot row has one (0 + x is x).
func (m *sparseLU) update(r, i int, l float64, pc []int, pv []float64, k int) {
	rc, rv := m.rc[r], m.rv[r]
	// Without fill the row is updated in place. The pivot row's columns are
	// looked up by bisection: a row that gathers the fill of many stages
	// (a supply rail's) is long, the pivot row short.
	m.hit = m.hit[:0]
	missing := false
	for a, b := i+1, 0; b < len(pc); b++ {
		a += sort.SearchInts(rc[a:], pc[b])
		m.hit = append(m.hit, a) // where pc[b] is or would go
		if a < len(rc) && rc[a] == pc[b] {
			a++
		} else {
			missing = true
		}
	}
	if !missing {
		for b, a := range m.hit {
			rv[a] += -l * pv[b]
		}
		m.next[r] = i + 1
		return
	}
	// Fill: the row is merged in scratch, its stretches between the pivot
	// row's columns copied whole, then put back in place when its room
	// allows, else at the end of the arena with as much room again (a
	// supply rail's row collects fill from every stage).
	m.filled = true
	tc, tv := append(m.tmpC[:0], rc[:i+1]...), append(m.tmpV[:0], rv[:i+1]...)
	from := i + 1
	for b, a := range m.hit {
		tc, tv = append(tc, rc[from:a]...), append(tv, rv[from:a]...)
		if a < len(rc) && rc[a] == pc[b] {
			tc, tv = append(tc, rc[a]), append(tv, rv[a]+-l*pv[b])
			from = a + 1
		} else {
			tc, tv = append(tc, pc[b]), append(tv, -l*pv[b])
			m.colOf[pc[b]] = append(m.colOf[pc[b]], r)
			from = a
		}
	}
	tc, tv = append(tc, rc[from:]...), append(tv, rv[from:]...)
	m.tmpC, m.tmpV = tc, tv
	n := len(tc)
	if n <= cap(rc) {
		m.rc[r], m.rv[r] = rc[:n], rv[:n]
		copy(m.rc[r], tc)
		copy(m.rv[r], tv)
	} else {
		// Rows are cut with their room closed, so appending to the arena
		// never writes into one; a row cut before the arena moved keeps its
		// old backing array.
		a := len(m.arenaC)
		m.arenaC = append(append(m.arenaC, tc...), make([]int, n)...)
		m.arenaV = append(append(m.arenaV, tv...), make([]float64, n)...)
		m.rc[r], m.rv[r] = m.arenaC[a:a+n:a+2*n], m.arenaV[a:a+n:a+2*n]
	}
	m.next[r] = i + 1
}

// solve overwrites b with the solution, as Dgetrs does.
func (m *sparseLU) solve(b []float64) {
	n := m.n
	for k := 0; k < n; k++ {
		if p := m.ipiv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
	for i := 0; i < n; i++ {
		r := m.at[i]
		for e, c := range m.rc[r] {
			if c >= i {
				break
			}
			if v := m.rv[r][e]; v != 0 {
				b[i] += -v * b[c]
			}
		}
	}
	for i := n - 1; i >= 0; i-- {
		r := m.at[i]
		c, v := m.rc[r], m.rv[r]
		e := 0
		for e < len(c) && c[e] < i {
			e++
		}
		d := v[e] // the pivot: present, as the factorisation succeeded
		for e++; e < len(c); e++ {
			if v[e] != 0 {
				b[i] += -v[e] * b[c[e]]
			}
		}
		b[i] *= 1 / d
	}
}

// pivot is |U's diagonal| at position k, as the dense factorisation leaves it.
func (m *sparseLU) pivot(k int) float64 {
	r := m.at[k]
	for e, c := range m.rc[r] {
		if c == k {
			return math.Abs(m.rv[r][e])
		}
	}
	return 0
}
