#!/usr/bin/python3
"""Every stage of titlemill norm is linear in the line length.

Each adversarial shape is repeated to a line of 64 KiB (16 such lines)
and to one line of 1 MiB less a byte (the line limit), so both files
hold the same bytes; each is timed (processor time, user and system, of
`titlemill norm --memo 0`: every line cleaned) against a file of plain
short words ("ab ", a token every three bytes) of the same line length
and size.  A shape fails when
- it takes more than RATIO times the plain file plus SLACK seconds
  (start-up), at either size; or
- its 1 MiB line takes more than GROWTH times its 16 lines of 64 KiB
  (the same bytes: 1 when linear, a little more from the caches; 16 when
  quadratic); or
- a run goes past TIMEOUT seconds (a quadratic shape at 1 MiB runs for
  minutes); or
- a run exits with a status other than 0.
With TITLEMILL_UNTIMED=1 (`make asan`: the times would measure the
sanitizer) each shape runs once, as its 1 MiB line, and only the exit
status and TIMEOUT judge it.
Quadratic costs found before: a run of "@" took 33 s at 160 KiB, marks
of alternating combining classes 58 s at 80 KiB, "#" and "Nr." 11 s at
64 KiB; each would have run for half an hour or more at 1 MiB;
"a b c d e GmbH " took 18 s at 1 MiB.

    check_linear.py TITLEMILL [SHAPE...]    (LINEAR_VERBOSE=1: the figures)
"""
import os
import resource
import subprocess
import sys
import tempfile

# times the plain line of the same length: the token-dense shapes ("a/",
# "a.", "+1 " repeated: a token every two bytes, each a candidate for a
# rule) measure 9-12 times the plain line at 64 KiB on an idle machine
# (2026-12-05), 5-7 times at 1 MiB, and up to 16 and 9 times on a machine
# that has just run the other suites (2026-12-05, load about 2: a CI run
# failed at 1.41 s against 1.28 s); quadratic costs show as 100 times
# and more (53 times at 1 MiB for the shape added last), and in GROWTH
# below
RATIO = 20.0
GROWTH = 8.0     # 1 MiB line against 16 lines of 64 KiB
SLACK = 0.3      # seconds
TIMEOUT = 60     # seconds per run (wall clock)

# name: the unit repeated (or a function of the length in bytes)
SHAPES = {
    "at": "@",
    "word-at": "a@",
    "mail-ish": "a@b.",
    "hash": "#",
    "hash-word": "#a",
    "ref": "Ref. ",
    "ref-nr": "Nr.",
    "slash": "/",
    "word-slash": "a/",
    "open-paren": "(",
    "close-paren": ")",
    "nested": lambda n: "[" * (n // 2 - 2) + "Koch" + "]" * (n // 2 - 2),
    "dash": "-",
    "spaced-dash": " - ",
    "word-dash": "a-",
    "digits": "1",
    "numbers": "1 ",
    "phone-ish": "0 ",
    "plus-digits": "+49 ",
    "zero-dot": "0.",
    "dots": ".",
    "word-dots": "a.",
    "amp": "&",
    "ref-named": "&eacute;",
    "ref-numeric": "&#1234",
    "ref-amp-chain": "&amp;amp",
    "tag": "<b>",
    "tag-open": "<span ",
    "tag-quote": '<b a="',
    "tag-in-open": "<p<b>",
    "tag-in-ref": "&a<b></b>",
    "sigma": "ΑΣ ",
    "sigma-marks": "ΑΣ\u0301\u0301",
    "label-mail": "CV an a@b.example ",
    "plus": "+",
    "percent": "1 %",
    "colon": ":",
    "comma-segments": "a, ",
    "pipe-segments": "a|",
    "tokens": "ab ",
    "one-word": lambda n: "a" * n,
    "digit-word": lambda n: "a1" * (n // 2),
    "caps-code": "AB-",
    "ref-code": "Ref.: AB-",
    "job-code": "JR12345 ",
    "hashtag": "#job ",
    "csharp": "c# ",
    "postcode": "10115 Berlin ",
    "postcode-de": "D-10115 ",
    "city-list": "Berlin, ",
    "gender-star": "Verk\u00e4ufer*innen ",
    "gender-slash": "Koch/K\u00f6chin ",
    "gender-dash": "Kauffrau/-mann ",
    "gender-run": lambda n: "Koch " + "(m/w/d) " * ((n - 5) // 8),
    "seniority-pair": "Senior/Junior ",
    "gender": "(m/w/d) ",
    "gender-pair": "m/w ",
    "innen": "/innen ",
    "colon-in": ":in ",
    "senior": "Senior ",
    "ab-sofort": "ab sofort ",
    "in-berlin": "in Berlin ",
    "berlin": "Berlin ",
    "employer": "GmbH ",
    "employer-name": "Koch GmbH ",
    "employer-marker": "bei Valdoria GmbH ",
    "employer-brackets": "a GmbH (m/w/d) ",
    "employer-run": lambda n: "Koch " + "GmbH " * ((n - 5) // 5),
    "employer-far": "a b c d e GmbH ",
    "marker-far": "a b c d e bei ",
    "und": "und ",
    "pay": "50.000 € ",
    "k-pay": "50k ",
    "euro": "\u20ac",
    "hours": "20 h ",
    "grade": "Band 1 ",
    "grade-codes": lambda n: "Koch Band " + "1 " * ((n - 10) // 2),
    "grade-segments": "Band 1, ",
    "grade-linking": "Koch Band 1 da ",
    "days": "Mo-Fr 7-15 ",
    "days-spaced": "Mo Fr ",
    "head-count": "5 posts ",
    "multiplier": "x2 ",
    "degree": "fuld ",
    "shift-times": "Schicht 6-14 / 14-22 / ",
    "shift-ranges": lambda n: "Schicht " + "6-14 / " * ((n - 8) // 7),
    "work-noun": "Lagerist work 100% remote ",
    "percent-first": "%1",
    "star-rating": "5* ",
    "with-remark": "Koch mit Pr\u00e4mie ",
    "edge-codes": "HR-2231 ",
    "recruiting-verb": "Valdoria sucht Koch ",
    "lone-numbers": lambda n: "Vollzeit " + "9 " * ((n - 9) // 2),
    "koch-mix": "Koch (m/w/d) in Berlin - ",
    "employer-segments": "Hotel Bergblick \u2013 ",
    # segments naming no occupation, then many that name one: whether
    # another segment names one is read once per segment (pass_noise.c,
    # need_segment: NEED_LOOK)
    "occupation-after-noise": lambda n: "a, " * (n // 12) + "Koch, " * ((n - 3 * (n // 12)) // 6),
    "employer-tail": "f\u00fcr unser Hotel Sonne ",
    "marker-place-name": "Koch at Fenwick Logistics ",
    "place-first": "Salzburg: ",
    "place-region": "Koch \u2013 Salzburg, Pinzgau, ",
    "name-ending": "\u00c5keri Lindqvist | ",
    "at-obfuscated": "jobs(at)",
    "dot-obfuscated": "a [dot] ",
    "host-in-brackets": "(a.b",
    "host-path": "(a.b/c",
    "phone-then-date": lambda n: "00 " * ((n - 11) // 3) + " 01.03.2026",
    "plus-phone": "+4",
    "http": "http://",
    "www": "www.",
    "query": "a.b/c?d=",
    "html-entity": "&amp;",
    "broken-entity": "&#",
    "invalid-utf8": b"\xff",
    "nul": b"\x00a",
    "marks": lambda n: "a" + "\u0301" * ((n - 1) // 2),
    "marks-alternating": lambda n: "a" + "\u0316\u0301" * ((n - 1) // 4),
    "marks-only": "\u0301",
    "marks-on-space": " \u0301",
    "hangul-jamo": "\u1100\u1161\u11a8",
    "ligature": "\ufb03",
    "greek-sigma": "\u03c3\u03c2",
    "titlecase": "\u01c5",
    "zwj": "a\u200d",
    "soft-hyphen": "a\u00ad",
    "emoji": "\U0001F468\u200d\U0001F373",
    "nbsp": "a\u00a0",
    "tabs": "a\t",
    "cr": "a\r",
    "link-words": "Leiter der ",
    "link-chain": "Saisonnier cueillette des ",
    "link-slot": "Medico di base a Bologna ",
    "firm-lower": "traductor en cl\u00ednica orvenda s.l. ",
    "firm-lower-run": "x en y s.l. ",
    "firm-place": "Koch bei Valdoria GmbH Berlin ",
    "city-lower": "koch berlin ",
}


def line_of(shape, n):
    """The shape as one line of about n bytes (no newline)."""
    if callable(shape):
        s = shape(n)
        b = s.encode("utf-8")
    else:
        u = shape if isinstance(shape, bytes) else shape.encode("utf-8")
        b = u * (n // len(u))
    return b[:n]


def plain(n):
    w = b"ab "
    return (w * (n // len(w) + 1))[:n]


def run(binary, path):
    """Processor time of one run in seconds (None past TIMEOUT) and its
    exit status."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    try:
        p = subprocess.run([binary, "norm", "--memo", "0", path], stdout=subprocess.DEVNULL,
                           stderr=subprocess.DEVNULL, timeout=TIMEOUT, check=False)
    except subprocess.TimeoutExpired:
        return None, 0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime), p.returncode


def untimed(binary, names):
    """TITLEMILL_UNTIMED=1 (the sanitizer build, whose times measure the
    sanitizer): every shape once as a line of 1 MiB, judged by its exit
    status alone (a sanitizer's finding exits non-zero)."""
    failures = 0
    with tempfile.TemporaryDirectory() as d:
        for name in names:
            path = os.path.join(d, name)
            with open(path, "wb") as f:
                f.write(line_of(SHAPES[name], (1 << 20) - 1) + b"\n")
            t, st = run(binary, path)
            os.unlink(path)
            if t is None or st != 0:
                failures += 1
                print("  linear-%s: %s" % (name, "past %d s" % TIMEOUT if t is None
                                           else "exit status %d" % st))
    return 1 if failures else 0


def main():
    binary = sys.argv[1]
    names = sys.argv[2:] or list(SHAPES)
    verbose = os.environ.get("LINEAR_VERBOSE")
    if os.environ.get("TITLEMILL_UNTIMED") == "1":
        return untimed(binary, names)
    failures = 0
    times = {}
    with tempfile.TemporaryDirectory() as d:
        for size, lines in ((64 << 10, 16), ((1 << 20) - 1, 1)):
            pfile = os.path.join(d, "plain")
            with open(pfile, "wb") as f:
                f.write((plain(size) + b"\n") * lines)
            base = min(run(binary, pfile)[0] for _ in range(3))
            for name in names:
                path = os.path.join(d, name)
                with open(path, "wb") as f:
                    f.write((line_of(SHAPES[name], size) + b"\n") * lines)
                t, st = run(binary, path)
                os.unlink(path)
                limit = RATIO * base + SLACK
                if t is not None and st != 0:
                    failures += 1
                    print("  linear-%s-%d: exit status %d" % (name, size, st))
                times.setdefault(name, []).append(t)
                if verbose:
                    print("  %-18s %8d x %-2d %8s s  plain %.3f s  x%s" % (
                        name, size, lines, "%.3f" % t if t is not None else "timeout",
                        base, "%.1f" % (t / base) if t is not None else "-"))
                if t is None or t > limit:
                    failures += 1
                    print("  linear-%s-%d: %s (plain line %.3f s, limit %.2f s)" % (
                        name, size, "past %d s" % TIMEOUT if t is None else "%.2f s" % t,
                        base, limit))
    for name in names:
        small, big = times[name]
        if small is not None and big is not None and big > GROWTH * small + SLACK:
            failures += 1
            print("  linear-growth-%s: 1 MiB line %.2f s, 16 lines of 64 KiB %.2f s" % (
                name, big, small))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
