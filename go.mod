module kerrscope

go 1.26.8

require (
	github.com/lucasb-eyer/go-colorful v1.4.1
	gonum.org/v1/gonum v0.17.0
)
