#!/usr/bin/python3
"""Reference values for tests/unit/match/test_sim.c.

Prints the corpus ("doc TEXT"), the queries ("query TEXT"), then one line
per (query, document): "pair Q D COS BM25 BM25N DCOV".

COS: scikit-learn (Debian's python3-sklearn) TfidfVectorizer(analyzer=
"char_wb", ngram_range=(3, 3), lowercase=False) fitted on the corpus: its
analyzer cuts the grams, its idf_ weighs them (ln((1 + N) / (1 + df)) + 1)
and its transform gives the documents' L2-normalised vectors.  A query
gram the corpus does not hold is kept in the query's norm with df = 0,
as src/match/sim.h states (scikit-learn drops it).

BM25: Okapi BM25 over whitespace words (Robertson & Zaragoza 2009),
written here with Python's standard library alone: k1 = 1.2, b = 0.75,
idf = ln(1 + (N - df + 0.5) / (df + 0.5)), summed over the query's
distinct words; BM25N divides by the query's score against itself (each
word once, |d| = |q|), capped at 1.

Words are aligned first (src/match/sim.h, written again here from its
text): a query word and a document word are one word when equal, when
they are two forms of one word (a shared start of at least 4 code points
and 60 % of the longer, at most 4 code points after it on each side) or
one typing slip apart (optimal string alignment distance 1, both at least
6 code points), or, for a query word no document holds, of 3 to 5 code
points, when it starts the document word and is at most half of it (a
word cut short: "dev" of "developer"); with at most 8 words on each side, a word that is a
compound of two words of the other side (the first as it is, the second
as it is, another form or, a query word, cut short; each at least 3
bytes) aligns with both.  A
query word absent from the document but aligned counts once in BM25, with
the idf of its own df.  DCOV: the share of the idf of the document's
distinct words that are aligned.
"""
import math
from collections import Counter

from sklearn.feature_extraction.text import TfidfVectorizer

DOCS = [
    "lagerist", "softwareentwickler", "femme de chambre", "kommissionierer",
    "reach truck driver", "verkaufer", "maschinenbauingenieur", "lagermitarbeiter", "gabelstaplerfahrer", "forklift driver",
    "forklift operator", "warehouse operative", "stock controller", "cashier",
    "kassierer", "software developer", "senior software developer",
    "développeur logiciel", "aide soignant", "ab", "a b c", "driver driver bus",
    "magazynier", "sprzedawca kasjer", "técnico de suporte informático",
    "ingénieur génie civil",
]
QUERIES = [
    "lagerist", "lagerst", "forklift driver", "forklift", "software develper",
    "développeur", "kasjer sprzedawca", "driver", "zzz qqq", "a", "génie civil",
    "técnico informático", "bus driver driver", "software entwickler",
    "sage femme", "kommisionierer", "reachtruck fahrer", "verkauferin",
    "forklift drivr", "kassiererin", "softwareentwicklerin", "software dev",
    "forkl driver", "dipl ing maschinenbau",
]

K1, B = 1.2, 0.75

vec = TfidfVectorizer(analyzer="char_wb", ngram_range=(3, 3), lowercase=False)
X = vec.fit_transform(DOCS)
vocab, idf, an = vec.vocabulary_, vec.idf_, vec.build_analyzer()
N = len(DOCS)
idf_unknown = math.log((1 + N) / 1) + 1
words = [d.split() for d in DOCS]
df = Counter(w for ws in words for w in set(ws))
avgdl = sum(len(ws) for ws in words) / N


def widf(w):
    return math.log(1 + (N - df.get(w, 0) + 0.5) / (df.get(w, 0) + 0.5))


def cut_bytes(w):
    return len(w.encode("utf-8"))


def stem(a, b):
    if a == b or cut_bytes(a) > 64 or cut_bytes(b) > 64:
        return False
    p = 0
    while p < len(a) and p < len(b) and a[p] == b[p]:
        p += 1
    ta, tb = len(a) - p, len(b) - p
    return p >= 4 and ta <= 4 and tb <= 4 and p >= 0.6 * max(len(a), len(b))


def osa(a, b):
    d = [[0] * (len(b) + 1) for _ in range(len(a) + 1)]
    for i in range(len(a) + 1):
        d[i][0] = i
    for j in range(len(b) + 1):
        d[0][j] = j
    for i in range(1, len(a) + 1):
        for j in range(1, len(b) + 1):
            c = 0 if a[i - 1] == b[j - 1] else 1
            d[i][j] = min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + c)
            if i > 1 and j > 1 and a[i - 1] == b[j - 2] and a[i - 2] == b[j - 1]:
                d[i][j] = min(d[i][j], d[i - 2][j - 2] + 1)
    return d[len(a)][len(b)]


def same(a, b):
    if a == b or stem(a, b):
        return True
    return (min(len(a), len(b)) >= 6 and cut_bytes(a) <= 64 and cut_bytes(b) <= 64
            and osa(a, b) == 1)


def cut_short(q, d):
    return (q not in df and 3 <= len(q) <= 5 and cut_bytes(d) <= 64 and d.startswith(q)
            and 2 * len(q) <= len(d))


def compound(a, L):
    for i, x in enumerate(L):
        if cut_bytes(x) < 3 or cut_bytes(x) + 3 > cut_bytes(a) or not a.startswith(x):
            continue
        r = a[len(x):]
        for j, y in enumerate(L):
            if r == y or stem(r, y) or cut_short(y, r):
                return i, j
    return None


def align(qws, dws):
    qm, dm = [False] * len(qws), [False] * len(dws)
    for i, a in enumerate(qws):
        for j, b in enumerate(dws):
            if same(a, b) or cut_short(a, b):
                qm[i] = dm[j] = True
    if len(qws) <= 8 and len(dws) <= 8:
        for j, b in enumerate(dws):
            c = None if dm[j] else compound(b, qws)
            if c:
                dm[j] = qm[c[0]] = qm[c[1]] = True
        for i, a in enumerate(qws):
            c = None if qm[i] else compound(a, dws)
            if c:
                qm[i] = dm[c[0]] = dm[c[1]] = True
    return qm, dm


for d in DOCS:
    print("doc " + d)
for q in QUERIES:
    print("query " + q)
for qi, q in enumerate(QUERIES):
    tf = Counter(an(q))
    qw = {g: n * (idf[vocab[g]] if g in vocab else idf_unknown) for g, n in tf.items()}
    qn = math.sqrt(sum(v * v for v in qw.values()))
    qwords = q.split()
    kq = K1 * (1 - B + B * len(qwords) / avgdl)
    self_score = sum(widf(w) * (K1 + 1) / (1 + kq) for w in set(qwords))
    for di, d in enumerate(DOCS):
        row = X[di]
        dv = {j: v for j, v in zip(row.indices, row.data)}
        dot = sum(v * dv.get(vocab[g], 0.0) for g, v in qw.items() if g in vocab)
        cos = dot / qn if qn else 0.0
        f = Counter(words[di])
        kd = K1 * (1 - B + B * len(words[di]) / avgdl)
        qws = list(dict.fromkeys(qwords))
        dws = list(dict.fromkeys(words[di]))
        qm, dm = align(qws, dws)
        bm = 0.0
        for w, m in zip(qws, qm):
            n = f[w] if w in f else (1 if m else 0)
            if n:
                bm += widf(w) * n * (K1 + 1) / (n + kd)
        bmn = min(1.0, bm / self_score) if self_score else 0.0
        dall = sum(widf(w) for w in dws)
        dcov = sum(widf(w) for w, m in zip(dws, dm) if m) / dall if dall else 0.0
        print("pair %d %d %.12f %.12f %.12f %.12f" % (qi, di, cos, bm, bmn, dcov))
