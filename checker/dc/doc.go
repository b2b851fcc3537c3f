// Package dc finds the DC operating point of a circuit by modified nodal
// analysis with Newton iteration, exactly as FORMAT.md §6 defines the model.
//
// How it solves (the choices FORMAT.md leaves open):
//
//   - Unknowns are the net voltages and the currents of branches: ideal
//     supplies, inductors and windings without resistance (0 V branches), and
//     every resistance under 1 Ω (a supply impedance, a potentiometer at its
//     end stop, a winding's DC resistance). Stamping a milliohm as a 1000 S
//     conductance would drown the 1e-12 S that is all that holds a floating
//     net beside it; as a branch it leaves every row well scaled. The model is
//     the same either way.
//   - Before any iteration, the zero-resistance edges (ideal supplies,
//     resistance-less inductors and windings) are checked for loops: a loop
//     has no defined current and is reported as a Connectivity failure naming
//     every part on it. A transistor junction held forward beyond about 2 V by
//     such edges alone is reported as Overdriven: its model current has no
//     bound.
//   - Newton–Raphson linearises each transistor at junction voltages limited
//     the way classic circuit-simulation programs limit a pn junction, and starts every
//     base-emitter junction at its critical voltage. An iteration has
//     converged when no junction was limited and every unknown moved less than
//     1e-7 relative (1 nV, 1 pA absolute), with every junction within 0.1 µV
//     of where it was linearised; or, for nets so badly conditioned that their
//     voltage wanders from solve to solve, when KCL already balances at every
//     net to 1e-9 of the currents through it or to what double precision can
//     resolve there.
//   - When plain Newton fails (100 iterations), gmin stepping adds a shunt
//     from every net to gnd, from 10 mS down to nothing, then source stepping
//     raises every supply from 0 to its value, each with adaptive steps and a
//     bounded number of them. The method that succeeded is in Result.Method.
//   - Region and power use the forward-sense figures (BJT.ICf …): a
//     reverse-conducting transistor is "cutoff", and Power is the true
//     dissipation Σ V·I over the terminals, which equals VCE·IC + VBE·IB for
//     any forward-active stage.
//   - Field-effect transistors (fet.go, docs/fet.md) stamp their square-law
//     channel, and a JFET's gate diodes, linearised at a bias whose Newton
//     step is limited per FET; a dual gate's internal node is solved inside
//     the device, so the unknowns stay the nets and branch currents.
//   - The linear solves use gonum's LAPACK LU with partial pivoting.
//   - Plan (plan.go) solves the worst-case search's cases of one circuit on
//     the netlist and matrix pattern compiled once (a case's values are
//     written by compile's own walk, walk.go), with Solve's arithmetic
//     and therefore its answers to the bit; optionally (warm) from the
//     nominal operating point, which saves about 60 % of the iterations but
//     moves the answers in their last bits.
package dc
