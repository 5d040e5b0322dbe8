module github.com/almanac-go/almanac/examples

go 1.26.0

require github.com/almanac-go/almanac v0.0.0

replace github.com/almanac-go/almanac => ../
