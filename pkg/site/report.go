package site

import (
	"bytes"
	"embed"
	"fmt"
	"html/template"
	"io"
	"net/http"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

//go:embed assets/report.html
var reportFS embed.FS

var reportTmpl = template.Must(template.New("report").Funcs(template.FuncMap{
	"stamp": func(t time.Time) string { return t.UTC().Format("2006-01-02 15:04:05") },
	"day":   func(t time.Time) string { return t.UTC().Format("2006-01-02") },
	"pct":   func(x float64) string { return fmt.Sprintf("%.0f %%", 100*x) },
}).ParseFS(reportFS, "assets/report.html"))

// maxReportEvents bounds the event rows of a report.
const maxReportEvents = 500

// ReportInput is what a visit report covers.
type ReportInput struct {
	Store    Store
	From, To time.Time
	// Asset, Site, Version and the thresholds come from the running agent
	// or, for a copied log, from its newest baseline record.
	Asset, Site, Version     string
	Threshold, WarnThreshold float64
	Now                      time.Time
}

type reportData struct {
	Asset, Site, Version string
	From, To, Made       time.Time
	CSS                  template.CSS
	SVG                  template.HTML
	Alarms, Warnings     int
	SensorFaults         int
	Overruns             int
	Running              float64
	ScoreMean, ScoreMax  float64
	Threshold            float64
	Events               []store.Event
	MoreEvents           int
	Summaries            []store.Summary
	Baselines            []store.Baseline
}

// WriteReport writes one self-contained HTML file (styles and the trend
// chart inline, nothing fetched) describing [in.From, in.To).
func WriteReport(w io.Writer, in ReportInput) error {
	if !in.From.Before(in.To) || in.To.Sub(in.From) > MaxRange {
		return errBadRange(fmt.Errorf("site: report range %s to %s: want from before to, at most %.0f days",
			in.From.Format(time.RFC3339), in.To.Format(time.RFC3339), MaxRange.Hours()/24))
	}
	d := reportData{Asset: in.Asset, Site: in.Site, Version: in.Version, From: in.From, To: in.To, Made: in.Now,
		Threshold: in.Threshold}
	css, _ := assets.ReadFile("assets/style.css")
	d.CSS = template.CSS(css)
	pts, err := readTrend(in.Store, in.From, in.To)
	if err != nil {
		return err
	}
	var sum float64
	var scored, running int
	for _, p := range pts {
		if p.Windows > 0 {
			sum += p.ScoreMean * float64(p.Windows)
			scored += p.Windows
			d.ScoreMax = max(d.ScoreMax, p.ScoreMax)
		}
		if p.RunningFraction > 0.5 {
			running++
		}
	}
	if scored > 0 {
		d.ScoreMean = sum / float64(scored)
	}
	if len(pts) > 0 {
		d.Running = float64(running) / float64(len(pts))
	}
	var marks []AlarmMark
	err = eachEvent(in.Store, store.EventQuery{From: in.From, To: in.To}, func(e store.Event) error {
		switch {
		case e.Code == "alarm.raised":
			d.Alarms++
		case e.Code == "warning.raised":
			d.Warnings++
		case strings.HasPrefix(e.Code, "sensor.") && strings.HasSuffix(e.Code, ".active"):
			d.SensorFaults++
		case e.Code == "capture.input_overflow" || e.Code == "capture.ring_overrun":
			d.Overruns++
		}
		if strings.HasSuffix(e.Code, ".raised") {
			sev := strings.TrimSuffix(e.Code, ".raised")
			marks = append(marks, AlarmMark{Time: e.Time, Severity: sev, Label: fmt.Sprintf("%s #%d", sev, e.Seq)})
		}
		if e.Kind == store.EventState {
			return nil
		}
		if len(d.Events) < maxReportEvents {
			d.Events = append(d.Events, e)
		} else {
			d.MoreEvents++
		}
		return nil
	})
	if err != nil {
		return err
	}
	var svg bytes.Buffer
	c := TrendChart{From: in.From, To: in.To, Points: pts, Alarms: marks, Threshold: in.Threshold,
		WarnThreshold: in.WarnThreshold, Title: fmt.Sprintf("%s, %s to %s", in.Asset, in.From.Format("2006-01-02"), in.To.Format("2006-01-02"))}
	if err := c.WriteSVG(&svg); err != nil {
		return err
	}
	d.SVG = template.HTML(svg.String())
	if err := eachSummary(in.Store, in.From, in.To, func(m store.Summary) error {
		d.Summaries = append(d.Summaries, m)
		return nil
	}); err != nil {
		return err
	}
	if d.Baselines, err = in.Store.Baselines(); err != nil {
		return err
	}
	for i := range d.Baselines {
		d.Baselines[i].File = nil
	}
	return reportTmpl.ExecuteTemplate(w, "report", d)
}

// report serves /report?from=&to= as a download.
func (s *Server) report(w http.ResponseWriter, r *http.Request) {
	q := r.URL.Query()
	now := s.cfg.Now().UTC()
	from, to, err := parseRange(q.Get("from"), q.Get("to"), now.Add(-30*24*time.Hour), now, now)
	if err != nil {
		s.fail(w, r, http.StatusBadRequest, err)
		return
	}
	live := s.cfg.Live()
	var buf bytes.Buffer
	err = WriteReport(&buf, ReportInput{Store: s.cfg.Store, From: from, To: to, Asset: live.Asset, Site: live.Site,
		Version: live.Version, Threshold: live.Threshold, WarnThreshold: live.WarnThreshold, Now: now})
	if err != nil {
		s.fail(w, r, statusOf(err), err)
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.Header().Set("Content-Disposition", fmt.Sprintf(`attachment; filename="%s-visit-%s-%s.html"`,
		safeName(live.Asset), from.Format("20060102"), to.Format("20060102")))
	w.Write(buf.Bytes())
}
