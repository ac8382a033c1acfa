// Command headroom predicts how many more distinct molecules or taxa deeper
// sequencing would find. See README.md and `headroom --help`.
package main

import "os"

func main() {
	os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr))
}
