// Command levelpath plans the vertical profile of a flight along a fixed
// route: initial cruise level, step points and Mach, with every leg kept
// above the buffet protection floor and under the thrust-limited and
// certified ceilings.
//
// It is a planning aid, not certified for operational use.
package main

import (
	"os"
)

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}
