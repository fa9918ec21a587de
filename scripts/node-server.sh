#!/bin/sh
# The one place that sets how Node.js runs the Ferrolane server: npm start, the bench's server, the
# cluster scripts, the tests that start a server process and the systemd unit all start it through
# this file, the entry (and any extra node arguments) after it:
#   scripts/node-server.sh dist-server/server/index.js
# NODE names the node binary (default: the first on PATH). `exec`, so the server keeps this pid and
# signals reach node itself.
# --heap-growing-percent=100: after each full collection V8 lets the old generation grow to twice
# what survived it (the cap V8 itself applies on devices with little memory) instead of up to four
# times; under the 32-connection worklist load the heap then peaks near 90 MB instead of 130 MB, for
# about two more full collections per 1000 requests (README, performance notes, "Memory").
exec "${NODE:-node}" --heap-growing-percent=100 "$@"
