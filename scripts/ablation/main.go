// Command ablation measures what each part of the embedding and of the
// scoring adds, on data sets written by `auscult simulate` (or any folder
// pair train/ and test/ with test/labels.csv). It prints a Markdown table of
// AUC and pAUC per variant, overall, at SNR >= 0 dB and per fault.
//
//	go run ./scripts/ablation DIR...
package main

import (
	"encoding/binary"
	"encoding/csv"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"sync"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/baseline"
	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/eval"
	"github.com/auscult/auscult/pkg/features"
	"github.com/auscult/auscult/pkg/pipeline"
)

type item struct {
	vecs   [][]float32
	levels []float64
	label  int
	cols   map[string]string
}

type dataset struct {
	name        string
	train, test []item
	layout      []embed.Dim
}

func analyse(path string, fc features.Config, ec embed.Config) (item, error) {
	r, err := audio.OpenWAV(path, -1)
	if err != nil {
		return item{}, err
	}
	defer r.Close()
	src, err := audio.NewResampler(r, fc.Rate)
	if err != nil {
		return item{}, err
	}
	p, err := pipeline.New(fc, ec)
	if err != nil {
		return item{}, err
	}
	var it item
	err = p.Run(src, func(w *embed.Window, _ float64) error {
		it.vecs = append(it.vecs, append([]float32(nil), w.Vec...))
		it.levels = append(it.levels, w.LevelDBFS)
		return nil
	})
	return it, err
}

func load(dir string, fc features.Config, ec embed.Config) (*dataset, error) {
	ds := &dataset{name: filepath.Base(dir)}
	train, _ := filepath.Glob(filepath.Join(dir, "train", "*.wav"))
	sort.Strings(train)
	dense := ec
	dense.Step = 1
	f, err := os.Open(filepath.Join(dir, "test", "labels.csv"))
	if err != nil {
		return nil, err
	}
	rows, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil {
		return nil, err
	}
	head := rows[0]
	ds.train = make([]item, len(train))
	ds.test = make([]item, len(rows)-1)
	type job struct {
		path string
		dst  *item
		cfg  embed.Config
	}
	jobs := make(chan job)
	var wg sync.WaitGroup
	var mu sync.Mutex
	var firstErr error
	for range 2 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				it, err := analyse(j.path, fc, j.cfg)
				if err != nil {
					mu.Lock()
					firstErr = err
					mu.Unlock()
				}
				it.label, it.cols = j.dst.label, j.dst.cols
				*j.dst = it
			}
		}()
	}
	for i, p := range train {
		jobs <- job{p, &ds.train[i], dense}
	}
	for i, r := range rows[1:] {
		it := &ds.test[i]
		it.cols = map[string]string{}
		for c, h := range head {
			switch h {
			case "label":
				it.label, _ = strconv.Atoi(r[c])
			default:
				it.cols[h] = r[c]
			}
		}
		jobs <- job{filepath.Join(dir, "test", it.cols["file"]), it, ec}
	}
	close(jobs)
	wg.Wait()
	e, _ := embed.New(fc, ec)
	ds.layout = e.Layout()
	return ds, firstErr
}

type variant struct {
	name  string
	parts map[string]bool
	mo    baseline.ModelOptions
	level bool
}

func pick(v []float32, layout []embed.Dim, parts map[string]bool) []float32 {
	out := make([]float32, 0, len(v))
	for i, d := range layout {
		if parts[d.Part] {
			out = append(out, v[i])
		}
	}
	return out
}

type result struct {
	auc, pauc, aucSNR0, meanFault0 float64
	faults                         map[string]float64
}

func run(ds *dataset, v variant) (result, error) {
	var x [][]float32
	var lv []float64
	for _, it := range ds.train {
		for i, w := range it.vecs {
			x = append(x, pick(w, ds.layout, v.parts))
			lv = append(lv, it.levels[i])
		}
	}
	var m *baseline.Model
	var err error
	if !v.level {
		mo := v.mo
		if mo.Centroids > 1 { // as enrolment does: the count chosen on held-out recordings
			var groups []int
			for g, it := range ds.train {
				for range it.vecs {
					groups = append(groups, g)
				}
			}
			if mo.Centroids, err = baseline.SelectCentroids(x, groups, mo, 5); err != nil {
				return result{}, err
			}
		}
		if m, err = baseline.Fit(x, mo); err != nil {
			return result{}, err
		}
	}
	lvl := baseline.Levels(lv)
	scores := make([]float64, len(ds.test))
	labels := make([]int, len(ds.test))
	for i, it := range ds.test {
		var s float64
		for j, w := range it.vecs {
			if v.level {
				s += math.Abs(it.levels[j] - lvl.MeanDBFS)
			} else {
				s += m.NewScorer().Distance(pick(w, ds.layout, v.parts))
			}
		}
		scores[i] = s / float64(len(it.vecs))
		labels[i] = it.label
	}
	var r result
	r.auc, _ = eval.AUC(labels, scores)
	r.pauc, _ = eval.PartialAUC(labels, scores, 0.1)
	// SNR >= 0 dB subset.
	var l0 []int
	var s0 []float64
	faults := map[string][]int{}
	for i, it := range ds.test {
		snr, _ := strconv.ParseFloat(it.cols["snr_db"], 64)
		if snr >= 0 {
			l0 = append(l0, labels[i])
			s0 = append(s0, scores[i])
			if labels[i] == 1 {
				faults[it.cols["fault"]] = append(faults[it.cols["fault"]], len(l0)-1)
			}
		}
	}
	r.aucSNR0, _ = eval.AUC(l0, s0)
	r.faults = map[string]float64{}
	var sum float64
	for f, idx := range faults {
		var l []int
		var s []float64
		for i := range l0 {
			if l0[i] == 0 {
				l, s = append(l, 0), append(s, s0[i])
			}
		}
		for _, i := range idx {
			l, s = append(l, 1), append(s, s0[i])
		}
		a, _ := eval.AUC(l, s)
		r.faults[f] = a
		sum += a
	}
	r.meanFault0 = sum / float64(len(faults))
	return r, nil
}

func main() {
	only := flag.String("only", "", "run only variants whose name contains this")
	fineBPO := flag.Int("finebpo", embed.DefaultConfig().FineBandsPerOctave, "fine view bands per octave")
	mels := flag.Int("mels", 0, "mel bands (0: the default)")
	trim := flag.Int("trim", -1, "values trimmed at each end (-1: the default)")
	window := flag.Int("window", 0, "sub-windows per analysis window (0: the default)")
	fmax := flag.Float64("fmax", 0, "upper edge of the mel bands in Hz (0: the default)")
	fineMin := flag.Float64("finemin", 0, "lower edge of the fine view in Hz (0: the default)")
	fineMax := flag.Float64("finemax", 0, "upper edge of the fine view in Hz (0: the default)")
	levelRMS := flag.Bool("levelrms", false, "subtract the RMS level instead of the mean band level")
	lowQ := flag.Float64("lowq", embed.DefaultConfig().LowQuantile, "quantile of the low part")
	levelNorm := flag.Bool("levelnorm", true, "subtract each sub-window's level")
	centres := flag.Int("centres", baseline.DefaultCentroids, "most operating-point centres the default variants may use (chosen on held-out recordings)")
	dump := flag.String("dump", "", "write the window vectors of the first data set to this folder (float32 .bin files and an index) and stop")
	flag.Parse()
	fc := features.DefaultConfig()
	fc.FMax = audio.ResamplePassband * float64(fc.Rate) / 2 // as enroll does
	if *fmax > 0 {
		fc.FMax = *fmax
	}
	if *mels > 0 {
		fc.Mels = *mels
	}
	ec := embed.DefaultConfig()
	ec.LevelNorm = *levelNorm
	ec.Mean, ec.Std, ec.Low, ec.Fine = true, true, true, true // every part, picked per variant
	ec.LowQuantile = *lowQ
	ec.LevelRMS = *levelRMS
	if *fineMin > 0 {
		ec.FineFMin = *fineMin
	}
	if *fineMax > 0 {
		ec.FineFMax = *fineMax
	}
	if *window > 0 {
		ec.Window = *window
	}
	if *trim >= 0 {
		ec.Trim = *trim
	}
	ec.FineBandsPerOctave = *fineBPO
	parts := func(names ...string) map[string]bool {
		m := map[string]bool{}
		for _, n := range names {
			m[n] = true
		}
		return m
	}
	def := baseline.DefaultModelOptions()
	def.Redundancy = float64(ec.Window) // enrolment windows advance by one sub-window
	def.Centroids = *centres
	diag := def
	diag.NoWhiten = true
	withFloor := func(f float64) baseline.ModelOptions { o := def; o.Floor = f; return o }
	withCentres := func(k int) baseline.ModelOptions { o := def; o.Centroids = k; return o }
	variants := []variant{
		{name: "RMS level detector", level: true},
		{name: "mel mean, standardised only", parts: parts("mel_mean"), mo: diag},
		{name: "mel mean, whitened", parts: parts("mel_mean"), mo: def},
		{name: "mel mean+std, whitened", parts: parts("mel_mean", "mel_std"), mo: def},
		{name: "mel low quantile, standardised only", parts: parts("mel_low"), mo: diag},
		{name: "mel low quantile, whitened", parts: parts("mel_low"), mo: def},
		{name: "low + fine, standardised only", parts: parts("mel_low", "fine"), mo: diag},
		{name: "low + fine, whitened (default)", parts: parts("mel_low", "fine"), mo: def},
		{name: "low + fine + mean, whitened", parts: parts("mel_low", "fine", "mel_mean"), mo: def},
		{name: "all four parts, whitened", parts: parts("mel_low", "fine", "mel_mean", "mel_std"), mo: def},
		{name: "low + fine, floor x0.25", parts: parts("mel_low", "fine"), mo: withFloor(0.25)},
		{name: "low + fine, floor x4", parts: parts("mel_low", "fine"), mo: withFloor(4)},
		{name: "low + fine, one mean", parts: parts("mel_low", "fine"), mo: withCentres(1)},
		{name: "low + fine, up to 3 centres", parts: parts("mel_low", "fine"), mo: withCentres(3)},
		{name: "low + fine, up to 5 centres", parts: parts("mel_low", "fine"), mo: withCentres(5)},
		{name: "mel low quantile, whitened, one mean", parts: parts("mel_low"), mo: withCentres(1)},
	}
	var sets []*dataset
	for _, dir := range flag.Args() {
		ds, err := load(dir, fc, ec)
		if err != nil {
			fmt.Fprintln(os.Stderr, "ablation:", err)
			os.Exit(1)
		}
		sets = append(sets, ds)
	}
	if *dump != "" {
		if err := writeDump(*dump, sets[0]); err != nil {
			fmt.Fprintln(os.Stderr, "ablation:", err)
			os.Exit(1)
		}
		return
	}
	fmt.Println("| variant | data | AUC | pAUC | AUC at SNR >= 0 dB | mean AUC over faults, SNR >= 0 dB | per fault (SNR >= 0 dB) |")
	fmt.Println("|---|---|---|---|---|---|---|")
	for _, v := range variants {
		if *only != "" && !strings.Contains(v.name, *only) {
			continue
		}
		var sa, sp, s0, sf float64
		for _, ds := range sets {
			r, err := run(ds, v)
			if err != nil {
				fmt.Fprintln(os.Stderr, "ablation:", v.name, err)
				os.Exit(1)
			}
			var names []string
			for f := range r.faults {
				names = append(names, f)
			}
			sort.Strings(names)
			var pf []string
			for _, f := range names {
				pf = append(pf, fmt.Sprintf("%s %.2f", f, r.faults[f]))
			}
			fmt.Printf("| %s | %s | %.3f | %.3f | %.3f | %.3f | %s |\n", v.name, ds.name, r.auc, r.pauc, r.aucSNR0, r.meanFault0, strings.Join(pf, ", "))
			sa, sp, s0, sf = sa+r.auc, sp+r.pauc, s0+r.aucSNR0, sf+r.meanFault0
		}
		n := float64(len(sets))
		fmt.Printf("| **%s** | **mean** | **%.3f** | **%.3f** | **%.3f** | **%.3f** | |\n", v.name, sa/n, sp/n, s0/n, sf/n)
	}
}

// writeDump writes train.bin and test.bin (float32 little-endian rows) with
// train.csv and test.csv naming the recording and labels of every row, and
// layout.csv describing the dimensions; for exploring in numpy.
func writeDump(dir string, ds *dataset) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	write := func(name string, items []item, withCols bool) error {
		bin, err := os.Create(filepath.Join(dir, name+".bin"))
		if err != nil {
			return err
		}
		defer bin.Close()
		idx, err := os.Create(filepath.Join(dir, name+".csv"))
		if err != nil {
			return err
		}
		defer idx.Close()
		fmt.Fprintln(idx, "item,label,fault,severity,snr_db,level_dbfs")
		for i, it := range items {
			for j, v := range it.vecs {
				if err := binary.Write(bin, binary.LittleEndian, v); err != nil {
					return err
				}
				fmt.Fprintf(idx, "%d,%d,%s,%s,%s,%.2f\n", i, it.label, it.cols["fault"], it.cols["severity"], it.cols["snr_db"], it.levels[j])
			}
		}
		return nil
	}
	if err := write("train", ds.train, false); err != nil {
		return err
	}
	if err := write("test", ds.test, true); err != nil {
		return err
	}
	l, err := os.Create(filepath.Join(dir, "layout.csv"))
	if err != nil {
		return err
	}
	defer l.Close()
	fmt.Fprintln(l, "part,lo_hz,hi_hz")
	for _, d := range ds.layout {
		fmt.Fprintf(l, "%s,%.2f,%.2f\n", d.Part, d.LoHz, d.HiHz)
	}
	return nil
}
