module github.com/auscult/auscult

go 1.26.8

require (
	github.com/mjibson/go-dsp v0.0.0-20180508042940-11479a337f12 // indirect
	go.etcd.io/bbolt v1.5.0 // indirect
	golang.org/x/sys v0.45.0 // indirect
	gonum.org/v1/gonum v0.17.0 // indirect
)
