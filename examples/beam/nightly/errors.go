package nightly

import "errors"

// ErrOption reports pipeline options that cannot be used (an unknown
// model or reconciliation method, a bad horizon or level, ...). Build
// returns it before any data is read; problems with the data never stop
// the pipeline but go to the dead-letter file.
var ErrOption = errors.New("nightly: invalid option")
