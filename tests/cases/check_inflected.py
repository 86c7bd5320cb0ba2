"""Case forms and place adjectives of lexicons/places/inflected.txt.

1. The file is what lexicons/tools/gen-inflected.py writes: its header
   names the script, every line has four columns and a known WHERE, and
   the Polish forms below are in it.  Where the generator's Debian inputs
   are installed (GEN_PACKAGES), the generator is run on a copy of
   today's lexicons and its output must equal the committed file byte for
   byte: an edit of the gazetteer or of any lexicon (whose words make a
   form `strong`) without regenerating is found here.  Skipped with a
   notice where they are not (the CI machine does not install them).
2. Outside check of the Polish rules: Debian's word list `wpolish`
   (/usr/share/dict/polish, from the sjp.pl dictionary) holds the
   inflected forms of many Polish place names.  For every single-word
   Polish name of the gazetteer that the list holds as a word, one of the
   locatives the rules make must be in the list for at least
   PL_FLOOR of them (the rules are rules of thumb; 93 % when written).
   Skipped with a notice when the list is not installed.  No Debian word
   list holds the case forms of Finnish, Estonian, Hungarian, Czech,
   Slovak, Slovene, Croatian, Lithuanian or Latvian place names; those
   rules are rules of thumb checked by the titles below and the case
   table (tests/cases/lang/) only.
3. Titles: a fixed random sample of the forms, each put where titles
   write it (after the occupation, behind the language's preposition for
   the Slavic locatives, before an area word for an adjective), must come
   out as the bare occupation; every miss is listed.  Each form is also
   put in the other places titles write it: as the whole trailing segment
   after " – ", in a bracket after the title, and as the first segment
   before ": " (the occupation after it), each with its preposition or
   area word; forms that are also ordinary words (WHERE strong) as the
   trailing segment and the bracket.  Passes at PLACED_FLOOR of those (the rules of thumb of the
   generator make some forms that are also ordinary words)."""
import importlib.util
import os
import random
import shutil
import subprocess
import sys
import tempfile

exe, root = sys.argv[1], sys.argv[2]
PL_FLOOR = 0.90
PLACED_FLOOR = 0.99
SAMPLE_PER_LANG = 60
SEED = 1212

# An occupation and the location preposition of each language (common
# knowledge).
OCCUPATION = {
    "fi": "Sairaanhoitaja", "et": "Kokk", "hu": "Szakács", "pl": "Kelner",
    "cs": "Skladník", "sk": "Kuchár", "sl": "Natakar", "hr": "Konobar",
    "lt": "Virėjas", "lv": "Pavārs", "de": "Koch",
}
PREP = {"pl": "w", "cs": "v", "sk": "v", "sl": "v", "hr": "u"}
AREA = {"de": "im {} Norden", "hu": "{} irodába"}

spec = importlib.util.spec_from_file_location(
    "gen_inflected", os.path.join(root, "lexicons/tools/gen-inflected.py"))
gen = importlib.util.module_from_spec(spec)
spec.loader.exec_module(gen)

path = os.path.join(root, "lexicons/places/inflected.txt")
problems = []
rows = []
with open(path, encoding="utf-8") as f:
    text = f.read().split("\n")
if "lexicons/tools/gen-inflected.py" not in text[0]:
    problems.append(f"{path}:1: the header does not name the generator")
for n, line in enumerate(text, 1):
    if not line or line.startswith("#"):
        continue
    cols = line.split("\t")
    if len(cols) != 4 or cols[3] not in ("slot", "any", "strong", "adjective"):
        problems.append(f"{path}:{n}: malformed line {line!r}")
        continue
    rows.append(cols)
forms_in_file = {(lang.rstrip("?"), form) for lang, form, _, _ in rows}

# 1b. the generator's output today, where its inputs are installed
GEN_PACKAGES = ("wamerican wbritish wngerman wfrench wspanish witalian wdutch "
                "hunspell-hu hunspell-lt hunspell-lv voikko-fi python3-libvoikko")
gen_inputs = [os.path.join("/usr/share/dict", w) for w in gen.WORDLISTS]
if all(os.path.exists(p) for p in gen_inputs) and shutil.which("hunspell"):
    with tempfile.TemporaryDirectory() as tmp:
        lex = os.path.join(tmp, "lexicons")
        shutil.copytree(os.path.join(root, "lexicons"), lex)
        run = subprocess.run([sys.executable,
                              os.path.join(root, "lexicons/tools/gen-inflected.py"),
                              "--places", os.path.join(lex, "places")],
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE)
        if run.returncode != 0:
            print("  generator not run: " +
                  run.stderr.decode("utf-8", "replace").strip().split("\n")[-1])
        else:
            with open(os.path.join(lex, "places/inflected.txt"), encoding="utf-8") as f:
                fresh = f.read().split("\n")
            if fresh != text:
                old_set, new_set = set(text), set(fresh)
                gone = sorted(old_set - new_set)
                added = sorted(new_set - old_set)
                first = (added + gone)[0]
                problems.append(f"{path}: not what the generator writes from today's "
                                f"lexicons ({len(added)} lines missing, {len(gone)} "
                                f"extra; first: {first!r}): regenerate with "
                                "/usr/bin/python3 lexicons/tools/gen-inflected.py "
                                "--places lexicons/places")
            else:
                print("  generator: the committed file is what it writes today")
else:
    print("  generator not run (its inputs: apt-get install " + GEN_PACKAGES +
          "): freshness of inflected.txt not checked")

# 2. Polish forms against wpolish
gaz = gen.read_places(os.path.join(root, "lexicons/places"),
                      ("geonames.txt", "iso3166.txt", "cldr.txt", "curated.txt"))
plist = "/usr/share/dict/polish"
if os.path.exists(plist):
    with open(plist, encoding="utf-8") as f:
        words = set(w.strip() for w in f)
    names = sorted({n for n, cc, _ in gaz if cc == "PL" and " " not in n
                    and n in words and gen.alphabet_ok(n, "pl")})
    hits = 0
    for name in names:
        forms = gen.pl_forms(name)
        for form in forms:
            if gen.fold_phrase(form) != gen.fold_phrase(name) and \
                    ("pl", form) not in forms_in_file:
                problems.append(f"inflected.txt lacks pl {form} (of {name}):"
                                " regenerate it")
        hits += any(form in words for form in forms)
    share = hits / len(names) if names else 0.0
    print(f"  wpolish: {len(names)} Polish names in the list, locative in "
          f"the list for {hits} ({100 * share:.1f} %, floor "
          f"{100 * PL_FLOOR:.0f} %)")
    if share < PL_FLOOR:
        problems.append(f"Polish locatives: {100 * share:.1f} % in wpolish, "
                        f"under {100 * PL_FLOOR:.0f} %")
else:
    print("  wpolish not installed (apt-get install wpolish): Polish "
          "locatives not checked against it")

# 3. titles
rng = random.Random(SEED)
by_lang, strong_forms = {}, {}
for lang, form, cc, where in rows:
    base = lang.rstrip("?")
    if base not in OCCUPATION:
        continue
    if where == "strong":
        strong_forms.setdefault(base, []).append(form)
        continue
    by_lang.setdefault(base, []).append((form, where))
total = misses = 0
ptotal = pmisses = 0
CONTEXTS = ["{occ} \u2013 {place}", "{occ} ({place})", "{place}: {occ}"]
for lang in sorted(by_lang):
    pool = sorted(by_lang[lang])
    sample = rng.sample(pool, min(SAMPLE_PER_LANG, len(pool)))
    titles = []
    for form, where in sample:
        if where == "adjective":
            place = AREA[lang].format(form)
        elif lang in PREP:
            place = f"{PREP[lang]} {form}"
        else:
            place = form
        titles.append(f"{OCCUPATION[lang]} {place}")
    out = subprocess.run([exe, "norm", "--lang", lang],
                         input="".join(t + "\n" for t in titles),
                         capture_output=True, text=True, check=True).stdout
    want = OCCUPATION[lang].casefold()
    for title, got in zip(titles, out.split("\n")):
        total += 1
        if got != want:
            misses += 1
            problems.append(f"[{lang}] {title!r} -> {got!r}, want {want!r}")
    placed = [c.format(occ=OCCUPATION[lang], place=t[len(OCCUPATION[lang]) + 1:])
              for t in titles for c in CONTEXTS]
    # forms that are also ordinary words: a whole trailing segment or
    # bracket all the same (before a colon such a word may head the title)
    pool = sorted(strong_forms.get(lang, []))
    for form in rng.sample(pool, min(SAMPLE_PER_LANG, len(pool))):
        place = f"{PREP[lang]} {form}" if lang in PREP else form
        placed += [c.format(occ=OCCUPATION[lang], place=place) for c in CONTEXTS[:2]]
    out = subprocess.run([exe, "norm", "--lang", lang],
                         input="".join(t + "\n" for t in placed),
                         capture_output=True, text=True, check=True).stdout
    for title, got in zip(placed, out.split("\n")):
        ptotal += 1
        if got != want:
            pmisses += 1
            print(f"  [{lang}] {title!r} -> {got!r}, want {want!r}")
print(f"  titles: {total} sampled forms, {total - misses} stripped")
pshare = 1 - pmisses / ptotal if ptotal else 1.0
print(f"  segments, brackets, first segments: {ptotal} titles, {ptotal - pmisses} "
      f"stripped ({100 * pshare:.2f} %, floor {100 * PLACED_FLOOR:.0f} %)")
if pshare < PLACED_FLOOR:
    problems.append(f"forms in segments: {100 * pshare:.2f} % stripped, under "
                    f"{100 * PLACED_FLOOR:.0f} %")

for p in problems:
    print("  " + p)
sys.exit(1 if problems else 0)
