// Package publish sends the agent's alarms, summaries, diagnostics and
// state changes to an MQTT broker, and takes operator commands from it.
//
// Store and forward: every outgoing message is first committed to the
// local log's outbox (package store), in the same transaction as the event
// or summary it carries. The Publisher drains that outbox in sequence
// order with QoS 1 and deletes a message only after the broker's PUBACK.
// After a lost connection or a restart it starts again from the oldest
// message still queued, so a receiver may see a message twice (with the
// same seq) but never misses one that the outbox kept. Paho's own session
// store is not relied on: the client runs with a clean session and no
// automatic reconnect, so a publish token completes with an error when the
// connection drops instead of completing as if delivered.
//
// Topics are <prefix>/<site>/<asset>/<kind>; payloads are JSON with a
// schema version, the asset, a per-agent sequence number that only grows
// and UTC RFC 3339 times with milliseconds. docs/messages.md describes
// them and pkg/publish/schema holds their JSON Schemas.
//
// Status is retained: "online" on every connect, "offline" as the will
// (an agent that died) and on a clean stop. A receiver therefore tells a
// dead agent from a quiet one without polling.
package publish
