#!/usr/bin/python3
"""Build lexicons/places/inflected.txt: case forms and place adjectives of
place names, made from the gazetteer by per-language rules.

Usage (from the repository root):

    /usr/bin/python3 lexicons/tools/gen-inflected.py --places lexicons/places

Reads the committed gazetteer files PLACES/geonames.txt, iso3166.txt,
cldr.txt and curated.txt, and from Debian's iso-codes the country names in
each language below (gettext catalogues of iso_3166-1) and the Turkish
provinces (iso_3166-2.json, TR; named after their capitals, Turkey being
left out of the gazetteer); asks Debian's hunspell (hunspell-hu,
hunspell-lt, hunspell-lv) and Voikko (voikko-fi, python3-libvoikko)
which forms are ordinary words; reads the word
lists wamerican wbritish wngerman wfrench wspanish witalian wdutch.  Writes PLACES/inflected.txt, sorted, the same
bytes for the same inputs.

The rules are rules of thumb of each language's grammar, written from
common knowledge (no published source); where a rule cannot tell two
endings apart both forms are written (a wrong form is a word nobody
writes, so it costs a line and nothing else).  tests/cases/inflected.sh
measures them against a word list where Debian has one.

Line format (lexicons/README.md): `LANG<TAB>FORM<TAB>CC<TAB>WHERE` where
WHERE is
  slot       a locative that follows a preposition (Polish `w Krakowie`,
             Czech `v Brně`): a place in a location slot, like the name;
  any        a case form that is a location by itself (Finnish
             `Helsingissä`, Estonian `Tartus`, Hungarian `Győrben`,
             Lithuanian `Vilniuje`, Latvian `Rīgā`): removed anywhere;
             written `LANG?` when its match key is also the name itself
             (Latvian `Rīgā` folds to `riga`), so that only titles known to
             be in that language lose a bare name;
  strong     the form is also an ordinary word (a word of a Debian word
             list or of the language's own lexicon files);
  adjective  a place adjective (German `Münchner`, Hungarian `budapesti`):
             a place only when a location `after` word follows it
             (`im Münchner Norden`, `budapesti irodába`).
"""

import argparse
import gettext
import importlib.util
import json
import os
import re
import subprocess
import sys

SCRIPT = "lexicons/tools/gen-inflected.py"

# Country -> language whose rules inflect its places' names.
COUNTRY_LANG = {
    "FI": "fi", "EE": "et", "HU": "hu", "PL": "pl", "CZ": "cs", "SK": "sk",
    "SI": "sl", "HR": "hr", "LT": "lt", "LV": "lv",
}
# Countries whose place adjectives in -er are written (German).
GERMAN_ADJ = ("DE", "AT", "CH")
# Gazetteer files read for the place adjectives (German, Hungarian): the
# larger places only (the hand-kept list of larger cities, the CLDR
# exemplar cities and the ISO 3166-2 subdivisions, which hold the
# Hungarian cities with county rights); every town of geonames.txt would
# add some 10,000 adjectives that titles do not use, and with them start-up
# time.
ADJ_FILES = ("curated.txt", "cldr.txt", "iso3166.txt")
# Shortest name inflected: shorter ones make forms that are words.
MIN_BASE = 4
# Hunspell dictionaries of Debian (hunspell-hu, hunspell-lt, hunspell-lv)
# asked whether a case form written in lower case is an ordinary word
# (Hungarian `alapon`, "on the basis", is the superessive of the village
# Alap); proper names are capitalised there, so the town's own form is not
# accepted in lower case.  Finnish is asked of Voikko the same way; no
# such dictionary for Estonian.
HUNSPELL = {"hu": "hu_HU", "lt": "lt_LT", "lv": "lv_LV"}
# Only forms of names of at most this many letters are asked: the
# dictionaries build compounds (alsó + némedi), so they accept the forms of
# most longer village names, which are no ordinary words.
HUNSPELL_MAX_BASE = 5
WORDLISTS = ("american-english", "british-english", "ngerman", "french",
             "spanish", "italian", "dutch")


def _places_module():
    """gen-places.py, for its match-key folding (one definition of it)."""
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)),
                        "gen-places.py")
    spec = importlib.util.spec_from_file_location("gen_places", path)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


_PLACES = _places_module()
fold, fold_phrase, TOKEN_SPLIT = (_PLACES.fold, _PLACES.fold_phrase,
                                  _PLACES.TOKEN_SPLIT)


def alphabet_ok(name, lang):
    """A name written in the language's letters (an exonym such as
    `Warschau` or `Prague` is left alone)."""
    extra = {
        "fi": "äöå", "et": "äöüõšž", "hu": "áéíóöőúüű",
        "pl": "ąćęłńóśźż", "cs": "áčďéěíňóřšťúůýž", "sk": "áäčďéíĺľňóôŕšťúýž",
        "sl": "čšž", "hr": "čćđšž", "lt": "ąčęėįšųūž", "lv": "āčēģīķļņšūž",
    }[lang]
    banned = {"fi": "qwxz", "et": "cqwxyz", "hu": "qwx", "pl": "qvx",
              "cs": "qwx", "sk": "qwx", "sl": "qwxy", "hr": "qwxy",
              "lt": "qwx", "lv": "qwxy"}[lang]
    for ch in name.lower():
        if ch in " -":
            continue
        if ch in banned:
            return False
        if not ("a" <= ch <= "z" or ch in extra):
            return False
    return True


# ---------------------------------------------------------------------------
# Finnish: inessive -ssa, adessive -lla, allative -lle, illative
# ---------------------------------------------------------------------------

# Last words of compound names whose stem is not the nominative (old
# e-stems and gradation), common knowledge: weak stem, strong stem.
FI_STEMS = {
    "niemi": ("nieme", "nieme"), "joki": ("joe", "joke"),
    "lahti": ("lahde", "lahte"), "järvi": ("järve", "järve"),
    "saari": ("saare", "saare"), "lampi": ("lamme", "lampe"),
    "mäki": ("mäe", "mäke"), "koski": ("koske", "koske"),
    "salmi": ("salme", "salme"), "vesi": ("vede", "vete"),
    "suo": ("suo", "suo"), "kylä": ("kylä", "kylä"),
    "lähde": ("lähtee", "lähtee"),
}
# Consonant gradation of the last syllable (strong -> weak), the common
# cases.
FI_GRADE = (("kk", "k"), ("pp", "p"), ("tt", "t"), ("nk", "ng"),
            ("mp", "mm"), ("nt", "nn"), ("lt", "ll"), ("rt", "rr"),
            ("ht", "hd"), ("rk", "r"), ("lk", "l"), ("p", "v"))
FI_VOWELS = "aeiouyäö"


def fi_back(word):
    w = word.lower()
    # the last part of a compound decides; approximated by the last
    # harmony vowel of the word
    for ch in reversed(w):
        if ch in "aou":
            return True
        if ch in "äöy":
            return False
    return False                        # only e and i: Helsinki


def fi_stems(word):
    """(weak stem, strong stem) of a Finnish name."""
    low = word.lower()
    for end, (weak, strong) in FI_STEMS.items():
        if low.endswith(end):
            head = word[:len(word) - len(end)]
            if not head and word[:1].isupper():
                weak, strong = weak.capitalize(), strong.capitalize()
            return head + weak, head + strong
    if low[-1:] not in FI_VOWELS:
        return None
    if low.endswith("e") and low[-2:-1] not in FI_VOWELS:
        return word + "e", word + "e"   # Tampere -> Tamperee-
    if low[-2:-1] in FI_VOWELS:
        return word, word               # Espoo, Vantaa, Kuopio
    for strong, weak in FI_GRADE:
        if low[:-1].endswith(strong):
            cut = len(word) - 1 - len(strong)
            return word[:cut] + weak + word[-1], word
    return word, word


def fi_forms(name):
    words = name.split(" ")
    last = words[-1]
    stems = fi_stems(last)
    if not stems:
        return []
    weak, strong = stems
    a = "a" if fi_back(last) else "ä"
    head = " ".join(words[:-1] + [""])
    out = [weak + "ss" + a, weak + "ll" + a, weak + "lle"]
    low = strong.lower()
    if low[-2:-1] == low[-1:] and low[-1:] in FI_VOWELS:
        out.append(strong + "seen")         # Espooseen, Vantaaseen
    else:
        out.append(strong + strong[-1] + "n")   # Ouluun, Helsinkiin
    return [head + f for f in out]


# ---------------------------------------------------------------------------
# Estonian: inessive -s, illative -sse, adessive -l, allative -le
# ---------------------------------------------------------------------------

def et_forms(name):
    stem = name
    if stem[-1:].lower() not in "aeiouõäöü":
        stem += "a"                         # Tallinn -> Tallinna-
    return [stem + e for e in ("s", "sse", "l", "le")]


# ---------------------------------------------------------------------------
# Hungarian: inessive -ban/-ben, superessive -on/-en/-ön; adjective -i
# ---------------------------------------------------------------------------

HU_BACK, HU_FRONT_ROUND = "aáoóuú", "öőüű"


def hu_harmony(word):
    for ch in reversed(word.lower()):
        if ch in HU_BACK:
            return "back"
        if ch in HU_FRONT_ROUND:
            return "round"
        if ch in "eéií":
            return "front"
    return "back"


def hu_forms(name):
    h = hu_harmony(name)
    stem = name
    if stem.endswith("a"):
        stem = stem[:-1] + "á"
    elif stem.endswith("e"):
        stem = stem[:-1] + "é"
    vowel_end = stem[-1:].lower() in "aáeéiíoóöőuúüű"
    b = "a" if h == "back" else "e"
    out = [stem + "b" + b + "n"]
    if vowel_end:
        out.append(stem + "n")
    else:
        out.append(stem + {"back": "on", "front": "en", "round": "ön"}[h])
    return out


def hu_adjectives(name):
    low = name[0].lower() + name[1:]
    if " " in name or low.endswith("i"):
        return []
    out = [low + "i"]
    if low[-1:] in "ae":
        out.append(low[:-1] + "i")          # Nyíregyháza -> nyíregyházi
    return out


# ---------------------------------------------------------------------------
# Polish: locative after w/we
# ---------------------------------------------------------------------------

# hard consonant -> its soft form before the locative -e (-ie)
PL_SOFT = (("st", "ście"), ("sł", "śle"), ("zd", "ździe"), ("ch", "sze"),
           ("t", "cie"), ("d", "dzie"), ("r", "rze"), ("ł", "le"),
           ("s", "sie"), ("z", "zie"), ("n", "nie"), ("b", "bie"),
           ("p", "pie"), ("w", "wie"), ("m", "mie"), ("f", "fie"))
PL_SOFT_FINAL = {"ń": "niu", "ś": "siu", "ć": "ciu", "ź": "ziu"}


def pl_noun(w):
    out = pl_noun1(w)
    # ó of a closed last syllable opens to o (Baligród -> Baligrodzie)
    m = re.search(r"ó([^aeiouyąęó]+)$", w)
    if m and not w.lower().endswith("ów"):
        out += pl_noun1(w[:m.start()] + "o" + m.group(1))
    return out


def pl_noun1(w):
    low = w.lower()
    if low.endswith("ów"):
        return [w[:-2] + "owie"]                        # Kraków
    if low.endswith(("ice", "yce", "ce", "ki", "gi", "y")):
        return [w[:-1] + "ach"]                         # Katowice, Tychy
    if low.endswith(("nia", "sia", "cia", "zia")):
        return [w[:-1]]                                 # Gdynia -> Gdyni
    if low.endswith("ia"):
        return [w[:-1] + "i"]                           # Austria -> Austrii
    if re.search(r"[aeiouy]ja$", low):
        return [w[:-2] + "i"]                           # Złotoryja
    if low.endswith("ja"):
        return [w[:-1] + "i"]                           # Francja
    if low.endswith(("ca", "cza", "sza", "rza", "ża", "dza")):
        return [w[:-1] + "y"]
    if low.endswith("la"):
        return [w[:-1] + "i"]                           # Dukla -> Dukli
    if low.endswith(("owa", "ewa")):
        return [w[:-2] + "ie", w[:-1] + "ej"]           # Widuchowa (adjective)
    if low.endswith("ka"):
        return [w[:-2] + "ce"]
    if low.endswith("ga"):
        return [w[:-2] + "dze"]
    if low.endswith(("ko", "go", "cho")):
        return [w[:-1] + "u"]                           # Dubiecko
    if low.endswith(("a", "o")):
        stem = w[:-1]
        for hard, soft in PL_SOFT:
            if stem.lower().endswith(hard):
                return [stem[:len(stem) - len(hard)] + soft]
        return [stem + "e"]
    if low.endswith("ie"):
        return [w[:-1] + "u", w + "m"]                  # Wodynie; Długie
    if low.endswith("e"):
        return [w[:-1] + "u", w + "m"]                  # Opole; Zakopane
    if low.endswith("ek"):
        return [w[:-2] + "ku"]                          # Chełmek -> Chełmku
    if low.endswith("niec"):
        return [w[:-4] + "ńcu"]                         # Kamieniec
    if low.endswith("iec"):
        return [w[:-3] + "cu"]                          # Grabowiec
    if low.endswith("ec"):
        return [w[:-2] + "cu"]
    if low.endswith(("k", "g", "ch")):
        return [w + "u"]                                # Gdańsk
    if low.endswith("dź"):
        return [w[:-2] + "dzi", w[:-2].replace("ó", "o") + "dzi"]   # Łódź
    if low[-1:] in PL_SOFT_FINAL:
        return [w[:-1] + PL_SOFT_FINAL[low[-1]]]        # Poznań
    if low.endswith(("cz", "sz", "rz", "ż", "c", "dz", "l", "j")):
        return [w + "u", w + "y"]                       # Bydgoszczy
    for hard, soft in PL_SOFT:
        if low.endswith(hard):
            out = [w[:len(w) - len(hard)] + soft]
            if hard in ("m", "b", "p", "w", "f"):
                out.append(w + "iu")                    # Radomiu
            return out
    return []


def pl_adj(w):
    low = w.lower()
    if low.endswith("a"):
        return w[:-1] + "ej"
    if low.endswith(("y", "i")):
        return w + "m"
    if low.endswith("e"):
        return w[:-1] + "ych"
    return None


# ---------------------------------------------------------------------------
# Czech and Slovak: locative after v/ve
# ---------------------------------------------------------------------------

def cs_noun(w):
    low = w.lower()
    if low.endswith("ice"):
        return [w[:-1] + "ích"]                         # Budějovice
    if low.endswith("y"):
        return [w[:-1] + "ech"]                         # Poděbrady
    if low.endswith(("ka", "ko")):
        return [w[:-2] + "ce", w[:-1] + "u"]
    if low.endswith(("ha", "ga")):
        return [w[:-2] + "ze"]                          # Praha -> Praze
    if low.endswith("cha"):
        return [w[:-3] + "še"]
    if low.endswith(("ra", "ro")):
        return [w[:-2] + "ře"]
    if low.endswith(("a", "o")):
        stem = w[:-1]
        if stem[-1:].lower() in "bpvmfdtn":
            return [stem + "ě"]                         # Ostrava, Brno
        return [stem + "e", stem + "u"]
    if low.endswith("e"):
        return [w[:-1] + "i"]
    if low.endswith("ec"):
        return [w[:-2] + "ci"]                          # Liberec
    if low.endswith("eň"):
        return [w[:-2] + "ni"]                          # Plzeň
    if low.endswith("r"):
        return [w[:-1] + "ře", w + "u"]
    if low[-1:] in "bpvmfdtn":
        return [w + "ě", w + "u"]                       # Zlín, Prostějov
    if low[-1:] in "ščřžcjďťňl":
        return [w + "i", w + "u"]
    return [w + "e", w + "u"]


def cs_adj(w, plural):
    low = w.lower()
    if low.endswith("á"):
        return w[:-1] + "é"
    if low.endswith("ý"):
        return w[:-1] + "ém"
    if low.endswith("é"):
        return w[:-1] + ("ých" if plural else "ém")
    return None


def sk_noun(w):
    low = w.lower()
    if low.endswith("ice"):
        return [w[:-1] + "iach"]                        # Košice
    if low.endswith("ica"):
        return [w[:-1] + "i"]                           # Bystrica
    if low.endswith("y"):
        return [w[:-1] + "och"]                         # Piešťany
    if low.endswith(("sko", "cko", "ko", "ho", "go", "cho")):
        return [w[:-1] + "u"]                           # Rakúsko
    if low.endswith(("a", "o")):
        return [w[:-1] + "e"]                           # Bratislava, Žilina
    if low.endswith("e"):
        return [w[:-1] + "i"]
    if low.endswith("ec"):
        return [w[:-2] + "ci"]
    if low[-1:] in "kgh":
        return [w + "u"]
    return [w + "e", w + "i"]


def sk_adj(w, plural):
    low = w.lower()
    if low.endswith("á"):
        return w[:-1] + "ej"
    if low.endswith("ý"):
        return w[:-1] + "om"
    if low.endswith("é"):
        return w[:-1] + ("ých" if plural else "om")
    return None


# ---------------------------------------------------------------------------
# Slovene and Croatian: locative after v/na, u/na
# ---------------------------------------------------------------------------

def sl_noun(w):
    low = w.lower()
    if low.endswith("ice"):
        return [w[:-1] + "ah"]                          # Jesenice
    if low.endswith("a"):
        return [w[:-1] + "i"]                           # Ljubljana
    if low.endswith(("o", "e")):
        return [w[:-1] + "u"]                           # Celje, mesto
    out = [w + "u"]                                     # Maribor
    if re.search(r"[^aeiou]e[rlnc]$", low):
        out.append(w[:-2] + w[-1] + "u")                # Koper -> Kopru
    return out


def sl_adj(w, plural):
    low = w.lower()
    if low.endswith("a"):
        return w[:-1] + "i"
    if low.endswith(("o", "i")):
        return w[:-1] + "em"                            # Novo mesto
    return None


def hr_noun(w):
    low = w.lower()
    if low.endswith(("ska", "čka", "ška", "cka")):
        return [w[:-1] + "oj"]                          # Njemačka
    if low.endswith("ka"):
        return [w[:-2] + "ci"]                          # Rijeka
    if low.endswith("ga"):
        return [w[:-2] + "zi"]
    if low.endswith("ha"):
        return [w[:-2] + "si"]
    if low.endswith("a"):
        return [w[:-1] + "i"]
    if low.endswith("ci"):
        return [w + "ma"]                               # Vinkovci
    if low.endswith(("o", "e")):
        return [w[:-1] + "u"]
    out = [w + "u"]
    if re.search(r"[^aeiou]a[krcn]$", low):
        out.append(w[:-2] + w[-1] + "u")                # Sisak, Zadar
    return out


def hr_adj(w, plural):
    low = w.lower()
    if low.endswith("a"):
        return w[:-1] + "oj"
    if low.endswith("i"):
        return w[:-1] + "om"                            # Slavonski Brod
    if low.endswith(("o", "e")):
        return w[:-1] + "om"
    return None


def slavic_forms(name, noun, adj):
    words = name.split(" ")
    last = words[-1]
    forms = noun(last)
    if len(words) == 1:
        return forms
    if len(words) != 2:
        return []
    plural = last.lower().endswith(("ice", "y", "e", "i"))
    first = adj(words[0], plural) if adj else None
    if first is None:
        return []
    return [first + " " + f for f in forms]


def pl_forms(name):
    words = name.split(" ")
    if len(words) == 1:
        return pl_noun(name)
    if len(words) != 2:
        return []
    first = pl_adj(words[0])
    if first is None:
        return []
    last = words[1]
    lastforms = ([pl_adj(last)] if last.lower().endswith(("ska", "cka", "ski"))
                 else pl_noun(last))
    return [first + " " + f for f in lastforms if f]


# ---------------------------------------------------------------------------
# Lithuanian and Latvian: locative
# ---------------------------------------------------------------------------

def lt_forms(name):
    low = name.lower()
    for end, rep in (("iai", "iuose"), ("ai", "uose"), ("ius", "iuje"),
                     ("ys", "yje"), ("is", "yje"), ("us", "uje"),
                     ("as", "e"), ("ė", "ėje"), ("a", "oje"), ("ės", "ėse"),
                     ("os", "ose")):
        if low.endswith(end):
            return [name[:len(name) - len(end)] + rep]
    return []


def lv_forms(name):
    low = name.lower()
    for end, rep in (("is", "īs"), ("i", "os"), ("as", "ās"), ("es", "ēs"),
                     ("a", "ā"), ("e", "ē"), ("s", "ā")):
        if low.endswith(end):
            out = [name[:len(name) - len(end)] + rep]
            if end == "is":
                out.append(name[:-2] + "ī")             # a masculine -is
            if end == "s" and not low.endswith("is"):
                out.append(name[:-1] + "ī")             # Ventspils -> Ventspilī
            return out
    return []


# ---------------------------------------------------------------------------
# Greek accusative after στη(ν), στο(ν), στα, στις, στους
# ---------------------------------------------------------------------------

# Nominative ending -> accusative ending of a word of a Greek place name
# (Βόλος -> στο Βόλο, Ρόδος -> στη Ρόδο, Πειραιάς -> στον Πειραιά); a
# name in -α, -η, -ο, -ι or a plural in -α, -ες is the same in both cases.
EL_ACC = (("ος", "ο"), ("ός", "ό"), ("ας", "α"), ("άς", "ά"),
          ("ης", "η"), ("ής", "ή"))
GREEK = re.compile(r"[\u0370-\u03ff\u1f00-\u1fff]")


def el_forms(name):
    if not GREEK.search(name):
        return []
    words = []
    for w in name.split(" "):
        for nom, acc in EL_ACC:
            if w.endswith(nom) and len(w) > len(nom) + 1:
                w = w[:-len(nom)] + acc
                break
        words.append(w)
    form = " ".join(words)
    return [form] if form != name else []


# ---------------------------------------------------------------------------
# Irish initial mutations of a place name
# ---------------------------------------------------------------------------

# Eclipsis after `i` and `ar an` (i nGaillimh, i gCorcaigh, i mBaile Átha
# Cliath, ar an gCeathrú Rua); lenition after `Co.`, `Contae` and in
# compounds (Co. Chiarraí, Contae Mhaigh Eo).  A name opening with the
# article (An Uaimh) is not mutated.
GA_ECLIPSIS = {"b": "m", "c": "g", "d": "n", "f": "bh", "g": "n",
               "p": "b", "t": "d"}
GA_LENITE = "bcdfgmpst"


def ga_forms(name):
    first = name.split(" ")[0]
    if first.lower() in ("an", "na") or len(first) < 2:
        return []
    c = first[0].lower()
    out = []
    if c in GA_ECLIPSIS:
        out.append(GA_ECLIPSIS[c] + name)
    elif c in "aeiouáéíóú":
        out.append("n" + name)
    if c in GA_LENITE and first[1].lower() != "h" and not (
            c == "s" and first[1].lower() not in "aeiouáéíóúlnr"):
        out.append(name[0] + "h" + name[1:])
    return out


# ---------------------------------------------------------------------------
# German place adjectives in -er
# ---------------------------------------------------------------------------

def de_adjectives(name):
    if " " in name or "-" in name:
        return []
    low = name.lower()
    if low.endswith("e"):
        return [name + "r"]                             # Celle -> Celler
    if low.endswith("en"):
        return [name + "er", name[:-2] + "er", name[:-2] + "ner"]
    if low.endswith("el"):
        return [name + "er", name[:-2] + "ler"]          # Basel -> Basler
    if low[-1:] in "aiouy":
        return []
    return [name + "er"]


# ---------------------------------------------------------------------------
# Polish, Czech and Slovak: genitive after the words for "around" and
# "near" (w okolicy Krakowa, v okolí Prahy, v okolí Bratislavy, z okolic)
# ---------------------------------------------------------------------------

def pl_gen_noun(w):
    low = w.lower()
    if low.endswith("ów"):
        return [w[:-2] + "owa"]                         # Kraków -> Krakowa
    if low.endswith(("ice", "yce")):
        return [w[:-1]]                                 # Katowice -> Katowic
    if low.endswith(("ka", "ga")):
        return [w[:-1] + "i"]                           # Nysa? no: Ełk; Praga -> Pragi
    if low.endswith(("nia", "sia", "cia", "zia")):
        return [w[:-1]]                                 # Gdynia -> Gdyni
    if low.endswith(("ia", "ja")):
        return [w[:-1] + "i"]                           # Austria -> Austrii
    if low.endswith("la"):
        return [w[:-1] + "i"]
    if low.endswith("a"):
        return [w[:-1] + "y"]                           # Warszawa -> Warszawy
    if low.endswith(("o", "e")):
        return [w[:-1] + "a"]                           # Opole -> Opola
    if low.endswith("niec"):
        return [w[:-4] + "ńca"]
    if low.endswith("iec"):
        return [w[:-3] + "ca"]                          # Sosnowiec
    if low.endswith("ec"):
        return [w[:-2] + "ca"]
    if low.endswith("ek"):
        return [w[:-2] + "ka"]
    if low.endswith("ław"):
        return [w + "ia"]                               # Wrocław -> Wrocławia
    if low[-1:] in "ńśćź":
        return [w[:-1] + {"ń": "nia", "ś": "sia", "ć": "cia", "ź": "zia"}[low[-1]]]
    if low[-1:] in "aeiouyąęó":
        return []
    return [w + "a"]                                    # Gdańsk -> Gdańska


def pl_gen_adj(w):
    low = w.lower()
    if low.endswith("a"):
        return w[:-1] + "ej"                            # Zielona Góra
    if low.endswith(("y", "i")):
        return w[:-1] + ("ego" if low.endswith("y") else "iego")
    if low.endswith("e"):
        return w[:-1] + "ych"
    return None


def pl_gen_forms(name):
    words = name.split(" ")
    if len(words) == 1:
        return pl_gen_noun(name)
    if len(words) != 2:
        return []
    first = pl_gen_adj(words[0])
    if first is None:
        return []
    return [first + " " + f for f in pl_gen_noun(words[1])]


def cs_gen_noun(w):
    low = w.lower()
    if low.endswith("ice"):
        return [w[:-1]]                                 # Budějovice -> Budějovic
    if low.endswith("y"):
        return [w[:-1]]                                 # Poděbrady -> Poděbrad
    if low.endswith("a"):
        if low[-2:-1] in "cčšžřjďťň":
            return [w[:-1] + "e"]
        return [w[:-1] + "y"]                           # Praha -> Prahy
    if low.endswith("o"):
        return [w[:-1] + "a"]                           # Brno -> Brna
    if low.endswith("ec"):
        return [w[:-2] + "ce"]                          # Liberec -> Liberce
    if low.endswith("eň"):
        return [w[:-2] + "ně"]                          # Plzeň -> Plzně
    if low[-1:] in "aeiouyáéíóúůýě":
        return []
    return [w + "a", w + "u"]                           # Zlín, Tábor


def cs_gen_adj(w, plural):
    low = w.lower()
    if low.endswith("á"):
        return w[:-1] + "é"
    if low.endswith("ý"):
        return w[:-1] + "ého"
    if low.endswith("é"):
        return w[:-1] + ("ých" if plural else "ého")
    return None


def sk_gen_noun(w):
    low = w.lower()
    if low.endswith("ice"):
        return [w[:-3] + "íc"]                          # Košice -> Košíc
    if low.endswith("ce"):
        return [w[:-2] + "iec"]                         # Michalovce
    if low.endswith("any"):
        return [w[:-1]]                                 # Piešťany -> Piešťan
    if low.endswith("a"):
        if low[-2:-1] in "cčšžjďťňľ":
            return [w[:-1] + "e"]                       # Bystrica -> Bystrice
        return [w[:-1] + "y"]                           # Bratislava -> Bratislavy
    if low.endswith("o"):
        return [w[:-1] + "a"]
    if low.endswith("ok"):
        return [w[:-2] + "ka"]                          # Pezinok -> Pezinka
    if low[-1:] in "aeiouyáéíóúýäô":
        return []
    return [w + "a", w + "u"]                           # Zvolen, Poprad


def sk_gen_adj(w, plural):
    low = w.lower()
    if low.endswith("á"):
        return w[:-1] + "ej"
    if low.endswith("ý"):
        return w[:-1] + "ého"
    if low.endswith("é"):
        return w[:-1] + ("ých" if plural else "ého")
    return None


GENITIVE = {
    "pl": pl_gen_forms,
    "cs": lambda n: slavic_forms(n, cs_gen_noun, cs_gen_adj),
    "sk": lambda n: slavic_forms(n, sk_gen_noun, sk_gen_adj),
}


RULES = {
    "fi": fi_forms, "et": et_forms, "hu": hu_forms,
    "pl": pl_forms,
    "cs": lambda n: slavic_forms(n, cs_noun, cs_adj),
    "sk": lambda n: slavic_forms(n, sk_noun, sk_adj),
    "sl": lambda n: slavic_forms(n, sl_noun, sl_adj),
    "hr": lambda n: slavic_forms(n, hr_noun, hr_adj),
    "lt": lt_forms, "lv": lv_forms,
}
# Languages whose locatives follow a preposition (a location slot word).
PREP_LANGS = frozenset({"pl", "cs", "sk", "sl", "hr"})


# ---------------------------------------------------------------------------
# Inputs
# ---------------------------------------------------------------------------

def read_places(folder, files):
    """(name, CC, WHERE) of the gazetteer files."""
    out = []
    for fname in files:
        path = os.path.join(folder, fname)
        with open(path, encoding="utf-8") as f:
            for n, line in enumerate(f, 1):
                if not line.strip() or line.startswith("#"):
                    continue
                cols = line.rstrip("\n").split("\t")
                if len(cols) < 3:
                    sys.exit(f"{path}:{n}: fewer than three columns")
                where = cols[3] if len(cols) > 3 else "slot"
                out.append((cols[1], cols[2], where))
    return out


def country_names(iso_dir, locale_dir, lang):
    with open(os.path.join(iso_dir, "iso_3166-1.json"), encoding="utf-8") as f:
        countries = json.load(f)["3166-1"]
    try:
        t = gettext.translation("iso_3166-1", localedir=locale_dir,
                                languages=[lang])
    except OSError:
        sys.exit(f"gen-inflected: no iso_3166-1 catalogue for {lang} "
                 f"in {locale_dir}: apt-get install iso-codes")
    out = []
    for c in countries:
        for key in ("name", "common_name"):
            if key in c:
                text = t.gettext(c[key])
                if text != c[key] or lang == "en":
                    out.append((text, c["alpha_2"]))
    return out


def turkish_provinces(iso_dir):
    with open(os.path.join(iso_dir, "iso_3166-2.json"), encoding="utf-8") as f:
        subs = json.load(f)["3166-2"]
    return sorted({s["name"] for s in subs if s["code"].startswith("TR-")})


def ordinary_words(dict_dir, lex_dir, langs):
    words = set()
    for fname in WORDLISTS:
        path = os.path.join(dict_dir, fname)
        if not os.path.exists(path):
            sys.exit(f"gen-inflected: {path} missing (Debian word lists "
                     "wamerican wbritish wngerman wfrench wspanish "
                     "witalian wdutch)")
        with open(path, encoding="utf-8", errors="replace") as f:
            for w in f:
                w = w.strip()
                if w and w == w.lower():
                    words.add(fold(w))
    # every word of the language's own lexicon files but the places
    for cat in sorted(os.listdir(lex_dir)):
        d = os.path.join(lex_dir, cat)
        if cat in ("places", "tools") or not os.path.isdir(d):
            continue
        for fname in sorted(os.listdir(d)):
            if not fname.endswith(".txt"):
                continue
            with open(os.path.join(d, fname), encoding="utf-8") as f:
                for line in f:
                    cols = line.rstrip("\n").split("\t")
                    if line.startswith("#") or len(cols) < 2:
                        continue
                    if cols[0].rstrip("?") in langs or cols[0] == "*":
                        for w in TOKEN_SPLIT.split(cols[1]):
                            if w:
                                words.add(fold(w))
    return words


def hunspell_words(lang, forms):
    """The forms, lower-cased, that the language's hunspell dictionary
    accepts: ordinary words."""
    forms = sorted({f.lower() for f in forms if " " not in f})
    try:
        res = subprocess.run(["hunspell", "-d", HUNSPELL[lang], "-G"],
                             input="\n".join(forms) + "\n",
                             capture_output=True, text=True, check=True)
    except (OSError, subprocess.CalledProcessError) as e:
        sys.exit(f"gen-inflected: hunspell -d {HUNSPELL[lang]} failed ({e}): "
                 "apt-get install hunspell hunspell-hu hunspell-lt hunspell-lv")
    return {fold(w) for w in res.stdout.split()}


def voikko_words(forms):
    """The Finnish forms, lower-cased, that Voikko (Debian's voikko-fi and
    python3-libvoikko) accepts: ordinary words (pellossa, koskella)."""
    try:
        import libvoikko
        v = libvoikko.Voikko("fi")
    except (ImportError, OSError) as e:
        sys.exit(f"gen-inflected: Finnish morphology missing ({e}): "
                 "apt-get install python3-libvoikko voikko-fi, run with "
                 "/usr/bin/python3")
    out = {fold(f.lower()) for f in sorted(set(forms))
           if " " not in f and v.spell(f.lower())}
    v.terminate()
    return out


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--places", required=True, help="lexicons/places folder")
    ap.add_argument("--iso-codes", default="/usr/share/iso-codes/json")
    ap.add_argument("--locale-dir", default="/usr/share/locale")
    ap.add_argument("--dict-dir", default="/usr/share/dict")
    args = ap.parse_args()

    folder = args.places
    lex_dir = os.path.dirname(os.path.abspath(folder))
    gaz = read_places(folder, ("geonames.txt", "iso3166.txt", "cldr.txt",
                               "curated.txt"))
    names = {fold_phrase(n) for n, _, _ in gaz}
    strong_names = {fold_phrase(n) for n, _, w in gaz if w == "strong"}
    # the larger places keep their forms even when a form is also a word
    # (Szegeden, "on your nail")
    notable = {fold_phrase(n) for n, _, _ in
               read_places(folder, ADJ_FILES)}
    langs = set(COUNTRY_LANG.values()) | {"de", "tr"}
    words = ordinary_words(args.dict_dir, lex_dir, langs)

    lines = {}

    def add(lang, form, cc, where):
        key = (lang, form, cc)
        if key not in lines or where == "strong":
            lines[key] = where

    # case forms of each country's places in its language, and of the
    # country names in that language
    for cc_home, lang in sorted(COUNTRY_LANG.items()):
        strong_base = {n for n, cc, w in gaz if cc == cc_home and w == "strong"}
        bases = {(n, cc) for n, cc, w in gaz if cc == cc_home}
        countries = set(country_names(args.iso_codes, args.locale_dir, lang))
        bases |= countries
        # a country keeps its forms like a larger place (Finnish saksa is
        # also the German language)
        larger = notable | {fold_phrase(n) for n, _ in countries}
        # after a preposition a short name is safe (na Krku); a case form
        # that stands alone needs a longer one
        shortest = 3 if lang in PREP_LANGS else MIN_BASE
        common = set()
        if lang in HUNSPELL:
            common = hunspell_words(lang, [f for name, _ in bases
                                           for f in RULES[lang](name)])
        elif lang == "fi":
            common = voikko_words([f for name, _ in bases
                                   for f in RULES[lang](name)])
        for name, cc in sorted(bases):
            if len(name) < shortest or not alphabet_ok(name, lang):
                continue
            if lang not in PREP_LANGS and " " in name:
                continue
            forms = RULES[lang](name)
            # the genitive after "around", "near" only of the larger
            # places (a village's genitive is too often a word)
            if lang in GENITIVE and fold_phrase(name) in larger:
                forms = forms + GENITIVE[lang](name)
            for form in forms:
                key = fold_phrase(form)
                if key == fold_phrase(name) and lang in PREP_LANGS:
                    continue            # no new form
                if lang in PREP_LANGS:
                    where = "slot"
                    tag = lang
                else:
                    where = "any"
                    tag = lang + "?" if key in names else lang
                if name in strong_base and lang not in PREP_LANGS:
                    where = "strong"    # a word's case form is a word
                if (key in common and len(name) <= HUNSPELL_MAX_BASE and
                        fold_phrase(name) not in larger):
                    where = "strong"    # an ordinary word of the language
                if key in strong_names or (key not in names and
                                           " " not in key and key in words):
                    where = "strong"
                add(tag, form, cc, where)
        if lang == "hu":
            larger = {n for n, cc, w in read_places(folder, ADJ_FILES)
                      if cc == "HU" and w != "strong"}
            for name, cc in sorted(bases):
                if (name not in larger or len(name) < MIN_BASE or
                        not alphabet_ok(name, lang)):
                    continue
                for form in hu_adjectives(name):
                    add("hu", form, cc, "adjective")

    # German place adjectives of the larger places
    for name, cc, w in read_places(folder, ADJ_FILES):
        if cc in GERMAN_ADJ and w != "strong" and len(name) >= MIN_BASE:
            for form in de_adjectives(name):
                add("de", form, cc, "adjective")

    # Greek accusatives of the Greek-script names (after στη, στο, στα: a
    # location slot), Irish mutated forms of the Irish-language names (the
    # LANG column `ga` of curated.txt)
    for fname in ("cldr.txt", "curated.txt"):
        with open(os.path.join(folder, fname), encoding="utf-8") as f:
            for line in f:
                cols = line.rstrip("\n").split("\t")
                if line.startswith("#") or len(cols) < 3:
                    continue
                rule = {"ga": ga_forms}.get(cols[0].rstrip("?"), el_forms)
                lang = "ga" if rule is ga_forms else "el"
                for form in rule(cols[1]):
                    if fold_phrase(form) not in names:
                        add(lang, form, cols[2], "slot")

    # Turkish provinces: the locative follows an apostrophe (Ankara'da), a
    # token of its own, which location/tr.txt lists as an `after` word; the
    # name is all that is needed
    for name in turkish_provinces(args.iso_codes):
        if fold_phrase(name) not in names:
            add("*", name, "TR", "slot")

    out_path = os.path.join(folder, "inflected.txt")
    header = [
        f"Generated by {SCRIPT}; do not edit, put corrections in curated.txt.",
        f"Regenerate: /usr/bin/python3 {SCRIPT} --places lexicons/places",
        "Source: the gazetteer files of this folder (geonames.txt, iso3166.txt,",
        "cldr.txt, curated.txt), the country names of Debian's iso-codes in",
        "fi et hu pl cs sk sl hr lt lv (gettext iso_3166-1) and the Turkish",
        "provinces of its iso_3166-2.json; case forms made by per-language",
        "rules of thumb (common knowledge, from memory; see the script);",
        "a form that Debian's hunspell-hu, -lt, -lv or voikko-fi accepts in lower case",
        "is an ordinary word (strong) when the name has at most "
        f"{HUNSPELL_MAX_BASE} letters",
        "and is not a larger place's.",
        "Forms: fi inessive/adessive/allative/illative, et inessive/illative/",
        "adessive/allative, hu -ban/-on and the adjective in -i (larger",
        "places: curated.txt cldr.txt iso3166.txt),",
        "pl cs sk sl hr locative, pl cs sk genitive of the larger places",
        "(after okolica, okolí),",
        "lt lv locative, German adjectives in -er",
        "of the larger places in DE AT CH, el accusatives of the Greek-script",
        "names, ga eclipsed and lenited forms of the Irish names (curated.txt).",
        "WHERE: slot (after a preposition), any (a location by itself),",
        "strong (also an ordinary word), adjective (a place only before a",
        "location `after` word); LANG? where the form's match key is a name.",
    ]
    order = sorted(lines.items(),
                   key=lambda kv: (fold_phrase(kv[0][1]), kv[0][1], kv[0][2],
                                   kv[0][0]))
    tmp = out_path + ".tmp"
    with open(tmp, "w", encoding="utf-8", newline="\n") as f:
        for h in header:
            f.write(f"# {h}\n")
        for (lang, form, cc), where in order:
            f.write(f"{lang}\t{form}\t{cc}\t{where}\n")
    os.replace(tmp, out_path)
    counts = {}
    for (lang, _, _), where in lines.items():
        counts[(lang.rstrip("?"), where)] = counts.get((lang.rstrip("?"), where), 0) + 1
    for k in sorted(counts):
        print(f"{k[0]} {k[1]}: {counts[k]}", file=sys.stderr)
    print(f"inflected.txt: {len(lines)} entries", file=sys.stderr)


if __name__ == "__main__":
    main()
