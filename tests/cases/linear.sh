#!/bin/sh
# Linear time in the line length: titlemill norm on adversarial title
# shapes at 64 KiB and at the 1 MiB line limit, against a plain line of
# the same length (see check_linear.py).
exec /usr/bin/python3 "$(dirname "$0")/check_linear.py" "${TITLEMILL:-./titlemill}"
