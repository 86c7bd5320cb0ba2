#!/usr/bin/python3
"""What reaches the delta, checked from outside the tool.

--check QUEUE TSV TTL NT
    The exports of QUEUE read back with Python's csv module and with
    rdflib (Debian's python3-rdflib) hold exactly the accepted items: one
    TSV row each with the fields the queue holds, one SKOS triple for each
    accepted new label, nothing more.  Prints "ok N rows M triples".

--run TITLEMILL DIR --count N --seed S
    Generates N suggestions whose strings are drawn from hostile pieces
    (tabs, line ends, C0 and C1 controls, line separators, quotes, IRI
    delimiters, bidirectional controls, noncharacters, malformed language
    tags, overlong fields), takes each into a queue with its own
    `review add`, and checks the verdict against the rules written here
    a second time (the README's list, and RFC 5646's grammar as a regular
    expression); accepts what was taken, with generated reviewer names and
    notes, then exports all three formats and runs --check.  Prints "ok".
"""
import csv
import json
import os
import random
import re
import subprocess
import sys

SKOS = "http://www.w3.org/2004/02/skos/core#"
BASE = "http://data.valdoria.example/occupation/"

# ---- the rules, written again from the standards ----

# RFC 5646 section 2.1
_AN = "[A-Za-z0-9]"
_LANGTAG = (
    "(?:[A-Za-z]{2,3}(?:-[A-Za-z]{3}){0,3}|[A-Za-z]{4}|[A-Za-z]{5,8})"  # language
    "(?:-[A-Za-z]{4})?"  # script
    "(?:-(?:[A-Za-z]{2}|[0-9]{3}))?"  # region
    "(?:-(?:%s{5,8}|[0-9]%s{3}))*" % (_AN, _AN)  # variants
    + "(?:-[0-9A-WY-Za-wy-z](?:-%s{2,8})+)*" % _AN  # extensions
    + "(?:-[xX](?:-%s{1,8})+)?" % _AN  # private use
)
_PRIVATE = "[xX](?:-%s{1,8})+" % _AN
_IRREGULAR = ("en-GB-oed i-ami i-bnn i-default i-enochian i-hak i-klingon i-lux i-mingo "
              "i-navajo i-pwn i-tao i-tay i-tsu sgn-BE-FR sgn-BE-NL sgn-CH-DE").split()
LANG_RE = re.compile("(?:%s|%s)\\Z" % (_LANGTAG, _PRIVATE))


def utf8_len(s):
    try:
        return len(s.encode("utf-8"))
    except UnicodeEncodeError:  # a lone surrogate
        return None


def breaks(s):
    return any(ord(c) < 0x20 or 0x7F <= ord(c) <= 0x9F or c in "\u2028\u2029" for c in s)


def text_ok(s, most):
    n = utf8_len(s)
    return n is not None and 1 <= n <= most and not breaks(s)


def lang_ok(s):
    if not text_ok(s, 64):
        return False
    return bool(LANG_RE.match(s)) or s.lower() in (t.lower() for t in _IRREGULAR)


def iri_char(c):
    o = ord(c)
    if o < 0x80:
        return c.isascii() and (c.isalnum() or c in "-._~:/?#[]@!$&'()*+,;=")
    if o in (0x200E, 0x200F) or 0x2028 <= o <= 0x202E or 0x2066 <= o <= 0x2069:
        return False  # RFC 3987 section 4.1, and the line separators
    ranges = [(0xA0, 0xD7FF), (0xE000, 0xF8FF), (0xF900, 0xFDCF), (0xFDF0, 0xFFEF),
              (0xE1000, 0xEFFFD)]
    ranges += [(p << 16, (p << 16) + 0xFFFD) for p in range(1, 17) if p != 14]
    return any(a <= o <= b for a, b in ranges)


def occ_ok(s):
    n = utf8_len(s)
    if n is None or not 1 <= n <= 2048:
        return False
    i = 0
    while i < len(s):
        if s[i] == "%":
            if not re.match("[0-9A-Fa-f]{2}", s[i + 1:i + 3]):
                return False
            i += 3
            continue
        if not iri_char(s[i]):
            return False
        i += 1
    return True


def id_ok(s):
    return 1 <= len(s) <= 64 and all(0x21 <= ord(c) <= 0x7E for c in s)


def suggestion_ok(s):
    """Whether review add must take suggestion s (a dict)."""
    checks = [id_ok(s["id"]), occ_ok(s["occupation"]), lang_ok(s["lang"]),
              text_ok(s["label"], 512)]
    for k in ("label_as_written", "variant_of", "occupation_label"):
        if isinstance(s.get(k), str):
            checks.append(text_ok(s[k], 512))
    c = s.get("competitor")
    if isinstance(c, dict) and isinstance(c.get("occupation"), str):
        checks.append(occ_ok(c["occupation"]))
    return all(checks)


# ---- read back ----

def is_iri(s):
    return re.match("[A-Za-z][A-Za-z0-9+.-]*:", s) is not None


def expected(queue, base):
    rows, triples = [], set()
    for line in open(queue, encoding="utf-8"):
        it = json.loads(line)
        if it["status"] != "accepted":
            continue
        dec = [e for e in it["history"] if e["event"] in ("accepted", "rejected", "deferred")][-1]
        ev = it["evidence"]
        w = ev.get("label_as_written")
        text = w if isinstance(w, str) and w else it["label"]
        review = it["kind"] in ("rare_label", "used_elsewhere")
        if review:
            lk = ev.get("label_kind")
            kind = {"pref": "pref", "hidden": "hidden"}.get(lk, "alt")
            if it["kind"] == "rare_label":
                reason = "rare: %d of %d postings of the occupation" % (
                    it["postings"], ev.get("occupation_postings", 0))
            else:
                c = ev.get("competitor") or {}
                rival = c.get("occupation") if isinstance(c.get("occupation"), str) else None
                reason = "used elsewhere: %s has %d of its %d postings" % (
                    rival or "another occupation", c.get("postings", 0), ev.get("key_postings", 0))
        else:
            kind = "alt" if it["kind"] == "new_alt_label" else "hidden"
            reason = ""
            occ = it["occupation"] if is_iri(it["occupation"]) or not base else base + it["occupation"]
            triples.add((occ, SKOS + kind + "Label", text, it["lang"].lower()))
        ol = ev.get("occupation_label")
        rows.append([it["occupation"], kind, it["lang"], text, "review" if review else "add",
                     it["id"], dec["reviewer"], dec["at"], dec.get("note", ""), reason,
                     ol if isinstance(ol, str) else ""])
    return rows, triples


def check(queue, tsv, ttl, nt, base=None):
    import rdflib
    rows, triples = expected(queue, base)
    with open(tsv, encoding="utf-8", newline="") as f:
        got = list(csv.reader(f, delimiter="\t", quoting=csv.QUOTE_NONE, strict=True))
    head = "occupation kind lang label change id reviewer decided_at note reason occupation_label".split()
    if not got or got[0] != head:
        return "TSV header: %r" % (got[:1],)
    if sorted(got[1:]) != sorted(rows):
        extra = [r for r in got[1:] if r not in rows]
        missing = [r for r in rows if r not in got[1:]]
        return "TSV rows differ: extra %r missing %r" % (extra[:3], missing[:3])
    for path, fmt in ((ttl, "turtle"), (nt, "nt")):
        g = rdflib.Graph()
        g.parse(path, format=fmt)
        have = set((str(s), str(p), str(o), (o.language or "").lower()) for s, p, o in g)
        if have != triples:
            return "%s triples differ: extra %r missing %r" % (
                fmt, sorted(have - triples)[:3], sorted(triples - have)[:3])
    return "ok %d rows %d triples" % (len(rows), len(triples))


# ---- generated hostile strings ----

PIECES = (list("abcdefgKLMxyz0123456789 -_.:/?#[]@!$&'()*+,;=~%") +
          ["\t", "\n", "\r", "\x0b", "\x0c", "\x00", "\x1b", "\x7f", "\x85", "\x9b", "\xa0",
           "\u2028", "\u2029", "\u202e", "\u200e", "\u2066", "\ufeff", "\ufffe", "\ufdd0",
           "\U000E0001", "\U000F0000", "\u00f6", "\u00e9", "\U0001F373", "\u0301", "\ud800",
           '"', "\\", "<", ">", "{", "}", "|", "^", "`", '"""', "'''", "^^", "@de", " .\n",
           "%4", "%C3%B6", "\t\n", "\r\n"])
SUBTAGS = ["de", "DE", "at", "AT", "en", "x", "X", "i", "klingon", "Hant", "Latn", "1901",
           "rozaj", "a", "b", "u", "ca", "419", "123", "abcdefghi", "zh", "cmn", "yue", "sl",
           "", "de ", "d\u00e9", "de\n", "a1", "1", "twain", "private"]


def hostile(rng, legal_bias):
    if rng.random() < legal_bias:
        pool = [p for p in PIECES if not breaks(p) and "\ud800" not in p]
    else:
        pool = PIECES
    s = "".join(rng.choice(pool) for _ in range(rng.randint(1, 12)))
    if rng.random() < 0.03:
        s = s * (600 // max(1, len(s)) + 1)  # past the length limits
    return s


def gen_lang(rng):
    r = rng.random()
    if r < 0.3:
        return rng.choice(["de", "de-AT", "en-US", "fr", "zh-Hant-TW", "sl-rozaj-biske", "i-klingon",
                           "x-private", "en-GB-oed", "de-CH-1901", "en-a-bbb-x-a-ccc"])
    if r < 0.9:
        return "-".join(rng.choice(SUBTAGS) for _ in range(rng.randint(1, 5)))
    return hostile(rng, 0.3)


def gen(rng, i):
    o = "http://data.valdoria.example/occupation/"
    s = {"id": "%016x" % (0xa000 + i), "kind": rng.choice(["new_alt_label", "new_hidden_label",
                                                           "new_alt_label", "used_elsewhere"]),
         "occupation": o + str(i), "lang": "de", "label": "lagerist %d" % i,
         "score": 9, "postings": 9, "occupation_postings": 20, "key_postings": 30}
    if s["kind"] == "used_elsewhere":
        s["competitor"] = {"occupation": o + "r%d" % i, "postings": 12}
        s["label_kind"] = rng.choice(["pref", "alt", "hidden"])
    if rng.random() < 0.5:
        s["label_as_written"] = "Lagerist %d" % i
    if rng.random() < 0.5:
        s["occupation_label"] = "Fachkraft für Lagerlogistik %d" % i
    # corrupt one field or two, or none
    for _ in range(rng.choice([0, 1, 1, 1, 2])):
        f = rng.choice(["occupation", "lang", "label", "label_as_written", "competitor", "id",
                        "variant_of", "occupation_label"])
        if f == "lang":
            s["lang"] = gen_lang(rng)
        elif f == "occupation":
            s["occupation"] = (o if rng.random() < 0.7 else "") + hostile(rng, 0.6)
        elif f == "competitor" and "competitor" in s:
            s["competitor"]["occupation"] = o + hostile(rng, 0.5)
        elif f == "id":
            s["id"] = "%016x" % (0xa000 + i) + hostile(rng, 0.3)[:4]
        elif f != "competitor":
            s[f] = hostile(rng, 0.6)
    return s


def run(tm, d, count, seed):
    rng = random.Random(seed)
    os.makedirs(d, exist_ok=True)
    q = os.path.join(d, "q.jsonl")
    env = dict(os.environ, TITLEMILL_NOW="2026-12-01T09:00:00Z")
    taken, bad, seen = [], [], set()
    for i in range(count):
        s = gen(rng, i)
        if s["id"] in seen:
            continue
        line = json.dumps(s, ensure_ascii=rng.random() < 0.5, separators=(",", ":"))
        try:
            data = (line + "\n").encode("utf-8")
        except UnicodeEncodeError:
            data = (json.dumps(s, ensure_ascii=True) + "\n").encode("ascii")
        want = suggestion_ok(s)
        p = subprocess.run([tm, "review", "add", "--queue", q, "-"], input=data,
                           capture_output=True, env=env)
        if p.returncode != (0 if want else 1) or (not want and b"<stdin>:1: " not in p.stderr):
            bad.append("line %d: want %s, exit %d: %s %r" % (
                i, "taken" if want else "refused", p.returncode,
                p.stderr.decode("utf-8", "replace").strip()[:200], line[:300]))
        if p.returncode == 0:
            taken.append(s["id"])
            seen.add(s["id"])
    # decisions with generated names and notes: the refused ones change
    # nothing, the others are recorded
    accepted = []
    for k in range(0, len(taken), 7):
        ids = taken[k:k + 7]
        who = hostile(rng, 0.7).replace("\x00", "")
        note = hostile(rng, 0.7).replace("\x00", "") if rng.random() < 0.7 else ""
        if "\ud800" in who + note:
            continue
        want = text_ok(who, 128) and (note == "" or text_ok(note, 2000))
        args = [tm, "review", "accept", "--queue", q, "--reviewer", who]
        if note:
            args += ["--note", note]
        p = subprocess.run(args + ids, capture_output=True, env=env)
        if p.returncode != (0 if want else 2):
            bad.append("accept by %r note %r: want %s, exit %d: %s" % (
                who, note, "recorded" if want else "refused", p.returncode,
                p.stderr.decode("utf-8", "replace").strip()[:200]))
        if p.returncode != 0:
            p = subprocess.run([tm, "review", "accept", "--queue", q, "--reviewer", "ana"] + ids,
                               capture_output=True, env=env)
        accepted += ids
    outs = []
    for fmt, ext in (("tsv", "tsv"), ("turtle", "ttl"), ("ntriples", "nt")):
        out = os.path.join(d, "delta." + ext)
        p = subprocess.run([tm, "review", "export", "--queue", q, "--format", fmt, "-o", out,
                            "--base", BASE], capture_output=True, env=env)
        if p.returncode != 0:
            bad.append("export %s: exit %d: %s" % (fmt, p.returncode, p.stderr.decode()[:300]))
        outs.append(out)
    if not bad:
        r = check(q, *outs, base=BASE)
        if not r.startswith("ok"):
            bad.append(r)
        print("%d suggestions, %d taken, %d accepted: %s" % (count, len(taken), len(accepted), r))
        if len(taken) < count // 5 or len(taken) > count * 4 // 5:
            bad.append("the generator's mix is off: %d of %d taken" % (len(taken), count))
    for b in bad[:20]:
        print(b)
    print("ok" if not bad else "FAILED: %d" % len(bad))
    return 0 if not bad else 1


def main(argv):
    if argv[1:2] == ["--check"]:
        r = check(*argv[2:6])
        print(r)
        return 0 if r.startswith("ok") else 1
    if argv[1:2] == ["--run"]:
        tm, d = argv[2], argv[3]
        count = int(argv[argv.index("--count") + 1])
        seed = int(argv[argv.index("--seed") + 1])
        return run(tm, d, count, seed)
    print(__doc__)
    return 2


if __name__ == "__main__":
    sys.exit(main(sys.argv))
