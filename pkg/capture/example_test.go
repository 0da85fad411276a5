package capture_test

import (
	"context"
	"errors"
	"io"
	"log"
	"time"

	"github.com/auscult/auscult/pkg/capture"
)

// Listening to the contact microphone on pump P-492B at the Obrinvale
// raw-water lift station: log every diagnostic, hand blocks to the
// analysis, and stop cleanly. (Not run: it needs a microphone.)
func Example() {
	c, err := capture.New(capture.Config{Device: "USB Contact Mic", Rate: 16000, Channels: 2, Channel: 1})
	if errors.Is(err, capture.ErrNoLiveCapture) {
		log.Fatal(err) // a build without cgo: use a WAV file or stdin instead
	}
	if err != nil {
		log.Fatal(err) // the message lists the input devices there are
	}
	logged := make(chan struct{})
	go func() {
		defer close(logged)
		for d := range c.Diagnostics() { // closed when capture ends
			log.Printf("P-492B: %v", d)
		}
	}()

	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	block := make([]int16, 1600)
	for {
		n, err := c.ReadContext(ctx, block)
		if err != nil {
			break // context.DeadlineExceeded here; io.EOF after Close
		}
		_ = block[:n] // analyse
	}

	closeCtx, cancelClose := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancelClose()
	if err := c.Close(closeCtx); err != nil {
		log.Print(err)
	}
	for { // drain what was captured before Close
		if _, err := c.Read(block); err == io.EOF {
			break
		}
	}
	<-logged
	log.Printf("P-492B: %+v", c.Stats())
}
