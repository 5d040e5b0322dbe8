module github.com/almanac-go/almanac/examples

go 1.26.0

require github.com/almanac-go/almanac v0.0.0

require (
	golang.org/x/tools v0.52.1-0.20261106145633-d407941a339a // indirect
	gonum.org/v1/gonum v0.17.0 // indirect
)

replace github.com/almanac-go/almanac => ../
