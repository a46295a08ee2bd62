// Command arcfit fits the motion of a moving object (an asteroid, a comet)
// to timed RA/Dec measurements and says where to point on a given night.
// Run "arcfit --help" for the commands.
package main

import "os"

func main() {
	os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}
