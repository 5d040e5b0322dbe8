module github.com/almanac-go/almanac

go 1.26.0

require (
	github.com/google/go-cmp v0.7.0
	gonum.org/v1/gonum v0.17.0
)

require golang.org/x/tools v0.52.1-0.20261106145633-d407941a339a // indirect
