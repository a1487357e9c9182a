package smallsignal

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"tangent/cases"
)

// Export writes a linear circuit as a case file that tangent reads back:
// its parts (resistors, capacitors, controlled and independent sources;
// no device), ports and transfers. Numbers are written as plain SI TOML
// numbers with the shortest representation that reads back to the same
// float64, so the G and C matrices of the file read back are bit-for-bit
// those of c. A part whose value has no finite representation is an error.
func Export(w io.Writer, c *cases.Circuit, header string) error {
	var b strings.Builder
	for _, line := range strings.Split(strings.TrimRight(header, "\n"), "\n") {
		if line != "" {
			fmt.Fprintf(&b, "# %s\n", line)
		}
	}
	if c.Title != "" {
		fmt.Fprintf(&b, "title = %s\n", quote(c.Title))
	}
	fmt.Fprintf(&b, "temperature = \"%s K\"\n", num(c.Temperature))
	for _, p := range c.Parts {
		if cases.IsDevice(p.Kind) {
			return fmt.Errorf("smallsignal: export: %s is a %s, not a linear part", p.Name, p.Kind)
		}
		fmt.Fprintf(&b, "\n[parts.%s]\nkind = %s\n", key(p.Name), quote(string(p.Kind)))
		for i, t := range cases.Terminals(p.Kind) {
			fmt.Fprintf(&b, "%s = %s\n", t, quote(p.Nodes[i]))
		}
		if err := writeValues(&b, p); err != nil {
			return err
		}
	}
	for _, p := range c.Ports {
		fmt.Fprintf(&b, "\n[ports.%s]\n", key(p.Name))
		if p.Source != "" {
			fmt.Fprintf(&b, "source = %s\n", quote(p.Source))
			continue
		}
		fmt.Fprintf(&b, "plus = %s\nminus = %s\n", quote(p.Plus), quote(p.Minus))
	}
	for _, t := range c.Transfers {
		fmt.Fprintf(&b, "\n[[transfer]]\nfrom = %s\nto = %s\nkind = %s\n", quote(t.From), quote(t.To), quote(string(t.Kind)))
		if s := t.Sweep; s != nil {
			fmt.Fprintf(&b, "sweep = { start = %s, stop = %s, points_per_decade = %d }\n", num(s.Start), num(s.Stop), s.PointsPerDecade)
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func writeValues(b *strings.Builder, p *cases.Part) error {
	finite := func(name string, v float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("smallsignal: export: %s: %s is %g", p.Name, name, v)
		}
		return nil
	}
	switch p.Kind {
	case cases.VoltageSource, cases.CurrentSource:
		// Incremental circuit: the DC values are spent on the bias point.
		fmt.Fprintf(b, "dc = 0\n")
		if p.AC != 0 {
			fmt.Fprintf(b, "ac = %s\nac_phase = %s\n", num(p.AC), num(p.ACPhase*180/math.Pi))
		}
		return nil
	case cases.CCCS, cases.CCVS:
		fmt.Fprintf(b, "control = %s\n", quote(p.Control))
	}
	if err := finite("value", p.Value); err != nil {
		return err
	}
	keyName := map[cases.Kind]string{
		cases.VCVS: "gain", cases.VCCS: "transconductance",
		cases.CCCS: "gain", cases.CCVS: "transresistance",
	}[p.Kind]
	if keyName == "" {
		keyName = "value"
	}
	fmt.Fprintf(b, "%s = %s\n", keyName, num(p.Value))
	return nil
}

// num writes a float64 as a TOML number that reads back exactly.
func num(v float64) string {
	s := strconv.FormatFloat(v, 'g', -1, 64)
	if !strings.ContainsAny(s, ".eEn") { // TOML floats need a dot or exponent
		s += ".0"
	}
	return s
}

func quote(s string) string { return strconv.Quote(s) }

// key writes a TOML key, bare when it can be.
func key(s string) string {
	for _, r := range s {
		if !(r == '_' || r == '-' || r >= '0' && r <= '9' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z') {
			return quote(s)
		}
	}
	return s
}
