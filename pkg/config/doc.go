// Package config reads the live agent's one configuration file: YAML, parsed
// strictly. Every key must be known, every value must have the right type and
// range, and every error names the file, the line and the field by its dotted
// path (for example "agent.yaml:12: source.rate_hz: must be between 8000 and
// 48000, got 96000"), so a technician editing the file on site can fix it
// from the message alone.
//
// Units are in the key names: _hz, _s (seconds), _h (hours), _mb (mebibytes),
// _db. A key left out takes the default documented on its field and in
// configs/agent.example.yaml; Default returns the whole default configuration.
//
// The package only reads and checks; it opens no devices and no databases.
package config
