// Package schema holds the JSON Schemas (draft 2020-12) of the agent's MQTT
// payloads, one file per message kind (<kind>.schema.json, with $id
// https://auscult.invalid/schema/<kind>.schema.json), and validates
// payloads against them.
//
// The schemas describe what this version of the agent sends (and, for
// "command", what it accepts) exactly: closed objects, enumerated names and
// UTC times with milliseconds. docs/messages.md explains the messages;
// bridges may copy the files from here.
package schema

import "embed"

// FS holds the schema files, named <kind>.schema.json.
//
//go:embed *.schema.json
var FS embed.FS
