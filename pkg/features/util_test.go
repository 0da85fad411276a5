package features

import "strconv"

// itoa names subtests.
func itoa(i int) string { return strconv.Itoa(i) }
