package main

import (
	"fmt"
	"os"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"
)

// brokerTimeout bounds the broker link check.
const brokerTimeout = 5 * time.Second

// checkBroker connects to the broker at url with a throw-away client id and
// disconnects: the link check of `auscult check`.
func checkBroker(url string) (string, error) {
	host, _ := os.Hostname()
	opts := mqtt.NewClientOptions().AddBroker(url).SetClientID(fmt.Sprintf("auscult-check-%s-%d", host, os.Getpid())).
		SetConnectTimeout(brokerTimeout).SetAutoReconnect(false).SetConnectRetry(false).SetCleanSession(true)
	c := mqtt.NewClient(opts)
	start := time.Now()
	tok := c.Connect()
	if !tok.WaitTimeout(brokerTimeout + time.Second) {
		return "", fmt.Errorf("%s: no answer within %v", url, brokerTimeout)
	}
	if err := tok.Error(); err != nil {
		return "", fmt.Errorf("%s: %w", url, err)
	}
	took := time.Since(start)
	c.Disconnect(100)
	return fmt.Sprintf("%s: connected in %d ms", url, took.Milliseconds()), nil
}
