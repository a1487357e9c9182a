package cases

import "testing"

// BenchmarkParse measures decoding and validating the default example,
// including a trial build of each of its variants.
func BenchmarkParse(b *testing.B) {
	src, err := ExampleSource(DefaultExample)
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := Parse("bench.toml", src); err != nil {
			b.Fatal(err)
		}
	}
}
