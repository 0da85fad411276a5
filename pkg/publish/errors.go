package publish

import "errors"

// ErrConfig is returned by New when the configuration cannot work; the
// message names the field.
var ErrConfig = errors.New("publish: invalid config")
