package main

import (
	"fmt"

	"github.com/auscult/auscult/pkg/config"
	"github.com/auscult/auscult/pkg/publish"
)

// brokerLine is one broker's line in `auscult check`.
type brokerLine struct {
	text string
	ok   bool
}

// checkBroker connects to each configured broker with the configured
// credentials and TLS and disconnects: the link check of `auscult check`.
// One broker of a fail-over list that answers is enough to pass, since the
// agent then has a path for its messages; each line says how each did.
func checkBroker(cfg config.Config) ([]brokerLine, error) {
	pw, err := brokerPassword(cfg.MQTT)
	if err != nil {
		return nil, err
	}
	m := cfg.MQTT
	res, err := publish.Probe(publish.Config{URLs: m.Brokers(), ClientID: m.ClientID, Username: m.Username, Password: pw,
		TLS:  publish.TLSFiles{CAFile: m.TLS.CAFile, CertFile: m.TLS.CertFile, KeyFile: m.TLS.KeyFile, ServerName: m.TLS.ServerName},
		Site: "check", Asset: cfg.Asset, ConnectTimeout: seconds(m.ConnectTimeoutS)})
	if err != nil {
		return nil, err
	}
	var out []brokerLine
	anyOK := false
	for _, r := range res {
		if r.Err != nil {
			out = append(out, brokerLine{text: fmt.Sprintf("%s: FAIL %v", r.URL, r.Err)})
			continue
		}
		anyOK = true
		out = append(out, brokerLine{text: fmt.Sprintf("%s: connected in %d ms", r.URL, r.Took.Milliseconds()), ok: true})
	}
	if anyOK {
		for i := range out {
			out[i].ok = true
		}
	}
	return out, nil
}
