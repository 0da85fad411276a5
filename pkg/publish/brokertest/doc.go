// Package brokertest runs a real MQTT broker, and a real subscriber, for a
// test, the way net/http/httptest runs an HTTP server.
//
// Start launches Mosquitto from Debian's mosquitto package on free loopback
// ports with a configuration generated from Options: plain or TLS
// (certificates made in the test), users from a password file made with
// mosquitto_passwd, an ACL, a persistence database, a WebSockets listener.
// Broker.Subscribe runs mosquitto_sub from Debian's mosquitto-clients
// package, an MQTT client this project did not write, and collects what it
// receives. Stop, Start and Kill restart or crash the broker on the same
// ports. Everything the broker writes lives in Broker.Dir, and Broker.Log
// returns its log for failure messages.
//
// When a program is missing the test is skipped, unless the environment has
// CI=true, in which case it fails: mosquitto (package mosquitto),
// mosquitto_passwd (mosquitto, only for Options.Users), mosquitto_sub
// (mosquitto-clients) and stdbuf (coreutils).
//
// # Behaviour found by experiment
//
// With mosquitto and mosquitto-clients 2.0.11-1.2+deb12u2 on Debian 12:
//
//   - Run as root, mosquitto switches to user "mosquitto", which cannot read
//     the test's 0700 temporary folder; the generated configuration says
//     "user root" to stay root. Run as any other user it ignores that line.
//     It still prints a warning about running as root, which Log shows.
//   - On SIGTERM mosquitto writes its persistence database before exiting;
//     on SIGKILL it does not, and with the default autosave interval (30
//     minutes) a killed broker comes back with the sessions and retained
//     messages of its last clean stop, or none.
//   - mosquitto_sub reconnects by itself when the broker goes away, about
//     once a second (libmosquitto's loop_forever with its default reconnect
//     delay), and sends SUBSCRIBE again after every CONNACK, persistent
//     session or not. Retained messages matching the filter therefore
//     arrive again, with Retained set, after each reconnect.
//   - With a persistent session (-c, fixed client id), QoS 1 and
//     Options.Persistence, the session outlives Stop and Start: a QoS 1
//     message published after the restart while mosquitto_sub is still
//     disconnected is queued, and delivered right after its CONNACK (session
//     present), before the SUBACK of its new SUBSCRIBE. Without Persistence
//     the restarted broker has no session, and such a message is lost.
//   - A publish the ACL denies is still acknowledged (MQTT 3.1.1 has no way
//     to refuse a PUBLISH) and is silently dropped; only the broker log
//     tells, with a "Denied PUBLISH" line.
//   - A wrong password and an anonymous client, when Users are set, both get
//     CONNACK return code 5 (not authorized) under MQTT 3.1.1.
//   - A TLS listener with require_certificate refuses a client without a
//     certificate during or just after the handshake; paho's Connect returns
//     an error (a TLS alert or a reset connection).
//   - The WebSockets listener works (the package depends on no libwebsockets
//     library, yet accepts "protocol websockets") but binds every interface
//     whatever address its listener line gives.
//   - mosquitto_sub flushes its standard output after each message but not
//     after its -d debug lines; run through "stdbuf -oL" it is line-buffered.
//
// # Knowing that a subscription is active
//
// Subscribe returns only when the broker has acknowledged the subscription:
// mosquitto_sub runs with -d under stdbuf -oL, and Subscribe waits for the
// "Subscribed (mid: N): QOS" line it prints on receiving SUBACK. The broker
// sends SUBACK after adding the subscription, so any later publish that
// matches is delivered. This needs no probe message and no reading of the
// broker log. Messages are printed with -F as tab-separated fields (retain
// flag, QoS, payload in hex, topic), so payloads may hold any bytes; a
// topic must not hold a line break.
//
// Broker.Start waits for mosquitto's "mosquitto version ... running" log
// line rather than for a connection to the port, which another process
// holding the port while the broker was down could accept.
package brokertest
