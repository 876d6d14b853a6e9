// Command narrows finds where a road network fails the trips people make.
package main

import (
	"fmt"
	"os"
)

func main() {
	fmt.Fprintln(os.Stderr, "narrows: under construction")
	os.Exit(2)
}
