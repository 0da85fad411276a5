package audio

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"testing"
	"time"
)

var (
	_ Source = (*Paced)(nil)
	_ Clock  = WallClock{}
)

// fakeClock is a Clock whose time moves only when Sleep (or the test) says
// so; it records every sleep.
type fakeClock struct {
	now   time.Time
	slept []time.Duration
}

func (c *fakeClock) Now() time.Time { return c.now }

func (c *fakeClock) Sleep(d time.Duration) {
	if d <= 0 {
		panic("Paced asked for a sleep of " + d.String())
	}
	c.slept = append(c.slept, d)
	c.now = c.now.Add(d)
}

func (c *fakeClock) total() time.Duration {
	var t time.Duration
	for _, d := range c.slept {
		t += d
	}
	return t
}

// TestPacedWaits replays N seconds of audio on a fake clock and checks
// how long Paced asked it to wait in total and per Read.
func TestPacedWaits(t *testing.T) {
	cases := []struct {
		name    string
		rate    int
		seconds int
		speed   float64
		block   func(i int) int           // samples asked for in Read i
		stall   func(i int) time.Duration // consumer time spent after Read i; nil for none
		want    time.Duration             // total sleep
	}{
		{"real time, 100 ms blocks", 16000, 10, 1, fixed(1600), nil, 10 * time.Second},
		{"real time, odd blocks", 16000, 10, 1, func(i int) int { return 1 + i*7919%4000 }, nil, 10 * time.Second},
		{"speed 60", 16000, 60, 60, fixed(1600), nil, time.Second},
		{"speed 0.5 (slow motion)", 8000, 3, 0.5, fixed(1000), nil, 6 * time.Second},
		{"44.1 kHz, block not a whole number of ms", 44100, 5, 1, fixed(1000), nil, 5 * time.Second},
		{"unpaced", 16000, 10, 0, fixed(1600), nil, 0},
		// 30 ms of work after each of the 100 data Reads; the work after
		// the last one precedes only the Read that returns EOF
		{"consumer work counts as waiting", 16000, 10, 1, fixed(1600), every(30 * time.Millisecond), 10*time.Second - 99*30*time.Millisecond},
		// 0.5 s late once: Paced catches up by not sleeping 0.5 s in total
		{"short stall is caught up", 16000, 10, 1, fixed(1600), once(49, 500*time.Millisecond), 10*time.Second - 500*time.Millisecond},
		// 5 s late once: Paced restarts its schedule, so the rest is
		// waited in full and the 5 s are not made up by rushing
		{"long stall restarts the schedule", 16000, 10, 1, fixed(1600), once(49, 5*time.Second), 10 * time.Second},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			clock := &fakeClock{now: time.Date(2031, 3, 14, 2, 0, 0, 0, time.UTC)}
			total := c.rate * c.seconds
			p, err := NewPaced(NewSliceSource(c.rate, make([]int16, total)), c.speed, clock)
			if err != nil {
				t.Fatal(err)
			}
			if p.Rate() != c.rate {
				t.Errorf("Rate %d, want %d", p.Rate(), c.rate)
			}
			buf := make([]int16, 8192)
			got := 0
			for i := 0; ; i++ {
				before := clock.total()
				n, err := p.Read(buf[:c.block(i)])
				got += n
				if err == io.EOF {
					break
				}
				if err != nil {
					t.Fatal(err)
				}
				// Without consumer time, each Read waits exactly for its
				// own samples: the wait is spread, not bunched.
				if c.speed > 0 && c.stall == nil {
					want := time.Duration(float64(n) * float64(time.Second) / (float64(c.rate) * c.speed))
					if d := clock.total() - before; absDur(d-want) > time.Microsecond {
						t.Fatalf("Read %d of %d samples waited %v, want %v", i, n, d, want)
					}
				}
				if c.stall != nil {
					clock.now = clock.now.Add(c.stall(i))
				}
			}
			if got != total {
				t.Fatalf("read %d samples, want %d", got, total)
			}
			if d := clock.total() - c.want; absDur(d) > time.Microsecond {
				t.Errorf("waited %v in total, want %v", clock.total(), c.want)
			}
		})
	}
}

func fixed(n int) func(int) int { return func(int) int { return n } }

func every(d time.Duration) func(int) time.Duration {
	return func(i int) time.Duration {
		if i < 0 {
			return 0
		}
		return d
	}
}

func once(at int, d time.Duration) func(int) time.Duration {
	return func(i int) time.Duration {
		if i == at {
			return d
		}
		return 0
	}
}

func absDur(d time.Duration) time.Duration {
	if d < 0 {
		return -d
	}
	return d
}

func TestPacedArguments(t *testing.T) {
	cases := []struct {
		name  string
		rate  int
		speed float64
		want  error
		text  string
	}{
		{"real time", 16000, 1, nil, ""},
		{"unpaced", 16000, 0, nil, ""},
		{"negative", 16000, -1, ErrSpeed, "audio: replay speed out of range: -1, want 0 (unpaced)"},
		{"NaN", 16000, math.NaN(), ErrSpeed, "NaN"},
		{"infinite", 16000, math.Inf(1), ErrSpeed, "+Inf"},
		{"source without a rate", 0, 1, ErrSampleRate, "source rate 0 Hz"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewPaced(NewSliceSource(c.rate, nil), c.speed, nil)
			if !errors.Is(err, c.want) || (c.want == nil) != (err == nil) {
				t.Fatalf("error %v, want %v", err, c.want)
			}
			if err != nil && !strings.Contains(err.Error(), c.text) {
				t.Errorf("error %q does not contain %q", err, c.text)
			}
		})
	}
}

// TestPacedPassesErrors checks that a failing source's samples are still
// paced and its error is passed on unchanged.
func TestPacedPassesErrors(t *testing.T) {
	boom := errors.New("disk gone")
	clock := &fakeClock{}
	p, err := NewPaced(&errAfter{n: 800, err: boom}, 1, clock)
	if err != nil {
		t.Fatal(err)
	}
	n, err := p.Read(make([]int16, 1000))
	if n != 800 || err != boom {
		t.Fatalf("Read: %d, %v; want 800, %v", n, err, boom)
	}
	if clock.total() != 100*time.Millisecond {
		t.Errorf("waited %v for 800 samples at 8 kHz, want 100ms", clock.total())
	}
}

// errAfter is an 8 kHz source that returns n zero samples together with err.
type errAfter struct {
	n   int
	err error
}

func (e *errAfter) Rate() int { return 8000 }

func (e *errAfter) Read(p []int16) (int, error) {
	n := min(e.n, len(p))
	clear(p[:n])
	e.n -= n
	return n, e.err
}

func TestPacedReadDoesNotAllocate(t *testing.T) {
	p, err := NewPaced(&loopSource{rate: 16000, s: testSignal(4000, 1)}, 1, &stepClock{})
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]int16, 160)
	if a := testing.AllocsPerRun(100, func() { p.Read(buf) }); a != 0 {
		t.Errorf("%v allocations per Read", a)
	}
}

// stepClock is a Clock that advances by each Sleep without recording it.
type stepClock struct{ now time.Time }

func (c *stepClock) Now() time.Time        { return c.now }
func (c *stepClock) Sleep(d time.Duration) { c.now = c.now.Add(d) }

// Replaying two seconds of a recording from the Obrinvale raw-water lift
// station at 60 times real time asks the clock to wait 2/60 s.
func ExampleNewPaced() {
	clock := &fakeClock{}
	src, err := NewPaced(NewSliceSource(16000, make([]int16, 32000)), 60, clock)
	if err != nil {
		panic(err)
	}
	p := make([]int16, 1600)
	for {
		if _, err := src.Read(p); err != nil {
			break
		}
	}
	fmt.Println(clock.total().Round(time.Microsecond))
	// Output: 33.333ms
}
