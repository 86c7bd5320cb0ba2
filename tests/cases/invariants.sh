#!/bin/sh
# Invariants of titlemill norm on random bytes and on the case table:
# N lines in, N lines out; output valid UTF-8; norm is idempotent.
exec /usr/bin/python3 "$(dirname "$0")/check_invariants.py" "${TITLEMILL:-./titlemill}" "$(dirname "$0")"
