package main

import (
	"encoding/json"
	"encoding/xml"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/auscult/auscult/pkg/baseline"
)

// TestSimulatedSkid runs the main job end to end on one small simulated
// data set: simulate, enroll, score (four ways), evaluate, then bad input
// against the same baseline.
func TestSimulatedSkid(t *testing.T) {
	s := simulateSkid(t)
	test := filepath.Join(s.dir, "test")
	labels := filepath.Join(test, "labels.csv")
	lab := readLabelsCSV(t, labels)
	b, err := baseline.Load(s.baseline)
	if err != nil {
		t.Fatal(err)
	}

	t.Run("enroll summary", func(t *testing.T) { checkEnrollSummary(t, s, b) })

	var cosine, level map[string]float64
	t.Run("score CSV", func(t *testing.T) {
		cosine = fileScores(t, mustRun(t, "score", "--baseline", s.baseline, test).stdout, len(lab))
		for f, v := range cosine {
			// Range documented on baseline.Scorer.Distance.
			if math.IsNaN(v) || v < 0 || v >= 1 {
				t.Errorf("%s: score %v outside [0, 1)", f, v)
			}
		}
	})
	t.Run("score level scorer", func(t *testing.T) {
		level = fileScores(t, mustRun(t, "score", "--baseline", s.baseline, "--scorer", "level", test).stdout, len(lab))
		for f, v := range level {
			if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
				t.Errorf("%s: level score %v is not a finite distance in dB", f, v)
			}
		}
	})
	t.Run("score windows", func(t *testing.T) { checkWindows(t, s, b, test, cosine) })
	t.Run("score report", func(t *testing.T) { checkReport(t, s, b, test, len(lab)) })
	t.Run("evaluate", func(t *testing.T) { checkEvaluate(t, s, b, test, lab, cosine, level) })
	t.Run("level of a known sine", func(t *testing.T) { checkSineLevel(t, s, b) })
	t.Run("bad input", func(t *testing.T) { checkBadInput(t, s, test) })
	t.Run("refused re-enrolment keeps the baseline", func(t *testing.T) { checkReenrol(t, s) })
	t.Run("44.1 kHz stereo 24-bit", func(t *testing.T) { checkResampled(t, s, test) })
	t.Run("options that cannot work", func(t *testing.T) { checkSelectionErrors(t, s, test) })
	t.Run("microphone gain drift", func(t *testing.T) { checkGainDrift(t, s, test, lab, b.Calib.Threshold) })
}

// readLabelsCSV maps file name to label from a simulated labels.csv.
func readLabelsCSV(t *testing.T, path string) map[string]int {
	t.Helper()
	rows := readCSV(t, string(readFile(t, path)))
	out := map[string]int{}
	for _, r := range rows[1:] {
		l, err := strconv.Atoi(r[1])
		if err != nil {
			t.Fatal(err)
		}
		out[r[0]] = l
	}
	return out
}

// fileScores parses score's file,score CSV into base name -> score and
// checks there is one row per file.
func fileScores(t *testing.T, out string, files int) map[string]float64 {
	t.Helper()
	rows := readCSV(t, out)
	if len(rows) == 0 || strings.Join(rows[0], ",") != "file,score" {
		t.Fatalf("header %v, want file,score", rows[:min(1, len(rows))])
	}
	if len(rows)-1 != files {
		t.Fatalf("%d rows, want one per file (%d)", len(rows)-1, files)
	}
	m := map[string]float64{}
	for _, r := range rows[1:] {
		v, err := strconv.ParseFloat(r[1], 64)
		if err != nil {
			t.Fatalf("row %v: %v", r, err)
		}
		m[filepath.Base(r[0])] = v
	}
	return m
}

var (
	reID       = regexp.MustCompile(`^baseline ([0-9a-f]{12}) written to (.+)$`)
	reThresh   = regexp.MustCompile(`alarm at\s+([0-9.]+), set for ([0-9.e+-]+) % of healthy windows`)
	reExpected = regexp.MustCompile(`expected\s+([0-9.e+-]+) false alarms per day raising on (\d+) of (\d+) windows, one window every ([0-9.]+) s`)
)

func checkEnrollSummary(t *testing.T, s skid, b *baseline.Baseline) {
	lines := strings.Split(s.enroll, "\n")
	m := reID.FindStringSubmatch(lines[0])
	if m == nil {
		t.Fatalf("first line %q does not name the baseline id and file", lines[0])
	}
	if m[1] != b.ID || m[2] != s.baseline {
		t.Errorf("summary names %s at %s, the file holds %s at %s", m[1], m[2], b.ID, s.baseline)
	}
	if !strings.Contains(s.enroll, "asset       P-492B") {
		t.Errorf("summary does not show the asset tag:\n%s", s.enroll)
	}
	th := reThresh.FindStringSubmatch(s.enroll)
	ex := reExpected.FindStringSubmatch(s.enroll)
	if th == nil || ex == nil {
		t.Fatalf("summary lacks the threshold or expected false-alarm line:\n%s", s.enroll)
	}
	thr, _ := strconv.ParseFloat(th[1], 64)
	if math.Abs(thr-b.Calib.Threshold) > 5e-5 {
		t.Errorf("printed threshold %v, baseline holds %v", thr, b.Calib.Threshold)
	}
	// Distances lie in [0, 1) (baseline.Scorer.Distance): a threshold at
	// or above 1 could never be crossed and the agent would never alarm.
	if !(b.Calib.Threshold > 0 && b.Calib.Threshold < 1) {
		t.Errorf("threshold %v outside (0, 1): no window could ever be over it", b.Calib.Threshold)
	}
	pct, _ := strconv.ParseFloat(th[2], 64)
	perDay, _ := strconv.ParseFloat(ex[1], 64)
	k, _ := strconv.Atoi(ex[2])
	n, _ := strconv.Atoi(ex[3])
	step, _ := strconv.ParseFloat(ex[4], 64)
	// Independent check: count alarm onsets of the K-of-N rule that
	// printVerdict applies (K of the last N windows over) by enumerating
	// every over/under pattern of N+1 independent windows, each over with
	// probability p (plain probability, no formula from the project). The
	// printed figure has 3 significant digits and step 2 decimals.
	want := 86400 / step * onsetProb(pct/100, k, n)
	if math.Abs(perDay-want) > 0.01*want {
		t.Errorf("expected %v false alarms per day, enumeration of the %d-of-%d rule gives %v", perDay, k, n, want)
	}
}

// onsetProb is the probability that window N raises a K-of-N alarm that
// window N-1 did not, for independent windows over with probability p.
func onsetProb(p float64, k, n int) float64 {
	var sum float64
	for mask := 0; mask < 1<<(n+1); mask++ {
		prob, prev, cur := 1.0, 0, 0
		for i := 0; i <= n; i++ {
			over := mask>>i&1 == 1
			if over {
				prob *= p
			} else {
				prob *= 1 - p
			}
			if over && i < n {
				prev++ // windows 0..n-1
			}
			if over && i > 0 {
				cur++ // windows 1..n
			}
		}
		if cur >= k && prev < k {
			sum += prob
		}
	}
	return sum
}

func checkWindows(t *testing.T, s skid, b *baseline.Baseline, test string, cosine map[string]float64) {
	rows := readCSV(t, mustRun(t, "score", "--baseline", s.baseline, "--windows", test).stdout)
	if got := strings.Join(rows[0], ","); got != "file,window,start_s,end_s,score,level_dbfs,over" {
		t.Fatalf("header %q", got)
	}
	sum, count := map[string]float64{}, map[string]int{}
	var length float64
	for _, r := range rows[1:] {
		f := filepath.Base(r[0])
		start, _ := strconv.ParseFloat(r[2], 64)
		end, _ := strconv.ParseFloat(r[3], 64)
		sc, err := strconv.ParseFloat(r[4], 64)
		if err != nil || sc < 0 || sc >= 1 {
			t.Errorf("%v: score not in [0, 1)", r)
		}
		if length == 0 {
			length = end - start
		}
		if end <= start || math.Abs(end-start-length) > 2e-3 {
			t.Errorf("%v: window from %v to %v s, others last %v s", r, start, end, length)
		}
		want := ""
		switch {
		case sc > b.Calib.Threshold:
			want = "alarm"
		case sc > b.Calib.WarnThreshold:
			want = "warning"
		}
		near := math.Abs(sc-b.Calib.Threshold) < 1e-6 || math.Abs(sc-b.Calib.WarnThreshold) < 1e-6
		if r[6] != want && !near {
			t.Errorf("%v: over=%q, want %q (alarm level %v, warning level %v)", r, r[6], want, b.Calib.Threshold, b.Calib.WarnThreshold)
		}
		sum[f] += sc
		count[f]++
	}
	if len(count) != len(cosine) {
		t.Fatalf("windows for %d files, score gave %d", len(count), len(cosine))
	}
	// A file's score is the mean of its window scores (see fileResult.meanScore).
	for f, v := range cosine {
		if mean := sum[f] / float64(count[f]); math.Abs(mean-v) > 2e-6 {
			t.Errorf("%s: mean of %d window scores %v, file score %v", f, count[f], mean, v)
		}
	}
}

func checkReport(t *testing.T, s skid, b *baseline.Baseline, test string, files int) {
	out := mustRun(t, "score", "--baseline", s.baseline, "--report", test).stdout
	head := fmt.Sprintf("baseline %s (P-492B), enrolled ", b.ID)
	if !strings.HasPrefix(out, head) {
		t.Errorf("report starts %q, want %q", out[:min(len(out), 60)], head)
	}
	verdicts := regexp.MustCompile(`(?m)^  verdict     (.*)$`).FindAllStringSubmatch(out, -1)
	if len(verdicts) != files {
		t.Fatalf("%d verdicts for %d files:\n%s", len(verdicts), files, out)
	}
	for _, v := range verdicts {
		switch {
		case v[1] == "sounds healthy", strings.HasPrefix(v[1], "ALARM:"), strings.HasPrefix(v[1], "WARNING:"),
			strings.HasPrefix(v[1], "borderline:"):
		default:
			t.Errorf("unknown verdict %q", v[1])
		}
	}
}

// mannWhitneyAUC is the probability that a random anomalous recording
// scores above a random normal one, ties counting half (Hanley & McNeil
// 1982, "The meaning and use of the area under a ROC curve", Radiology
// 143:29-36), computed from score's CSV, not from pkg/eval.
func mannWhitneyAUC(lab map[string]int, score map[string]float64) (auc, pairs float64) {
	var wins float64
	for fa, la := range lab {
		for fn, ln := range lab {
			if la != 1 || ln != 0 {
				continue
			}
			pairs++
			switch a, n := score[fa], score[fn]; {
			case a > n:
				wins++
			case a == n:
				wins += 0.5
			}
		}
	}
	return wins / pairs, pairs
}

func checkEvaluate(t *testing.T, s skid, b *baseline.Baseline, test string, lab map[string]int, cosine, level map[string]float64) {
	roc := filepath.Join(t.TempDir(), "roc.svg")
	out := mustRun(t, "evaluate", "--baseline", s.baseline, "--labels", filepath.Join(test, "labels.csv"),
		test, "--roc", roc, "--json").stdout
	var rep evalReport
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("--json output does not parse (encoding/json, RFC 8259): %v\n%s", err, out)
	}
	anomalies := 0
	for _, l := range lab {
		anomalies += l
	}
	if rep.Baseline != b.ID || rep.Recordings != len(lab) || rep.Anomalies != anomalies {
		t.Errorf("report for %s with %d recordings, %d anomalies; want %s, %d, %d",
			rep.Baseline, rep.Recordings, rep.Anomalies, b.ID, len(lab), anomalies)
	}
	for _, tc := range []struct {
		name   string
		got    float64
		scores map[string]float64
	}{{"cosine", rep.Cosine.AUC, cosine}, {"level", rep.Level.AUC, level}} {
		if !(tc.got >= 0 && tc.got <= 1) {
			t.Errorf("%s AUC %v outside [0, 1]", tc.name, tc.got)
		}
		if tc.scores == nil {
			continue
		}
		// Scores in the CSV are rounded to 6 decimals, which can at most
		// turn a close pair into a tie: allow one pair's worth.
		want, pairs := mannWhitneyAUC(lab, tc.scores)
		if math.Abs(tc.got-want) > 1/pairs {
			t.Errorf("%s AUC %v, Mann-Whitney from score's CSV %v", tc.name, tc.got, want)
		}
	}
	if len(rep.Groups) == 0 {
		t.Error("no per-group results")
	}

	// The ROC file is well-formed XML with an SVG root (W3C SVG 1.1
	// namespace), checked with encoding/xml.
	var svg struct {
		XMLName xml.Name
	}
	if err := xml.Unmarshal(readFile(t, roc), &svg); err != nil {
		t.Fatalf("ROC file is not XML: %v", err)
	}
	if svg.XMLName.Local != "svg" || svg.XMLName.Space != "http://www.w3.org/2000/svg" {
		t.Errorf("ROC root element %v, want svg in the SVG namespace", svg.XMLName)
	}

	text := mustRun(t, "evaluate", "--baseline", s.baseline, "--labels", filepath.Join(test, "labels.csv"), test).stdout
	if !regexp.MustCompile(`(?m)^all\s+` + strconv.Itoa(len(lab)) + `\s+` + strconv.Itoa(anomalies) + `\s`).MatchString(text) {
		t.Errorf("table has no 'all' row with %d recordings and %d anomalies:\n%s", len(lab), anomalies, text)
	}
}

// checkSineLevel scores a sine at half of full scale: AES17 puts a
// full-scale sine at 0 dBFS, so it must read 20*log10(0.5) = -6.02 dBFS,
// and the level scorer must give its distance from the enrolled mean.
func checkSineLevel(t *testing.T, s skid, b *baseline.Baseline) {
	const rate = 16000
	x := make([]int16, 8*rate)
	for i := range x {
		x[i] = int16(math.Round(0.5 * 32767 * math.Sin(2*math.Pi*1000*float64(i)/rate)))
	}
	f := writeWAV(t, t.TempDir(), "sine.wav", rate, x)
	rows := readCSV(t, mustRun(t, "score", "--baseline", s.baseline, "--windows", f).stdout)
	want := 20 * math.Log10(0.5*32767/32768)
	for _, r := range rows[1:] {
		lv, _ := strconv.ParseFloat(r[5], 64)
		if math.Abs(lv-want) > 0.05 {
			t.Errorf("window %s: %v dBFS, AES17 level of a half-scale sine is %.2f dBFS", r[1], lv, want)
		}
	}
	got := fileScores(t, mustRun(t, "score", "--baseline", s.baseline, "--scorer", "level", f).stdout, 1)["sine.wav"]
	if d := math.Abs(want - b.Level.MeanDBFS); math.Abs(got-d) > 0.05 {
		t.Errorf("level score %v dB, want |%.2f - %.2f| = %.2f dB", got, want, b.Level.MeanDBFS, d)
	}
}

func checkBadInput(t *testing.T, s skid, test string) {
	dir := t.TempDir()
	good := filepath.Join(test, "test_0001.wav")
	text := filepath.Join(dir, "x.wav")
	if err := os.WriteFile(text, []byte("shift log, Obrinvale: P-492B sounded rough at 03:10, no action taken\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	trunc := filepath.Join(dir, "cut.wav")
	if err := os.WriteFile(trunc, readFile(t, good)[:30000], 0o644); err != nil {
		t.Fatal(err)
	}
	corrupt := filepath.Join(dir, "flipped.bl")
	data := readFile(t, s.baseline)
	data[len(data)/2] ^= 0x40
	if err := os.WriteFile(corrupt, data, 0o644); err != nil {
		t.Fatal(err)
	}
	noLabel := filepath.Join(dir, "nolabel.csv")
	badLabel := filepath.Join(dir, "label2.csv")
	missing := filepath.Join(dir, "gone.csv")
	for p, body := range map[string]string{
		noLabel:  "file,fault\ntest_0001.wav,\n",
		badLabel: "file,label\ntest_0001.wav,0\ntest_0002.wav,2\n",
		missing:  "file,label\ntest_0001.wav,0\nnot_recorded.wav,1\n",
	} {
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	empty := t.TempDir()
	lbl := filepath.Join(test, "labels.csv")

	tests := []struct {
		name string
		args []string
		code int
		want []string
	}{
		{"text file named .wav", []string{"score", "--baseline", s.baseline, text}, 1,
			[]string{text, "not a RIFF/WAVE file", "1 of 1 files could not be scored"}},
		{"truncated WAV", []string{"score", "--baseline", s.baseline, trunc}, 1,
			[]string{trunc, "truncated data"}},
		{"good and bad file together", []string{"score", "--baseline", s.baseline, good, text}, 1,
			[]string{text, "1 of 2 files could not be scored"}},
		{"missing baseline", []string{"score", "--baseline", filepath.Join(dir, "none.bl"), good}, 1,
			[]string{"none.bl", "no such file"}},
		{"corrupt baseline", []string{"score", "--baseline", corrupt, good}, 1,
			[]string{"corrupt", "checksum", "flipped.bl"}},
		{"WAV as baseline", []string{"score", "--baseline", good, good}, 1,
			[]string{"not a baseline file"}},
		{"empty folder", []string{"score", "--baseline", s.baseline, empty}, 1,
			[]string{"no .wav files"}},
		{"labels without label column", []string{"evaluate", "--baseline", s.baseline, "--labels", noLabel, test}, 1,
			[]string{"nolabel.csv", "file and label"}},
		{"label value 2", []string{"evaluate", "--baseline", s.baseline, "--labels", badLabel, test}, 1,
			[]string{"label2.csv line 3", `label "2"`, "0 (normal) or 1 (anomaly)"}},
		{"labelled file missing", []string{"evaluate", "--baseline", s.baseline, "--labels", missing, test}, 1,
			[]string{"not_recorded.wav"}},
		{"corrupt baseline in evaluate", []string{"evaluate", "--baseline", corrupt, "--labels", lbl, test}, 1,
			[]string{"checksum"}},
		{"report and windows together", []string{"score", "--baseline", s.baseline, "--report", "--windows", good}, 2,
			[]string{"exclude each other"}},
		{"unknown scorer", []string{"score", "--baseline", s.baseline, "--scorer", "loudest", good}, 2,
			[]string{`"loudest"`}},
		{"score without baseline", []string{"score", good}, 2, []string{"--baseline is required"}},
		{"evaluate without folder", []string{"evaluate", "--baseline", s.baseline, "--labels", lbl}, 2,
			[]string{"one folder"}},
		{"bad debounce", []string{"enroll", "--out", filepath.Join(dir, "n.bl"), "--debounce", "6/5", test}, 2,
			[]string{"--debounce"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			wantFail(t, cli(t, tc.args...), tc.code, tc.want...)
		})
	}
	t.Run("good file still scored", func(t *testing.T) {
		r := cli(t, "score", "--baseline", s.baseline, good, text)
		if !strings.Contains(r.stdout, good+",") {
			t.Errorf("the readable file lost its row:\n%s", r.stdout)
		}
	})
}

// checkReenrol enrols again into the same file with data that is refused;
// the first baseline must stay byte for byte, with no temporary left over.
func checkReenrol(t *testing.T, s skid) {
	dir := t.TempDir()
	out := filepath.Join(dir, "p-492b.bl")
	if err := os.WriteFile(out, readFile(t, s.baseline), 0o644); err != nil {
		t.Fatal(err)
	}
	before := readFile(t, out)
	short := t.TempDir()
	writeWAV(t, short, "short.wav", 16000, noise(16000, 3, 1))
	bad := t.TempDir()
	if err := os.WriteFile(filepath.Join(bad, "x.wav"), []byte("not audio at all, just a note"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		folder string
		want   string
	}{
		{"too short", short, "too little healthy audio"},
		{"unreadable file", bad, "not a RIFF/WAVE file"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			wantFail(t, cli(t, "enroll", "--out", out, tc.folder), 1, tc.want)
			if after := readFile(t, out); string(after) != string(before) {
				t.Fatal("the first baseline changed")
			}
			ents, _ := os.ReadDir(dir)
			if len(ents) != 1 {
				t.Errorf("folder holds %d entries after the refusal, want only the baseline", len(ents))
			}
			mustRun(t, "score", "--baseline", out, filepath.Join(s.dir, "test", "test_0001.wav"))
		})
	}
}
