package sim

import (
	"fmt"
	"strings"
	"testing"
)

func TestPlanLayout(t *testing.T) {
	opt := DefaultOptions(1)
	m, clips := Plan(opt)
	nFaulty := len(Faults()) * len(Severities()) * opt.TestPerFaultSeverity
	if want := opt.TrainClips + opt.TestNormal + nFaulty; len(clips) != want {
		t.Fatalf("%d clips, want %d", len(clips), want)
	}
	count := map[string]int{}
	seeds := map[uint64]bool{}
	for i, c := range clips {
		if seeds[c.Seed] {
			t.Errorf("%s repeats a seed", c.Name)
		}
		seeds[c.Seed] = true
		if i < opt.TrainClips {
			if c.Split != "train" || c.Label != 0 || c.Name != fmt.Sprintf("train_%04d.wav", i+1) {
				t.Errorf("bad training clip %+v", c)
			}
			continue
		}
		if c.Split != "test" || c.Name != fmt.Sprintf("test_%04d.wav", i+1-opt.TrainClips) {
			t.Errorf("bad test clip %+v", c)
		}
		if (c.Label == 1) != (c.Fault != "") || (c.Fault == "") != (c.Severity == "") {
			t.Errorf("label, fault and severity disagree: %+v", c)
		}
		count[c.Fault+"/"+c.Severity]++
	}
	for _, f := range Faults() {
		for _, s := range Severities() {
			if count[f+"/"+s] != opt.TestPerFaultSeverity {
				t.Errorf("%s/%s: %d clips", f, s, count[f+"/"+s])
			}
		}
	}
	if count["/"] != opt.TestNormal {
		t.Errorf("%d normal test clips, want %d", count["/"], opt.TestNormal)
	}
	if len(m.Setpoints) != 3 {
		t.Errorf("%d set-points, want 3", len(m.Setpoints))
	}
}

func TestPlanBalance(t *testing.T) {
	// Honesty of the benchmark: every group (train, normal test, faulty test)
	// covers every set-point and SNR in near-equal numbers, and nuisance
	// rates do not differ grossly between groups (design rule, no source).
	_, clips := Plan(DefaultOptions(2))
	groups := map[string][]Clip{}
	for _, c := range clips {
		g := c.Split
		if c.Split == "test" {
			g += fmt.Sprint(c.Label)
		}
		groups[g] = append(groups[g], c)
	}
	for name, cs := range groups {
		t.Run(name, func(t *testing.T) {
			sp, sn := map[float64]int{}, map[float64]int{}
			nuis := 0
			for _, c := range cs {
				sp[c.SetpointHz]++
				sn[c.SNRdB]++
				if c.Nuisance != "none" {
					nuis++
				}
			}
			if len(sp) != 3 || len(sn) != len(SNRSet()) {
				t.Fatalf("set-points %v, SNRs %v", sp, sn)
			}
			for _, m := range []map[float64]int{sp, sn} {
				lo, hi := len(cs), 0
				for _, k := range m {
					lo, hi = min(lo, k), max(hi, k)
				}
				if hi-lo > 1 {
					t.Errorf("unbalanced %v", m)
				}
			}
			// P(no nuisance) = 0.7*0.65*0.8*0.7 = 0.25, so about 75 % have one.
			if f := float64(nuis) / float64(len(cs)); f < 0.55 || f > 0.92 {
				t.Errorf("nuisance fraction %.2f", f)
			}
		})
	}
}

func TestMachinesDiffer(t *testing.T) {
	a, b, c := NewMachine(1), NewMachine(2), NewMachine(3)
	if fmt.Sprint(a) == fmt.Sprint(b) || fmt.Sprint(b) == fmt.Sprint(c) {
		t.Fatal("seeds 1, 2, 3 should give different machines")
	}
	if fmt.Sprint(NewMachine(1)) != fmt.Sprint(a) {
		t.Fatal("NewMachine is not deterministic")
	}
	for seed := int64(0); seed < 50; seed++ {
		m := NewMachine(seed)
		k := m.Bearing.BallDiameter / m.Bearing.PitchDiameter
		switch {
		case m.Poles != 2 && m.Poles != 4, m.LineHz != 50 && m.LineHz != 60,
			m.Vanes < 5 || m.Vanes > 7, m.Bearing.Balls < 7 || m.Bearing.Balls > 12,
			k < 0.149 || k > 0.251, m.RT60 < 0.6 || m.RT60 > 1.5:
			t.Errorf("seed %d out of range: %+v", seed, m)
		}
		for _, s := range m.Setpoints {
			if s < 0.6*m.LineHz-0.05 || s > m.LineHz+0.05 {
				t.Errorf("seed %d set-point %g outside 60-100 %% of %g Hz", seed, s, m.LineHz)
			}
		}
	}
}

func TestCSV(t *testing.T) {
	c := Clip{Name: "test_0007.wav", Split: "test", Label: 1, Fault: FaultLeak, Severity: "mild",
		SNRdB: -3, SetpointHz: 41.5, Nuisance: "clank+speech"}
	tests := []struct{ name, got, want string }{
		{"header", LabelsCSVHeader(), "file,label,fault,severity,snr_db,setpoint_hz,nuisance,snr_band"},
		{"faulty", c.CSVRow(), "test_0007.wav,1,leak,mild,-3,41.5,clank+speech,-3"},
		{"normal", Clip{Name: "train_0001.wav", SNRdB: 10, SetpointHz: 30, Nuisance: "none"}.CSVRow(),
			"train_0001.wav,0,,,10,30.0,none,+10"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.got != tc.want {
				t.Errorf("got %q, want %q", tc.got, tc.want)
			}
			if strings.Count(tc.got, ",") != 7 {
				t.Errorf("want 8 columns: %q", tc.got)
			}
		})
	}
}

func ExamplePlan() {
	m, clips := Plan(DefaultOptions(1))
	fmt.Println(m.Asset, m.LineHz, "Hz,", m.Poles, "poles,", m.Vanes, "vanes")
	fmt.Println(len(clips), "clips")
	fmt.Println(LabelsCSVHeader())
	fmt.Println(clips[0].CSVRow())
	// Output:
	// P-492B 50 Hz, 2 poles, 7 vanes
	// 295 clips
	// file,label,fault,severity,snr_db,setpoint_hz,nuisance,snr_band
	// train_0001.wav,0,,,10,39.3,speech,+10
}
