#!/bin/sh
# Properties of titlemill norm per language over titles and noise
# segments drawn from the lexicons (check_properties.py): a noise segment
# after the title or before it with a colon leaves the title as it was;
# idempotence; N lines in, N out.  The failure rate per language stays
# at or under tests/cases/properties-ceiling.tsv.
exec /usr/bin/python3 "$(dirname "$0")/check_properties.py" "${TITLEMILL:-./titlemill}" "$(dirname "$0")/../.."
