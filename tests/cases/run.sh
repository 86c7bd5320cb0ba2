#!/bin/sh
# The case table: every line of norm.tsv through titlemill norm (with
# --lang where the case names one), compared with the expected title;
# norm-facets.tsv through --json for the facets.
exec /usr/bin/python3 "$(dirname "$0")/check_cases.py" "${TITLEMILL:-./titlemill}" "$(dirname "$0")"
