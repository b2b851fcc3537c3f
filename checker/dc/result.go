// Package dc finds the DC operating point of a circuit by modified nodal
// analysis with Newton iteration, exactly as FORMAT.md §6 defines the model.
package dc

// Result is the operating point at one case (nominal or a corner). All values
// are SI base units; BJT figures are magnitudes so that a PNP reads like an NPN.
type Result struct {
	TempC float64            // ambient the case was solved at, °C
	VT    float64            // thermal voltage k·T/q, V
	V     map[string]float64 // node voltage of every net, gnd included (0), V
	Parts map[string]*Part   // every part but transistors, by reference
	BJTs  map[string]*BJT    // every transistor, by reference
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
}

// Failure explains why no operating point was found; the bias.region rule
// reports it. Net or Part names the place when one can be named.
type Failure struct {
	Reason string
	Net    string
	Part   string
}

func (f *Failure) Error() string { return f.Reason }
