// Package topology derives the facts of a circuit that depend only on how it
// is wired, never on part values: which nets are rails and AC ground, the role
// of every capacitor and inductor, each transistor's return and feed rail,
// and the wiring mistakes net.connectivity reports. The definitions are those
// of RULES.md ("Roles", the rail and DC-path paragraph, net.connectivity).
// Because values never enter, a circuit is analysed once and the result is
// shared by the nominal case and every worst-case corner.
//
// Where RULES.md leaves room, this package reads it so:
//
//   - Walks never continue through a rail: a rail is where a path ends.
//   - Bypass row: the capacitor's own net counts as crossed, so a net that
//     touches a base or collector (and no emitter) starts no walk; an emitter
//     sitting on a rail is not "reached".
//   - Tank row: "AC ground" means gnd or a supply net, as the table says;
//     the capacitor's own role does not matter.
//   - Return rail: the emitter net itself may touch other transistors (a
//     long-tailed pair); only nets beyond it may not. When resistors alone
//     reach no rail (an emitter choke, the upper device of a cascode), any DC
//     path other than the transistor itself is used instead, and
//     BJT.ReturnByResistors says so.
//   - Feed rail: a collector on a rail feeds from it; when several rails are
//     reached, an NPN takes the highest EMF and a PNP the lowest.
//   - Inductive feed: the path may end on any rail (not only the feed rail),
//     must be a simple path (an inductor reached by going there and back
//     carries no DC), and may run through other transistors' C–E paths.
//   - net.connectivity: a short is reported once per supply, whatever the
//     supply's impedance; each independent zero-resistance loop once, naming
//     its first member in file order; floating transistor terminals once per
//     net, and not on a net already reported as having one connection. A DC
//     path never runs through a base–emitter junction, so a Darlington
//     without a bleeder resistor has its driver's emitter reported.
package topology
