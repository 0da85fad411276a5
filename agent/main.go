// Command auscult listens to a machine and tells when it sounds wrong.
package main

import (
	"fmt"
	"os"
)

func main() {
	fmt.Fprintln(os.Stderr, "auscult: not built yet")
	os.Exit(2)
}
