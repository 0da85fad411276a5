package store

import (
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
	"time"
)

func TestEventRoundTrip(t *testing.T) {
	s := mustOpen(t, testOptions())
	cases := []struct {
		name string
		e    Event
	}{
		{"alarm with values", eventAt(t0, 0)},
		{"bare state change", Event{Time: t0.Add(time.Minute), Kind: EventState, Code: "machine_stopped"}},
		{"diagnostic with message", Event{Time: t0.Add(2 * time.Minute), Kind: EventDiagnostic, Code: "mic.silent",
			Asset: "P-492B", Message: "microphone silent for 30 s\ncheck the cable", Values: map[string]float64{"rms_dbfs": -120}}},
		{"zero score kept as zero", Event{Time: t0.Add(3 * time.Minute), Kind: EventAlarm, Code: "cleared", Score: 0, Threshold: 0.48}},
	}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			seq, err := s.AppendEvent(c.e)
			if err != nil {
				t.Fatal(err)
			}
			if seq != uint64(i+1) {
				t.Errorf("seq %d, want %d", seq, i+1)
			}
			got, err := s.Event(seq)
			if err != nil {
				t.Fatal(err)
			}
			want := c.e
			want.Seq = seq
			if !reflect.DeepEqual(got, want) {
				t.Errorf("read back\n%+v\nwant\n%+v", got, want)
			}
		})
	}
	if _, err := s.Event(99); !errors.Is(err, ErrNotFound) {
		t.Errorf("missing event: %v, want ErrNotFound", err)
	}
}

func TestEventTimeIsUTCMilliseconds(t *testing.T) {
	s := mustOpen(t, testOptions())
	local := time.Date(2026, 5, 11, 10, 0, 0, 123456789, time.FixedZone("CEST", 2*3600))
	seq, err := s.AppendEvent(Event{Time: local, Kind: EventState, Code: "agent_started"})
	if err != nil {
		t.Fatal(err)
	}
	got, _ := s.Event(seq)
	if want := time.Date(2026, 5, 11, 8, 0, 0, 123000000, time.UTC); !got.Time.Equal(want) || got.Time.Location() != time.UTC {
		t.Errorf("time %v, want %v in UTC", got.Time, want)
	}
}

func TestEventValidation(t *testing.T) {
	s := mustOpen(t, testOptions())
	mod := func(f func(e *Event)) Event {
		e := eventAt(t0, 0)
		f(&e)
		return e
	}
	cases := []struct {
		name string
		e    Event
		says string
	}{
		{"zero time", mod(func(e *Event) { e.Time = time.Time{} }), "zero time"},
		{"before 1970", mod(func(e *Event) { e.Time = time.Date(1969, 12, 31, 0, 0, 0, 0, time.UTC) }), "before 1970"},
		{"unknown kind", mod(func(e *Event) { e.Kind = "warning" }), `kind "warning"`},
		{"empty code", mod(func(e *Event) { e.Code = "" }), "code"},
		{"code with capitals", mod(func(e *Event) { e.Code = "Raised" }), "a-z"},
		{"code too long", mod(func(e *Event) { e.Code = strings.Repeat("x", 65) }), "1 to 64"},
		{"NaN score", mod(func(e *Event) { e.Score = math.NaN() }), "score is NaN"},
		{"infinite threshold", mod(func(e *Event) { e.Threshold = math.Inf(1) }), "threshold is +Inf"},
		{"control character in asset", mod(func(e *Event) { e.Asset = "P-492B\x00" }), "control character"},
		{"invalid UTF-8 message", mod(func(e *Event) { e.Message = "bad \xff" }), "UTF-8"},
		{"message too long", mod(func(e *Event) { e.Message = strings.Repeat("m", 1025) }), "at most 1024"},
		{"value key with unit in capitals", mod(func(e *Event) { e.Values = map[string]float64{"freq_Hz": 1} }), "values key"},
		{"NaN value", mod(func(e *Event) { e.Values = map[string]float64{"rms_dbfs": math.Inf(-1)} }), "values[rms_dbfs]"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := s.AppendEvent(c.e)
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.says) {
				t.Errorf("error %v, want ErrInvalid mentioning %q", err, c.says)
			}
		})
	}
	if st := mustStats(t, s); st.Events != 0 || st.NextEventSeq != 1 {
		t.Errorf("refused events changed the store: %d events, next seq %d", st.Events, st.NextEventSeq)
	}
}

func TestEventsQuery(t *testing.T) {
	s := mustOpen(t, testOptions())
	// 30 events one second apart; every third is a diagnostic, every
	// fifth concerns P-492A instead of P-492B.
	for i := 0; i < 30; i++ {
		e := eventAt(t0, i)
		if i%3 == 0 {
			e.Kind, e.Code = EventDiagnostic, "overrun"
		}
		if i%5 == 0 {
			e.Asset = "P-492A"
		}
		if _, err := s.AppendEvent(e); err != nil {
			t.Fatal(err)
		}
	}
	seqs := func(lo, hi int, keep func(i int) bool) []uint64 {
		var out []uint64
		for i := lo; i < hi; i++ {
			if keep == nil || keep(i) {
				out = append(out, uint64(i+1))
			}
		}
		return out
	}
	rev := func(x []uint64) []uint64 {
		for i, j := 0, len(x)-1; i < j; i, j = i+1, j-1 {
			x[i], x[j] = x[j], x[i]
		}
		return x
	}
	cases := []struct {
		name string
		q    EventQuery
		want []uint64
	}{
		{"all", EventQuery{}, seqs(0, 30, nil)},
		{"first page", EventQuery{Limit: 7}, seqs(0, 7, nil)},
		{"second page", EventQuery{AfterSeq: 7, Limit: 7}, seqs(7, 14, nil)},
		{"last partial page", EventQuery{AfterSeq: 28, Limit: 7}, seqs(28, 30, nil)},
		{"past the end", EventQuery{AfterSeq: 30}, nil},
		{"after max uint64", EventQuery{AfterSeq: math.MaxUint64}, nil},
		{"between", EventQuery{AfterSeq: 10, BeforeSeq: 14}, seqs(10, 13, nil)},
		{"newest first", EventQuery{Newest: true, Limit: 3}, rev(seqs(27, 30, nil))},
		{"newest before", EventQuery{Newest: true, BeforeSeq: 10, Limit: 3}, rev(seqs(6, 9, nil))},
		{"newest before past the end", EventQuery{Newest: true, BeforeSeq: 100, Limit: 2}, rev(seqs(28, 30, nil))},
		{"newest between", EventQuery{Newest: true, AfterSeq: 3, BeforeSeq: 7}, rev(seqs(3, 6, nil))},
		{"diagnostics", EventQuery{Kinds: []EventKind{EventDiagnostic}}, seqs(0, 30, func(i int) bool { return i%3 == 0 })},
		{"alarms on P-492A", EventQuery{Kinds: []EventKind{EventAlarm}, Asset: "P-492A"},
			seqs(0, 30, func(i int) bool { return i%5 == 0 && i%3 != 0 })},
		{"time range", EventQuery{From: t0.Add(5 * time.Second), To: t0.Add(9 * time.Second)}, seqs(5, 9, nil)},
		{"time range with limit", EventQuery{From: t0.Add(20 * time.Second), Limit: 2}, seqs(20, 22, nil)},
		{"filters and limit count matches only", EventQuery{Kinds: []EventKind{EventDiagnostic}, Limit: 2}, []uint64{1, 4}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			evs, err := s.Events(c.q)
			if err != nil {
				t.Fatal(err)
			}
			var got []uint64
			for _, e := range evs {
				got = append(got, e.Seq)
			}
			if !reflect.DeepEqual(got, c.want) {
				t.Errorf("seqs %v, want %v", got, c.want)
			}
		})
	}
}
