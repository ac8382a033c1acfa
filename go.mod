module headroom

go 1.26.8

require (
	github.com/biogo/hts v1.4.5 // indirect
	github.com/spf13/pflag v1.1.0 // indirect
	gonum.org/v1/gonum v0.17.0 // indirect
)
