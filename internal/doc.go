// Package internal groups numerics and test helpers shared by almanac's
// packages. Nothing under internal/ is part of the public API.
package internal
