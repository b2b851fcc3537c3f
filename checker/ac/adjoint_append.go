package ac

import "fmt"

// BranchesAppend is Branches with the transfers appended to dst, so that a
// caller walking every part at every band point (the noise analysis) reuses
// one buffer instead of allocating one per part; d is the element's own
// matrix, as Branches gives it.
func (a *Adjoint) BranchesAppend(dst []complex128, ref string) (h, d []complex128, err error) {
	i, ok := a.nw.parts[ref]
	if !ok {
		return dst, nil, fmt.Errorf("no part %q in the circuit", ref)
	}
	for _, b := range a.nw.elems[i].branches {
		dst = append(dst, across(a.z, b))
	}
	return dst, a.d[i], nil
}
