#!/bin/sh
# Case forms and place adjectives generated from the gazetteer
# (lexicons/places/inflected.txt): the file as the generator writes it,
# the Polish locatives against Debian's wpolish word list, and sampled
# forms in titles, stripped.
exec /usr/bin/python3 "$(dirname "$0")/check_inflected.py" "${TITLEMILL:-./titlemill}" "$(dirname "$0")/../.."
