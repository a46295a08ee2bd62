package chart_test

import (
	"fmt"

	"arcfit/cmd/arcfit/chart"
)

// The format of a chart file comes from its extension.
func ExampleFormatOf() {
	f, err := chart.FormatOf("tonight.PNG")
	fmt.Println(f, err)
	_, err = chart.FormatOf("tonight.jpg")
	fmt.Println(err)
	// Output:
	// png <nil>
	// chart: unknown chart format ".jpg" in tonight.jpg; want .png or .svg
}
