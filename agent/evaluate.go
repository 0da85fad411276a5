package main

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"

	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/eval"
	"github.com/auscult/auscult/pkg/pipeline"
)

// maxFPR is the partial-AUC limit used throughout (false-positive rate 0.1).
const maxFPR = 0.1

// labelSet is a labels CSV: file and label columns plus group columns.
type labelSet struct {
	files   []string
	labels  []int
	columns []string            // group column names, in file order
	groups  map[string][]string // column -> value per row
}

func readLabels(path string) (labelSet, error) {
	f, err := os.Open(path)
	if err != nil {
		return labelSet{}, err
	}
	defer f.Close()
	rd := csv.NewReader(f)
	head, err := rd.Read()
	if err != nil {
		return labelSet{}, fmt.Errorf("%s: no header line: %v", path, err)
	}
	fileCol, labelCol := -1, -1
	ls := labelSet{groups: map[string][]string{}}
	for i, h := range head {
		switch h {
		case "file":
			fileCol = i
		case "label":
			labelCol = i
		default:
			ls.columns = append(ls.columns, h)
		}
	}
	if fileCol < 0 || labelCol < 0 {
		return ls, fmt.Errorf("%s: header must name the columns file and label, got %v", path, head)
	}
	seen := map[string]int{}
	for line := 2; ; line++ {
		rec, err := rd.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return ls, fmt.Errorf("%s: %v", path, err)
		}
		lab, err := strconv.Atoi(rec[labelCol])
		if err != nil || (lab != 0 && lab != 1) {
			return ls, fmt.Errorf("%s line %d: label %q must be 0 (normal) or 1 (anomaly)", path, line, rec[labelCol])
		}
		if first, dup := seen[rec[fileCol]]; dup {
			return ls, fmt.Errorf("%s line %d: %s is listed again (first on line %d)", path, line, rec[fileCol], first)
		}
		seen[rec[fileCol]] = line
		ls.files = append(ls.files, rec[fileCol])
		ls.labels = append(ls.labels, lab)
		for i, h := range head {
			if i != fileCol && i != labelCol {
				ls.groups[h] = append(ls.groups[h], rec[i])
			}
		}
	}
	if len(ls.files) == 0 {
		return ls, fmt.Errorf("%s: no rows", path)
	}
	return ls, nil
}

// bothClasses says why AUC cannot be computed on ls, or returns nil.
func (ls labelSet) bothClasses(what string) error {
	n1 := 0
	for _, l := range ls.labels {
		n1 += l
	}
	switch {
	case n1 == 0:
		return fmt.Errorf("%s: all %d recordings are normal (label 0); AUC needs anomalies too", what, len(ls.labels))
	case n1 == len(ls.labels):
		return fmt.Errorf("%s: all %d recordings are anomalies (label 1); AUC needs normal ones too", what, len(ls.labels))
	}
	return nil
}

// metrics is one scorer's figures.
type metrics struct {
	AUC  float64 `json:"auc"`
	PAUC float64 `json:"pauc"`
}

type groupReport struct {
	Column    string   `json:"column"`
	Value     string   `json:"value"`
	N         int      `json:"n"`
	Anomalies int      `json:"anomalies"`
	Cosine    *metrics `json:"cosine"` // nil (JSON null) when Note says why there is none
	Level     *metrics `json:"level"`
	Note      string   `json:"note,omitempty"`
}

type evalReport struct {
	Baseline   string        `json:"baseline_id"`
	Recordings int           `json:"recordings"`
	Anomalies  int           `json:"anomalies"`
	MaxFPR     float64       `json:"max_fpr"`
	Cosine     metrics       `json:"cosine"`
	Level      metrics       `json:"level"`
	Groups     []groupReport `json:"groups"`
	Suggested  struct {
		Score float64 `json:"file_score"`
		TPR   float64 `json:"tpr"`
		FPR   float64 `json:"fpr"`
	} `json:"suggested_threshold"`
	Calibrated float64     `json:"calibrated_window_threshold"`
	Where      string      `json:"where,omitempty"`
	MeanOver   *meanReport `json:"mean_over,omitempty"`
}

// meanReport is the mean AUC over the groups of one column (fault types).
type meanReport struct {
	Column string  `json:"column"`
	Groups int     `json:"groups"`
	Cosine float64 `json:"cosine_auc"`
	Level  float64 `json:"level_auc"`
}

func runEvaluate(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("evaluate", stderr)
	blPath := fs.String("baseline", "", "baseline `file` from enroll (required)")
	labPath := fs.String("labels", "", "labels `csv` with columns file,label,... (required)")
	rocPath := fs.String("roc", "", "write the ROC curves as SVG to this `file`")
	asJSON := fs.Bool("json", false, "print the report as JSON")
	channel := fs.Int("channel", -1, "channel to analyse, from 0; -1 mixes all channels")
	jobs := fs.Int("jobs", runtime.NumCPU(), "files analysed in parallel")
	where := fs.String("where", "", "evaluate only rows matching COLUMN OP VALUE, e.g. \"snr_db>=0\" (OP one of = != < <= > >=)")
	by := fs.String("by", "", "report groups only for these comma-separated columns (default: every column)")
	meanOver := fs.String("mean-over", "", "also report the mean AUC over the groups of this column (default: fault, if present)")
	dirs, err := parse(fs, args)
	if err != nil {
		return err
	}
	if *blPath == "" || *labPath == "" || len(dirs) != 1 {
		return usagef("--baseline, --labels and one folder are required")
	}
	b, err := baseline.Load(*blPath)
	if err != nil {
		return err
	}
	ls, err := readLabels(*labPath)
	if err != nil {
		return err
	}
	if *where != "" {
		if ls, err = ls.filter(*where); err != nil {
			return err
		}
		if err := ls.bothClasses(fmt.Sprintf("--where %q", *where)); err != nil {
			return err
		}
	} else if err := ls.bothClasses(*labPath); err != nil {
		return err
	}
	if *meanOver != "" {
		if _, ok := ls.groups[*meanOver]; !ok {
			return usagef("--mean-over: the labels file has no column %q (it has %s)", *meanOver, strings.Join(ls.columns, ", "))
		}
	} else if _, ok := ls.groups["fault"]; ok {
		*meanOver = "fault"
	}
	if *by != "" {
		var keep []string
		for _, c := range strings.Split(*by, ",") {
			c = strings.TrimSpace(c)
			if _, ok := ls.groups[c]; !ok {
				return usagef("--by: the labels file has no column %q (it has %s)", c, strings.Join(ls.columns, ", "))
			}
			keep = append(keep, c)
		}
		ls.columns = keep
	}
	paths := make([]string, len(ls.files))
	for i, f := range ls.files {
		paths[i] = filepath.Join(dirs[0], f)
	}
	results, err := analyseAll(b, paths, *channel, max(*jobs, 1), stderr)
	if err != nil {
		return err
	}
	rep, err := buildReport(b, ls, results, *meanOver)
	if err != nil {
		return err
	}
	rep.Where = *where
	if *rocPath != "" {
		if err := writeROC(*rocPath, b, ls, results, rep); err != nil {
			return err
		}
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(rep)
	}
	printReport(stdout, rep)
	return nil
}

// analyseAll scores files with jobs pipelines in parallel; results keep the
// input order. The first error stops the work.
func analyseAll(b *baseline.Baseline, paths []string, channel, jobs int, stderr io.Writer) ([]fileResult, error) {
	results := make([]fileResult, len(paths))
	errs := make([]error, len(paths))
	next := make(chan int)
	var wg sync.WaitGroup
	var mu sync.Mutex // guards prog
	prog := newProgress(stderr, "evaluating", len(paths))
	pipes := make([]*pipeline.Pipeline, jobs)
	for i := range pipes {
		var err error
		if pipes[i], err = pipeline.ForBaseline(b); err != nil {
			return nil, err
		}
	}
	for _, p := range pipes {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				results[i], errs[i] = analyseFile(p, paths[i], analyseOptions{channel: channel})
				mu.Lock()
				prog.step(results[i].seconds)
				mu.Unlock()
			}
		}()
	}
	for i := range paths {
		next <- i
	}
	close(next)
	wg.Wait()
	prog.end()
	return results, errors.Join(errs...)
}

func scoresOf(b *baseline.Baseline, scorer string, rs []fileResult) []float64 {
	s := make([]float64, len(rs))
	for i, r := range rs {
		s[i] = fileScore(b, scorer, r)
	}
	return s
}

func score2(labels []int, scores []float64) (metrics, error) {
	a, err := eval.AUC(labels, scores)
	if err != nil {
		return metrics{}, err
	}
	p, err := eval.PartialAUC(labels, scores, maxFPR)
	return metrics{a, p}, err
}

func buildReport(b *baseline.Baseline, ls labelSet, rs []fileResult, meanOver string) (*evalReport, error) {
	cos, lev := scoresOf(b, scorerCosine, rs), scoresOf(b, scorerLevel, rs)
	rep := &evalReport{Baseline: b.ID, Recordings: len(rs), MaxFPR: maxFPR, Calibrated: b.Calib.Threshold}
	for _, l := range ls.labels {
		rep.Anomalies += l
	}
	var err error
	if rep.Cosine, err = score2(ls.labels, cos); err != nil {
		return nil, fmt.Errorf("labels: %w", err)
	}
	if rep.Level, err = score2(ls.labels, lev); err != nil {
		return nil, err
	}
	cols := map[string][]string{}
	for _, c := range ls.columns {
		cols[c] = ls.groups[c]
	}
	gc, err := eval.ByGroup(ls.labels, cos, cols, maxFPR)
	if err != nil {
		return nil, err
	}
	gl, err := eval.ByGroup(ls.labels, lev, cols, maxFPR)
	if err != nil {
		return nil, err
	}
	order := map[string]int{}
	for i, c := range ls.columns {
		order[c] = i
	}
	for i, g := range gc {
		gr := groupReport{Column: g.Name, Value: g.Value, N: g.N, Anomalies: g.Anomalies, Note: g.Err}
		if g.Err == "" {
			gr.Cosine, gr.Level = &metrics{g.AUC, g.PAUC}, &metrics{gl[i].AUC, gl[i].PAUC}
		}
		rep.Groups = append(rep.Groups, gr)
	}
	// Columns in file order; numeric values (SNR, set-point) in numeric order.
	sort.SliceStable(rep.Groups, func(i, j int) bool {
		a, b := rep.Groups[i], rep.Groups[j]
		if a.Column != b.Column {
			return order[a.Column] < order[b.Column]
		}
		x, errx := strconv.ParseFloat(a.Value, 64)
		y, erry := strconv.ParseFloat(b.Value, 64)
		if errx == nil && erry == nil {
			return x < y
		}
		return a.Value < b.Value
	})
	var n int
	var sc, sl float64
	for _, g := range rep.Groups {
		if g.Column == meanOver && g.Cosine != nil {
			n++
			sc += g.Cosine.AUC
			sl += g.Level.AUC
		}
	}
	if n > 0 {
		rep.MeanOver = &meanReport{Column: meanOver, Groups: n, Cosine: sc / float64(n), Level: sl / float64(n)}
	}
	thr, tpr, fpr, err := eval.SuggestThreshold(ls.labels, cos, maxFPR)
	if err == nil && !math.IsInf(thr, 0) {
		rep.Suggested.Score, rep.Suggested.TPR, rep.Suggested.FPR = thr, tpr, fpr
	}
	return rep, nil
}

func printReport(w io.Writer, r *evalReport) {
	fmt.Fprintf(w, "evaluation against baseline %s: %d recordings, %d normal, %d anomalous\n",
		r.Baseline, r.Recordings, r.Recordings-r.Anomalies, r.Anomalies)
	if r.Where != "" {
		fmt.Fprintf(w, "only recordings where %s\n", r.Where)
	}
	fmt.Fprintf(w, "pAUC is the McClish-standardised partial AUC up to a false-positive rate of %.1f\n\n", r.MaxFPR)
	fmt.Fprintf(w, "%-28s %5s %5s   %-13s   %-13s\n", "", "", "", "  embedding", "level detector")
	fmt.Fprintf(w, "%-28s %5s %5s   %6s %6s   %6s %6s\n", "group", "n", "anom", "AUC", "pAUC", "AUC", "pAUC")
	row := func(name string, n, a int, c, l *metrics, note string) {
		if c == nil {
			fmt.Fprintf(w, "%-28s %5d %5d   %s\n", name, n, a, note)
			return
		}
		fmt.Fprintf(w, "%-28s %5d %5d   %6.3f %6.3f   %6.3f %6.3f\n", name, n, a, c.AUC, c.PAUC, l.AUC, l.PAUC)
	}
	row("all", r.Recordings, r.Anomalies, &r.Cosine, &r.Level, "")
	last := ""
	for _, g := range r.Groups {
		if g.Column != last {
			fmt.Fprintf(w, "%s\n", g.Column)
			last = g.Column
		}
		row("  "+g.Value, g.N, g.Anomalies, g.Cosine, g.Level, g.Note)
	}
	if m := r.MeanOver; m != nil {
		fmt.Fprintf(w, "%-28s %5s %5s   %6.3f %6s   %6.3f\n", "mean over "+m.Column+" groups", "", "", m.Cosine, "", m.Level)
	}
	if r.Suggested.Score != 0 {
		fmt.Fprintf(w, "\nsuggested file-score threshold %.4f: flags %.0f %% of anomalous and %.0f %% of normal recordings\n",
			r.Suggested.Score, 100*r.Suggested.TPR, 100*r.Suggested.FPR)
	}
	fmt.Fprintf(w, "calibrated per-window threshold in the baseline: %.4f\n", r.Calibrated)
}

func writeROC(path string, b *baseline.Baseline, ls labelSet, rs []fileResult, rep *evalReport) error {
	var curves []eval.Curve
	for _, sc := range []struct {
		name, scorer string
		auc          float64
	}{{"embedding distance", scorerCosine, rep.Cosine.AUC}, {"level detector", scorerLevel, rep.Level.AUC}} {
		fpr, tpr, _, err := eval.ROC(ls.labels, scoresOf(b, sc.scorer, rs))
		if err != nil {
			return err
		}
		curves = append(curves, eval.Curve{Name: sc.name, FPR: fpr, TPR: tpr, AUC: sc.auc})
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := eval.WriteROCSVG(f, curves, "ROC, baseline "+b.ID); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// filter keeps the rows matching a "COLUMN OP VALUE" condition; numbers
// compare as numbers, anything else as text (= and != only).
func (ls labelSet) filter(cond string) (labelSet, error) {
	var col, op, val string
	for _, o := range []string{">=", "<=", "!=", "=", "<", ">"} {
		if i := strings.Index(cond, o); i > 0 {
			col, op, val = strings.TrimSpace(cond[:i]), o, strings.TrimSpace(cond[i+len(o):])
			break
		}
	}
	vals, ok := ls.groups[col]
	if col == "label" {
		vals, ok = make([]string, len(ls.labels)), true
		for i, l := range ls.labels {
			vals[i] = strconv.Itoa(l)
		}
	}
	if op == "" || !ok {
		return ls, usagef("--where %q: want COLUMN OP VALUE with a column of the labels file and OP one of = != < <= > >=", cond)
	}
	num, numErr := strconv.ParseFloat(val, 64)
	out := labelSet{columns: ls.columns, groups: map[string][]string{}}
	for i, f := range ls.files {
		v := vals[i]
		var keep bool
		x, err := strconv.ParseFloat(v, 64)
		switch {
		case numErr == nil && err == nil:
			keep = map[string]bool{">=": x >= num, "<=": x <= num, "!=": x != num, "=": x == num, "<": x < num, ">": x > num}[op]
		case op == "=":
			keep = v == val
		case op == "!=":
			keep = v != val
		case numErr != nil:
			return ls, usagef("--where %q: %q is not a number; only = and != compare text", cond, val)
		default:
			return ls, usagef("--where %q: recording %s has %s %q, not a number", cond, f, col, v)
		}
		if keep {
			out.files = append(out.files, f)
			out.labels = append(out.labels, ls.labels[i])
			for _, c := range ls.columns {
				out.groups[c] = append(out.groups[c], ls.groups[c][i])
			}
		}
	}
	if len(out.files) == 0 {
		return out, fmt.Errorf("--where %q: no rows match", cond)
	}
	return out, nil
}
