package baseline

import (
	"testing"

	"github.com/auscult/auscult/pkg/embed"
)

func TestBandFinder(t *testing.T) {
	layout := []embed.Dim{
		{Part: "mel_low", LoHz: 0, HiHz: 100}, {Part: "mel_low", LoHz: 100, HiHz: 200}, {Part: "mel_low", LoHz: 200, HiHz: 300}, {Part: "mel_low", LoHz: 300, HiHz: 400},
		{Part: "fine", LoHz: 25, HiHz: 26}, {Part: "fine", LoHz: 26, HiHz: 27}, {Part: "fine", LoHz: 27, HiHz: 29},
	}
	f := NewBandFinder(layout)
	dst := make([]Band, 0, 3)
	// A broadband rise over 100-400 Hz (one range, even though 300-400 is
	// weaker, since it is over half the peak), and a quieter line at 26-27 Hz.
	dev := []float32{0.2, 3, 4, 2.5, 0.1, -3.5, 0.3}
	got := f.Find(dev, dst)
	want := []Band{
		{Part: "mel_low", LoHz: 100, HiHz: 400, Deviation: 4},
		{Part: "fine", LoHz: 26, HiHz: 27, Deviation: -3.5},
		{Part: "fine", LoHz: 27, HiHz: 29, Deviation: 0.3},
	}
	if len(got) != len(want) {
		t.Fatalf("got %v", got)
	}
	for i := range want {
		if got[i].Part != want[i].Part || got[i].LoHz != want[i].LoHz || got[i].HiHz != want[i].HiHz ||
			float32(got[i].Deviation) != float32(want[i].Deviation) {
			t.Errorf("band %d = %+v, want %+v", i, got[i], want[i])
		}
	}
	if a := testing.AllocsPerRun(100, func() { f.Find(dev, dst) }); a != 0 {
		t.Errorf("Find allocates %v times", a)
	}
	if got := f.Find(make([]float32, len(layout)), dst); len(got) != 0 {
		t.Errorf("all-zero deviations gave bands %v", got)
	}
}
