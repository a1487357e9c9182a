package cases

import (
	"embed"
	"fmt"
	"io/fs"

	"slices"
	"strings"
)

// DefaultExample is the example a subcommand runs when no file is given: an
// npn common-emitter stage.
const DefaultExample = "ce_amplifier"

//go:embed examples/*.toml
var exampleFS embed.FS

// Examples returns the names of the embedded example cases, sorted.
func Examples() []string {
	entries, _ := fs.ReadDir(exampleFS, "examples")
	var names []string
	for _, e := range entries {
		if n, ok := strings.CutSuffix(e.Name(), ".toml"); ok {
			names = append(names, n)
		}
	}
	slices.Sort(names)
	return names
}

// ExampleSource returns the TOML text of the named example.
func ExampleSource(name string) ([]byte, error) {
	if !slices.Contains(Examples(), name) {
		return nil, fmt.Errorf("cases: no example named %q%s (examples: %s)", name, suggest(name, Examples()), strings.Join(Examples(), ", "))
	}
	return exampleFS.ReadFile("examples/" + name + ".toml")
}

// Example parses the named example. Its File is "example:NAME".
func Example(name string) (*Circuit, error) {
	src, err := ExampleSource(name)
	if err != nil {
		return nil, err
	}
	return Parse(ExampleFile(name), src)
}

// ExampleFile is the name an example carries in messages: "example:NAME".
func ExampleFile(name string) string { return "example:" + name }
