package monitor

import (
	"math"
	"slices"
	"time"

	"github.com/auscult/auscult/pkg/alarm"
	"github.com/auscult/auscult/pkg/store"
)

// silenceFloorDBFS is the level stored for digital silence: the log keeps
// only finite levels.
const silenceFloorDBFS = -120

// period gathers the windows of one trend minute or one summary period.
type period struct {
	start            time.Time
	windows, running int     // all windows, and those scored while running
	scoreSum         float64 // over running windows
	scoreMin         float64
	scoreMax         float64
	powerSum         float64 // mean-square level, linear, over all windows
	levelMax         float64 // dBFS
	worst            store.AlarmState
	scores           []float64 // summary periods only: for the 95th percentile
	alarms, overruns int
	warnings         int
	sensorFaults     int    // sensor diagnostics that became active
	sensorActive     uint32 // bit per gate.Kind active at the period's end
	alarmTime        time.Duration
}

func (p *period) reset(start time.Time, state store.AlarmState) {
	keep := p.scores[:0]
	*p = period{start: start, scoreMin: math.Inf(1), scoreMax: math.Inf(-1), levelMax: math.Inf(-1),
		worst: state, scores: keep}
}

// add counts one window. keepScores is set for summary periods.
func (p *period) add(score, levelDBFS float64, running bool, state store.AlarmState, keepScores bool) {
	p.windows++
	p.powerSum += math.Pow(10, levelDBFS/10)
	p.levelMax = max(p.levelMax, levelDBFS)
	if rank(state) > rank(p.worst) {
		p.worst = state
	}
	if !running {
		return
	}
	p.running++
	p.scoreSum += score
	p.scoreMin = min(p.scoreMin, score)
	p.scoreMax = max(p.scoreMax, score)
	if keepScores && len(p.scores) < cap(p.scores) {
		p.scores = append(p.scores, score)
	}
}

func (p *period) levels() (mean, maxDBFS float64) {
	if p.windows == 0 || p.powerSum <= 0 {
		return silenceFloorDBFS, silenceFloorDBFS
	}
	mean = max(10*math.Log10(p.powerSum/float64(p.windows)), silenceFloorDBFS)
	return mean, max(p.levelMax, silenceFloorDBFS)
}

func (p *period) scoreStats() (lo, mean, hi float64) {
	if p.running == 0 {
		return 0, 0, 0
	}
	return p.scoreMin, p.scoreSum / float64(p.running), p.scoreMax
}

func (p *period) trendPoint() store.TrendPoint {
	lo, mean, hi := p.scoreStats()
	lm, lx := p.levels()
	return store.TrendPoint{Start: p.start, Windows: p.running, ScoreMin: lo, ScoreMean: mean, ScoreMax: hi,
		RMSMeanDBFS: lm, RMSMaxDBFS: lx, RunningFraction: p.runningFraction(), Alarm: p.worst}
}

func (p *period) summary() store.Summary {
	lo, mean, hi := p.scoreStats()
	lm, lx := p.levels()
	p95 := 0.0
	if len(p.scores) > 0 {
		slices.Sort(p.scores)
		p95 = p.scores[int(math.Ceil(0.95*float64(len(p.scores))))-1] // nearest-rank percentile
		p95 = min(max(p95, lo), hi)
	}
	return store.Summary{Start: p.start, Windows: p.running, RunningFraction: p.runningFraction(),
		ScoreMin: lo, ScoreMean: mean, ScoreP95: p95, ScoreMax: hi, RMSMeanDBFS: lm, RMSMaxDBFS: lx,
		AlarmSeconds: p.alarmTime.Seconds(), Alarms: p.alarms, Warnings: p.warnings, Overruns: p.overruns,
		SensorFaults: p.sensorFaults, SensorActive: p.sensorActive, Alarm: p.worst}
}

func (p *period) runningFraction() float64 {
	if p.windows == 0 {
		return 0
	}
	return float64(p.running) / float64(p.windows)
}

// storeState maps the tracker's ISA-18.2 state onto the log's alarm states.
func storeState(s alarm.State) store.AlarmState {
	switch s {
	case alarm.StateUnacked:
		return store.AlarmActive
	case alarm.StateAcked:
		return store.AlarmAcknowledged
	case alarm.StateReturnedUnacked:
		return store.AlarmLatched
	case alarm.StateShelved:
		return store.AlarmShelved
	}
	return store.AlarmNormal
}

// rank orders alarm states by how much they ask of an operator.
func rank(s store.AlarmState) int {
	switch s {
	case store.AlarmActive:
		return 5
	case store.AlarmAcknowledged:
		return 4
	case store.AlarmLatched:
		return 3
	case store.AlarmShelved:
		return 2
	case store.AlarmPending:
		return 1
	}
	return 0
}

// floorTo returns t rounded down to a multiple of d since the Unix epoch,
// so minutes and hours start on the clock's own boundaries.
func floorTo(t time.Time, d time.Duration) time.Time {
	return t.Truncate(d)
}
