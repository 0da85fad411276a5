//go:build race && cgo

package capture

// raceBuild is true in a -race build; see runsHere.
const raceBuild = true
