package dc

// Result is the operating point at one case (nominal or a corner). All values
// are SI base units; BJT figures are magnitudes so that a PNP reads like an NPN.
type Result struct {
	TempC float64            // ambient the case was solved at, °C
	VT    float64            // thermal voltage k·T/q, V
	V     map[string]float64 // node voltage of every net, gnd included (0), V
	Parts map[string]*Part   // every part but transistors, by reference
	BJTs  map[string]*BJT    // every transistor, by reference
	FETs  map[string]*FET    // every field-effect transistor, by reference (fet.go)
	// SupplyCurrent is the current each supply delivers out of its net, A.
	SupplyCurrent map[string]float64
	Iterations    int    // Newton iterations of the successful attempt
	Method        string // "newton", "gmin-stepping" or "source-stepping"
}

// Part is the DC state of one passive part.
type Part struct {
	Current  float64            // resistor, inductor: signed, from Nets[0] to Nets[1], A
	Power    float64            // resistor, potentiometer (both sections): dissipation, W
	Voltage  float64            // capacitor: |V(Nets[0]) − V(Nets[1])|, V
	Sections [2]Section         // potentiometer: [a–wiper, wiper–b]
	Windings map[string]float64 // transformer: winding current from its first net to its second, A
}

// Section is one side of a potentiometer's track.
type Section struct {
	R       float64 // Ω, at least 1 mΩ
	Current float64 // A, signed from the section's first terminal (a, then wiper)
	Power   float64 // W
}

// BJT is a transistor's operating point.
type BJT struct {
	IC     float64 // |collector current|, A
	IB     float64 // |base current|, A
	VBE    float64 // |V(base) − V(emitter)|, V
	VCE    float64 // |V(collector) − V(emitter)|, V
	Power  float64 // VCE·IC + VBE·IB, W
	HFE    float64 // the forward beta βF used
	IS     float64 // saturation current at the case's temperature, A
	Region string  // "cutoff" (IC < 1 µA, tested first), "saturated" (VCE < 0.3 V) or "active"

	// The same four figures in the device's forward sense: as measured for an
	// NPN, every sign mirrored for a PNP, so a forward-active stage of either
	// polarity has all four positive. They keep the sign the magnitudes lose:
	// the AC model needs it (gm = IC/VT, 0 when IC ≤ 0) and Region and Power are
	// computed from them (Power is then the true dissipation in any state).
	ICf  float64 // A, positive into an NPN's collector, out of a PNP's
	IBf  float64 // A, positive into an NPN's base, out of a PNP's
	VBEf float64 // V, V(base) − V(emitter) for an NPN, V(emitter) − V(base) for a PNP
	VCEf float64 // V, V(collector) − V(emitter) for an NPN, the reverse for a PNP
	// VBJf is VBEf at the junction: from the internal base b' (behind rb) to
	// the emitter, VBEf − IBf·rb. It equals VBEf when rb = 0.
	VBJf float64 // V
}

// Failure explains why no operating point was found. Cause says which rule
// reports it: a connectivity failure (a loop of zero-resistance windings or
// inductors, a supply shorted to gnd or to another supply) belongs to
// net.connectivity, everything else to bias.region. Net or Part names the place
// when one can be named; Parts lists every part involved.
type Failure struct {
	Reason string
	Net    string
	Part   string
	Cause  Cause
	Parts  []string // every part named by Reason, Part first; windings as REF.WINDING
}

// Cause classifies a Failure.
type Cause string

// The causes of a Failure.
const (
	// Connectivity: the network has no unique DC solution by its topology
	// alone (zero-resistance loop, shorted ideal supplies).
	Connectivity Cause = "connectivity"
	// Singular: the linearised network could not be solved.
	Singular Cause = "singular"
	// NoConvergence: Newton iteration and both fall-backs failed.
	NoConvergence Cause = "no-convergence"
	// Overdriven: a junction is forward-biased by a path with (next to) no
	// resistance, e.g. a supply straight across base and emitter, so the
	// model's current has no bound.
	Overdriven Cause = "overdriven"
	// Invalid: a value the loader should have rejected (zero resistance,
	// missing transistor figures, wrong number of nets).
	Invalid Cause = "invalid"
)

func (f *Failure) Error() string { return f.Reason }

// Reversed reports whether the transistor conducts backwards: its
// collector below its emitter (in the NPN sense) and a current of at least
// the cut-off threshold flowing out of the collector. A transistor wired
// with collector and emitter swapped works like this (reverse active, with
// the small reverse beta); its Region is "cutoff" by FORMAT.md's test on the
// forward-sense IC.
func (b *BJT) Reversed() bool { return b.VCEf < 0 && b.ICf <= -cutoffIC }
