module github.com/auscult/auscult

go 1.26.8

require (
	github.com/chromedp/cdproto v0.159.0
	github.com/chromedp/chromedp v0.23.0
	github.com/coreos/go-systemd/v22 v22.7.0
	github.com/eclipse/paho.mqtt.golang v1.5.1
	github.com/gordonklaus/portaudio v0.0.0-20250206071425-98a94950218b
	github.com/mjibson/go-dsp v0.0.0-20180508042940-11479a337f12
	github.com/santhosh-tekuri/jsonschema/v6 v6.0.2
	go.etcd.io/bbolt v1.4.3
	go.yaml.in/yaml/v3 v3.0.4
	golang.org/x/text v0.29.0
	gonum.org/v1/gonum v0.17.0
)

require (
	github.com/go-json-experiment/json v0.0.0-20260213210345-44df1a37e875 // indirect
	github.com/gorilla/websocket v1.5.3 // indirect
	golang.org/x/net v0.44.0 // indirect
	golang.org/x/sync v0.17.0 // indirect
	golang.org/x/sys v0.36.0 // indirect
)
