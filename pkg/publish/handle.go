package publish

import (
	"encoding/json"
	"time"

	mqtt "github.com/eclipse/paho.mqtt.golang"
)

// replayMemory is the least time a request id is remembered.
const replayMemory = 24 * time.Hour

// command handles one command payload and publishes its response. Only a
// failure to publish the response (the link is gone) is returned; a bad
// command is answered, logged and otherwise ignored.
func (p *Publisher) command(c mqtt.Client, b []byte) error {
	cmd, cerr := ParseCommand(b)
	now := p.cfg.Now()
	if cerr == nil && p.cfg.CommandMaxAge > 0 {
		if age := now.Sub(cmd.issued); age > p.cfg.CommandMaxAge || -age > p.cfg.CommandMaxAge {
			cerr = cmdErr(CodeStale, "issued %s, %v from this agent's clock %s; the limit is %v (check both clocks)",
				cmd.Issued, age.Round(time.Second), Stamp(now), p.cfg.CommandMaxAge)
		}
	}
	if cerr == nil {
		seen, err := p.st.RememberRequest(cmd.RequestID, now, max(2*p.cfg.CommandMaxAge, replayMemory))
		switch {
		case err != nil:
			cerr = cmdErr(CodeFailed, "the local log could not record the request: %v", err)
		case seen:
			cerr = cmdErr(CodeReplayed, "request_id %q was already handled; send a new id for a new request", cmd.RequestID)
		}
	}
	if cerr == nil {
		var err error
		switch cmd.Action {
		case ActionAcknowledge:
			err = p.op.Acknowledge(cmd.By)
		case ActionShelve:
			err = p.op.Shelve(time.Duration(cmd.DurationS*float64(time.Second)), cmd.Reason, cmd.By)
		case ActionUnshelve:
			err = p.op.Unshelve(cmd.By)
		}
		if err != nil {
			cerr = cmdErr(CodeRefused, "%v", err)
		}
	}
	p.note(func(s *Stats) {
		s.Commands++
		if cerr != nil {
			s.Rejected++
		}
	})
	if cerr != nil {
		p.cfg.Logger.Warn("command rejected", "request_id", cmd.RequestID, "action", cmd.Action, "code", cerr.Code, "err", cerr.Message)
	} else {
		p.cfg.Logger.Info("command carried out", "request_id", cmd.RequestID, "action", cmd.Action, "by", cmd.By)
	}
	if cerr == nil && cmd.Action == ActionStatus {
		if err := p.publishStatus(c, "online", ""); err != nil {
			return err
		}
	}
	seq, err := p.st.ReserveSeq()
	if err != nil {
		return err
	}
	action := cmd.Action
	switch action {
	case ActionAcknowledge, ActionShelve, ActionUnshelve, ActionStatus:
	default:
		action = "" // not echoed: it may be anything up to MaxCommandBytes
	}
	r := Response{Envelope: p.render.envelope(KindResponse, seq, now), RequestID: cmd.RequestID, Action: action,
		OK: cerr == nil, Error: cerr, AlarmState: p.op.Live().Alarm}
	payload, err := json.Marshal(r)
	if err != nil {
		return err
	}
	return p.wait(c.Publish(p.topics.Topic(KindResponse), 1, false, payload), "publish response")
}
