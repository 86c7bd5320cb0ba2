#!/usr/bin/python3
"""Reference values for tests/unit/match/test_sim.c.

Prints the corpus ("doc TEXT"), the queries ("query TEXT"), then one line
per (query, document): "pair Q D COS BM25 BM25N".

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
"""
import math
from collections import Counter

from sklearn.feature_extraction.text import TfidfVectorizer

DOCS = [
    "lagerist", "lagermitarbeiter", "gabelstaplerfahrer", "forklift driver",
    "forklift operator", "warehouse operative", "stock controller", "cashier",
    "kassierer", "software developer", "senior software developer",
    "développeur logiciel", "aide soignant", "ab", "a b c", "driver driver bus",
    "magazynier", "sprzedawca kasjer", "técnico de suporte informático",
    "ingénieur génie civil",
]
QUERIES = [
    "lagerist", "lagerst", "forklift driver", "forklift", "software develper",
    "développeur", "kasjer sprzedawca", "driver", "zzz qqq", "a", "génie civil",
    "técnico informático", "bus driver driver",
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
        bm = sum(widf(w) * f[w] * (K1 + 1) / (f[w] + kd) for w in set(qwords) if w in f)
        bmn = min(1.0, bm / self_score) if self_score else 0.0
        print("pair %d %d %.12f %.12f %.12f" % (qi, di, cos, bm, bmn))
