package devices

// Region names, as used in the JSON output.
const (
	RegionForward       = "forward"        // diode
	RegionReverse       = "reverse"        // diode
	RegionBreakdown     = "breakdown"      // diode
	RegionForwardActive = "forward_active" // bjt
	RegionSaturation    = "saturation"     // bjt, mosfet
	RegionCutoff        = "cutoff"         // bjt, mosfet
	RegionReverseActive = "reverse_active" // bjt
	RegionTriode        = "triode"         // mosfet
)
