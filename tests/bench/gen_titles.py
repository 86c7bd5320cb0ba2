#!/usr/bin/python3
"""Benchmark corpus of raw job-posting titles (see tests/bench/README.md).

  gen_titles.py --count N --seed S [--postings]

Writes N raw titles (or, with --postings, a postings TSV) to stdout.
Same arguments give the same bytes on any machine: all randomness comes
from the splitmix64 generator below, and nothing depends on set or hash
order.  Titles come from vocab.tsv beside this script; noise is added
around them at the rates listed in README.md.
"""
import argparse
import bisect
import os
import sys
import unicodedata

MASK = (1 << 64) - 1


class Rng:
    """splitmix64 (Steele, Lea, Flood 2014); 64-bit outputs."""
    __slots__ = ("s",)

    def __init__(self, seed):
        self.s = seed & MASK

    def next(self):
        self.s = z = (self.s + 0x9E3779B97F4A7C15) & MASK
        z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & MASK
        z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & MASK
        return z ^ (z >> 31)

    def chance(self, p):
        return self.next() < p * 18446744073709551616.0

    def below(self, n):
        return self.next() % n

    def pick(self, seq):
        return seq[self.next() % len(seq)]


class W:
    """Weighted choice over a fixed list: W([(item, weight), ...])."""
    __slots__ = ("items", "cum", "tot")

    def __init__(self, pairs):
        self.items, self.cum, t = [], [], 0
        for item, w in pairs:
            t += int(w * 1000)
            self.items.append(item)
            self.cum.append(t)
        self.tot = t

    def __call__(self, r):
        return self.items[bisect.bisect_right(self.cum, r.next() % self.tot)]


def ws(text):
    """'a:3 | b:1 | c' -> W; weight 1 when omitted."""
    pairs = []
    for part in text.split(" | "):
        item, _, w = part.rpartition(":")
        if not item or not w.replace(".", "").isdigit():
            item, w = part, "1"
        pairs.append((item, float(w)))
    return W(pairs)


# --- places: city|city-centre postcode (postcodes from memory) -------------
CITIES = {
    "DE": "Berlin|10115, Hamburg|20095, München|80331, Köln|50667, Frankfurt am Main|60311, "
          "Stuttgart|70173, Düsseldorf|40213, Leipzig|04109, Dortmund|44135, Essen|45127, "
          "Bremen|28195, Dresden|01067, Hannover|30159, Nürnberg|90402",
    "AT": "Wien|1010, Graz|8010, Linz|4020, Salzburg|5020, Innsbruck|6020",
    "CH": "Zürich|8001, Basel|4051, Bern|3011",
    "CHfr": "Genève|1201, Lausanne|1003",
    "FR": "Paris|75001, Lyon|69001, Marseille|13001, Toulouse|31000, Nice|06000, Nantes|44000, "
          "Strasbourg|67000, Bordeaux|33000, Lille|59000",
    "BEfr": "Bruxelles|1000, Liège|4000, Charleroi|6000, Namur|5000",
    "BEnl": "Brussel|1000, Antwerpen|2000, Gent|9000, Leuven|3000",
    "LU": "Luxembourg",
    "NL": "Amsterdam, Rotterdam, Den Haag, Utrecht, Eindhoven, Groningen",
    "UK": "London, Manchester, Birmingham, Leeds, Glasgow, Bristol",
    "IE": "Dublin, Cork",
    "ES": "Madrid|28001, Barcelona|08001, València|46001, Sevilla|41001, Zaragoza|50001, "
          "Bilbao|48001, Málaga|29001",
    "IT": "Roma|00185, Milano|20121, Napoli|80121, Torino|10121, Bologna|40121, Firenze|50122",
    "PL": "Warszawa|00-001, Kraków|31-001, Wrocław|50-001, Poznań|61-001, Gdańsk|80-001, Łódź|90-001",
    "PT": "Lisboa|1100-001, Porto|4000-001, Braga, Coimbra",
    "SE": "Stockholm|111 20, Göteborg|411 01, Malmö|211 20",
    "CZ": "Praha|110 00, Brno|602 00, Ostrava|702 00",
}
CITIES = {k: [tuple((c.split("|") + [""])[:2]) for c in v.split(", ")] for k, v in CITIES.items()}

# country -> (ISO code, weight of gender noise, gender markers, pay key, thousands separators)
COUNTRY = {
    "DE": ("DE", 8, "(m/w/d):60 | (w/m/d):10 | (m/f/d):8 | (gn):4 | (all genders):4 | (m/w/x):3 | "
                       "(d/m/w):2 | (m/w):3 | m/w/d:3 | (M/W/D):2 | (w/m/x):1", "de", (".",)),
    "AT": ("AT", 8, "(m/w/d):55 | (w/m/d):15 | (m/w/x):8 | (m/w):10 | (all genders):4 | (gn):3", "at", (".",)),
    "CH": ("CH", 6, "(m/w/d):40 | (w/m/d):20 | (m/w):25 | (w/m):10 | (all genders):5", "ch", ("'",)),
    "CHfr": ("CH", 4, "(H/F):40 | H/F:30 | (F/H):20 | (h/f/x):10", "ch", ("'",)),
    "FR": ("FR", 4, "H/F:40 | (H/F):30 | F/H:10 | (F/H):8 | h/f:5 | (H/F/X):3 | - H/F:4", "fr",
           (" ", "\u00a0", "\u202f", "")),
    "BEfr": ("BE", 5, "(h/f/x):40 | (H/F/X):20 | (m/f/x):15 | H/F:15 | (h/f):10", "be", (".", " ")),
    "BEnl": ("BE", 5, "(m/v/x):50 | (m/v):25 | (M/V/X):15 | (v/m/x):10", "benl", (".",)),
    "LU": ("LU", 4, "(H/F):40 | H/F:30 | (m/f/d):15 | (h/f/x):15", "lu", (".", " ")),
    "NL": ("NL", 1.5, "(m/v):50 | (m/v/x):25 | (v/m):10 | m/v:10 | (M/V):5", "nl", (".",)),
    "UK": ("UK", 0, "(m/f)", "uk", (",",)),
    "IE": ("IE", 0, "(m/f)", "ie", (",",)),
    "ES": ("ES", 2, "(h/m):40 | (m/f):25 | (H/M):15 | (m/h):10 | (m/f/x):10", "es", (".", "")),
    "IT": ("IT", 2, "(m/f):50 | (M/F):30 | (f/m):10 | (m/f/x):10", "it", (".", "")),
    "PL": ("PL", 3, "(k/m):45 | (m/k):25 | (K/M):15 | (k/m/n):5 | K/M:10", "pl", (" ", "\u00a0", "")),
    "PT": ("PT", 2, "(m/f):50 | (M/F):25 | (h/m):15 | (f/m):10", "pt", (".", " ")),
    "SE": ("SE", 0, "(m/k)", "se", (" ", "\u00a0")),
    "CZ": ("CZ", 1, "(m/ž):60 | (M/Ž):20 | (muž/žena):20", "cz", (" ", "\u00a0")),
}
COUNTRY = {k: (v[0], v[1], ws(v[2]) if v[1] else None, v[3], v[4]) for k, v in COUNTRY.items()}
# share of lines with decoration, number of decoration kinds on such a line, and their weights
# (the gender weight is the country's, second field of COUNTRY)
P_NOISY = 0.58
NCATS = W([(1, 3), (2, 12), (3, 35), (4, 32), (5, 18)])
CAT_WEIGHT = (("gender", 0), ("location", 4), ("seniority", 2), ("schedule", 2.5), ("pay", 1.5),
              ("reference", 1.2), ("marketing", 1.8), ("employer", 1.0), ("bilingual", 0.3))
COUNTRY_LANG = {"DE": "de", "AT": "de", "CH": "de", "CHfr": "fr", "FR": "fr", "BEfr": "fr", "BEnl": "nl", "LU": "fr",
                "NL": "nl", "ES": "es", "IT": "it", "PL": "pl", "PT": "pt", "SE": "sv", "CZ": "cs"}
LANG_COUNTRY = {
    "de": ws("DE:75 | AT:15 | CH:10"),
    "en": ws("UK:50 | IE:12 | DE:15 | NL:10 | PL:5 | CZ:4 | SE:4"),
    "fr": ws("FR:80 | BEfr:13 | CHfr:4 | LU:3"),
    "nl": ws("NL:70 | BEnl:30"),
    "es": ws("ES"), "it": ws("IT"), "pl": ws("PL"), "pt": ws("PT"), "sv": ws("SE"), "cs": ws("CZ"),
}
LANG_WEIGHT = {"de": 25, "en": 17, "fr": 15, "nl": 9, "es": 9, "it": 8, "pl": 8, "pt": 4, "sv": 2.5, "cs": 2.5}
PREP = {"de": "in", "en": "in", "fr": "à", "nl": "in", "es": "en", "it": "a", "pt": "em", "sv": "i"}
REGION = {"de": "Raum {}:5 | Großraum {}:2 | Region {}:2 | {} und Umgebung:1", "en": "{} area:3 | Greater {}:1",
          "fr": "secteur {}:2 | région de {}:1", "nl": "regio {}:3 | omgeving {}:1",
          "es": "zona {}:2 | provincia de {}:1", "it": "zona {}:2 | provincia di {}:1", "pt": "zona de {}:1"}
REGION = {k: ws(v) for k, v in REGION.items()}
REMOTE = {"de": "Homeoffice | Remote | hybrid | mobiles Arbeiten", "en": "Remote | Hybrid | remote | WFH",
          "fr": "télétravail | télétravail partiel | Remote", "nl": "thuiswerken | hybride | Remote",
          "es": "teletrabajo | en remoto | Remoto", "it": "da remoto | smart working | Full remote",
          "pl": "praca zdalna | zdalnie | hybrydowo", "pt": "teletrabalho | remoto | híbrido",
          "sv": "distans | hybrid", "cs": "home office | práce z domova"}
REMOTE = {k: ws(v) for k, v in REMOTE.items()}

# --- decoration by language ----------------------------------------------
SENIOR_PRE = {"en": "Senior:30 | Junior:15 | Sr.:6 | Jr.:3 | Lead:6 | Trainee:3 | Graduate:3 | Principal:2",
              "de": "Senior:30 | Junior:15 | Erfahrener:8 | Sr.:3 | Trainee:2",
              "fr": "Senior:3 | Junior:2", "nl": "Senior:20 | Junior:12 | Medior:10 | Ervaren:4",
              "es": "Senior:2", "it": "Senior:2 | Junior:1", "pl": "Starszy:20 | Młodszy:10 | Senior:10 | Junior:6",
              "pt": "Senior:2", "sv": "Senior:3 | Junior:2 | Erfaren:1", "cs": "Senior:3 | Junior:2 | Zkušený:1"}
SENIOR_POST = {"en": "II:5 | III:3 | I:1 | (Senior):2 | - Senior:1 | Level 2:1",
               "de": "(Senior):3 | (Junior):2 | - Senior:1 | mit Berufserfahrung:2",
               "fr": "confirmé:12 | Senior:8 | Junior:6 | expérimenté:5 | débutant accepté:3 | (débutant accepté):1",
               "nl": "(Senior):2 | (Medior):2", "es": "Senior:8 | Junior:6 | con experiencia:4 | (Senior):1",
               "it": "Senior:8 | Junior:6 | con esperienza:4 | esperto:2",
               "pl": "(Senior):1 | - Junior:1", "pt": "Sénior:5 | Júnior:4 | Senior:3 | Junior:2 | com experiência:3",
               "sv": "(senior)", "cs": "- senior"}
SENIOR_PRE = {k: ws(v) for k, v in SENIOR_PRE.items()}
SENIOR_POST = {k: ws(v) for k, v in SENIOR_POST.items()}
SCHEDULE = {
    "de": "Vollzeit:30 | Teilzeit:15 | in Vollzeit:6 | Voll- oder Teilzeit:5 | VZ/TZ:2 | Minijob:5 | 20 h/Woche:2 | "
          "30 Std./Woche:2 | Schichtdienst:3 | Nachtschicht:2 | unbefristet:4 | befristet:2 | Vollzeit/Teilzeit:3",
    "en": "Full Time:20 | Part Time:10 | full-time:6 | part-time:4 | Permanent:10 | Temporary:5 | Contract:5 | "
          "Fixed Term:2 | night shift:3 | Nights:2 | 37.5 hrs:2 | Temp to Perm:2",
    "fr": "CDI:30 | CDD:15 | temps plein:8 | temps partiel:8 | Intérim:6 | CDI temps plein:4 | de nuit:2 | 35h:3 | "
          "Alternance:3 | CDD 6 mois:2",
    "nl": "fulltime:20 | parttime:12 | 32-40 uur:6 | 24 uur p/w:4 | vast contract:4 | tijdelijk:3 | oproepkracht:2 | "
          "nachtdienst:2",
    "es": "jornada completa:20 | media jornada:10 | jornada parcial:6 | turno de noche:3 | contrato indefinido:6 | "
          "temporal:4 | 40h:2",
    "it": "tempo pieno:15 | part-time:10 | full time:8 | tempo indeterminato:6 | tempo determinato:5 | "
          "turni notturni:2 | part time:4",
    "pl": "pełny etat:15 | pół etatu:6 | umowa o pracę:10 | B2B:6 | umowa zlecenie:6 | praca zmianowa:4",
    "pt": "tempo inteiro:12 | part-time:8 | full-time:6 | contrato sem termo:5 | turnos:4 | turno da noite:2",
    "sv": "heltid:10 | deltid:6 | tillsvidare:4 | vikariat:3",
    "cs": "plný úvazek:10 | zkrácený úvazek:5 | HPP:6 | brigáda:4",
}
SCHEDULE = {k: ws(v) for k, v in SCHEDULE.items()}
# pay: {h} hourly, {m} {m2} monthly, {y1} {y2} yearly, {k} {k1} {k2} thousands per year
PAY = {
    "de": "€{h}/h:4 | {h} €/Std.:4 | {h} € pro Stunde:2 | bis {m} € brutto:5 | ab {m} € brutto:3 | "
          "{m} € brutto/Monat:2 | {y1} - {y2} EUR:4 | {y1}–{y2} € p.a.:2 | bis zu {k}k €:3 | {k1}-{k2}k:2 | "
          "übertarifliche Bezahlung:2 | attraktive Vergütung:3 | TVöD:1",
    "ch": "CHF {m}:3 | bis CHF {y2}:2 | CHF {k1}-{k2}k:2 | CHF {h}/h:2",
    "uk": "£{k}k:5 | £{k1}k - £{k2}k:5 | £{y1} - £{y2}:3 | £{h} per hour:4 | £{h}ph:2 | "
          "Up to £{k}k + benefits:2 | Competitive salary:3 | DOE:2 | £{h}/hr:2",
    "ie": "€{k1}k-€{k2}k:4 | €{h} per hour:3 | Up to €{k}k:2 | Competitive salary:2",
    "fr": "salaire attractif:5 | {m} € brut/mois:4 | {k1}-{k2} K€:4 | jusqu'à {k}k€:3 | SMIC + primes:2 | "
          "{h} €/h:3 | {y1} - {y2} € annuel:2",
    "nl": "€{m} - €{m2} p/m:4 | tot €{m2} bruto:3 | € {h} per uur:3 | goed salaris:2 | €{m2} bruto per maand:2",
    "es": "{m} € brutos/mes:4 | salario competitivo:3 | {y1} - {y2} € b/a:3 | {h} €/hora:3 | salario según convenio:2",
    "it": "RAL {y1}€:3 | RAL {k1}-{k2}k:3 | retribuzione competitiva:3 | {h} €/ora:3 | RAL {y1} - {y2} €:2",
    "pl": "{m} - {m2} zł brutto:5 | do {m2} PLN netto:3 | {h} zł/h:4 | {m} - {m2} PLN netto B2B:2 | {m} zł brutto:3",
    "pt": "{m}€ brutos:3 | salário atrativo:3 | até {m2}€:3 | {m} € + subsídio de alimentação:2 | "
          "remuneração competitiva:2",
    "se": "{m} kr/mån:3 | konkurrenskraftig lön:2 | fast lön:1",
    "cz": "{m} Kč:3 | až {m2} Kč měsíčně:3 | mzda {h} Kč/h:2 | mzda až {m2} Kč:2",
}
PAY["at"] = PAY["de"]
PAY["be"] = PAY["lu"] = PAY["fr"]
PAY["benl"] = PAY["nl"]
PAY = {k: ws(v) for k, v in PAY.items()}
# invented benchmark ranges in local currency: hourly, monthly, yearly
PAY_RANGE = {"de": (12.5, 35, 2200, 6500, 32000, 95000), "benl": (14, 30, 2200, 5500, 30000, 75000),
             "at": (11, 32, 2000, 6000, 30000, 85000),
             "ch": (25, 50, 4500, 10000, 60000, 140000), "fr": (12, 28, 1800, 5000, 25000, 70000),
             "be": (14, 30, 2200, 5500, 30000, 75000), "lu": (15, 35, 2800, 7000, 40000, 100000),
             "nl": (14, 35, 2300, 6000, 32000, 85000), "uk": (11, 30, 1800, 5500, 22000, 85000),
             "ie": (13, 35, 2200, 6000, 28000, 90000), "es": (8, 20, 1100, 3500, 16000, 55000),
             "it": (8, 20, 1200, 3500, 20000, 60000), "pl": (28, 90, 4300, 20000, 55000, 250000),
             "pt": (5, 15, 850, 2800, 12000, 45000), "se": (140, 300, 26000, 60000, 300000, 800000),
             "cz": (130, 400, 22000, 90000, 300000, 1000000)}
REF = ws("Ref. {n4}:6 | Ref: {n4}:4 | Réf. {n4}:2 | [REQ-{n4}]:4 | #{n4}:5 | (ID {n5}):3 | Job-ID {n5}:2 | "
         "Kennziffer {n4}:2 | Stellen-ID: {n5}:1 | JR{n6}:3 | REF{n4}:2 | Nr. {n4}:1 | ID: {A}{A}-{n4}:1 | "
         "{A}{A}{n3}:1 | [{n5}]:1")
MKT_PRE = {"*": "URGENT:3 | URGENT:2 | 🚀:1 | 🔥:1 | ⭐:1 | ***:1 | NEW:1",
           "de": "Top-Job::4 | NEU::2 | Wir suchen::3 | Wir suchen Dich als:3 | Sofortstart::2 | Jetzt bewerben::1",
           "en": "We're hiring::3 | Hiring::2 | Join our team as:1 | Immediate start::1",
           "fr": "On recrute ::3 | Nous recrutons:2 | Recrutement immédiat ::2 | URGENT -:1",
           "nl": "Vacature::3 | Gezocht::2 | Wij zoeken een:2", "es": "Se busca:4 | Oferta::2 | Incorporación inmediata::1",
           "it": "Cercasi:4 | Si cerca:2 | Offerta di lavoro::1", "pl": "Pilnie zatrudnię::3 | Zatrudnimy::3 | Oferta pracy::1",
           "pt": "Procura-se:3 | Recrutamos:2 | Oferta de emprego::1", "sv": "Vi söker:3 | Sökes::1",
           "cs": "Hledáme::3 | Přijmeme::2"}
MKT_POST = {"*": "!!!:3 | !:2 | #hiring:2 | 🚀:1 | 🔥:1 | 💼:1 | ✅:1 | URGENT:2 | (URGENT):1",
            "de": "ab sofort:6 | zum nächstmöglichen Zeitpunkt:3 | Quereinsteiger willkommen:3 | mit Prämie:1 | "
                  "Jetzt bewerben!:2 | Top Arbeitgeber:1 | Bewerbung ohne Anschreiben:1",
            "en": "Immediate Start:3 | Urgent:2 | Apply now:2 | Great benefits:1 | Excellent Package:1",
            "fr": "Poste à pourvoir immédiatement:2 | Dès que possible:2 | Prime de bienvenue:1",
            "nl": "per direct:4 | Direct starten!:2 | Leuke baan:1",
            "es": "Incorporación inmediata:4 | urgente:2 | ¡Únete!:1",
            "it": "Inserimento immediato:3 | urgente:2 | anche prima esperienza:1",
            "pl": "Praca od zaraz:3 | od zaraz:3 | bez doświadczenia:1",
            "pt": "Admissão imediata:3 | Início imediato:2 | urgente:1",
            "sv": "omgående start:2 | Sök nu!:1", "cs": "nástup ihned:3 | ihned:1"}
MKT_PRE = {k: ws(v) for k, v in MKT_PRE.items()}
MKT_POST = {k: ws(v) for k, v in MKT_POST.items()}
# invented employers of the benchmark scenario (no real company)
EMPLOYERS = {
    "DE": "Valdoria Logistik GmbH | Quellmark Pflege gGmbH | Hofstrand Bau GmbH | Grünlach Handels KG | "
          "Raupelt Gastro GmbH | Klinikum Ostervell | Ostarra Facility Services",
    "AT": "Kranzbichl Metallbau GmbH | Valdoria Logistik GmbH", "CH": "Kranzbichl Metallbau AG | Talvero Systems",
    "FR": "Maison Ortalie SARL | Atelier Brévanne SAS | Groupe Vervial", "LU": "Groupe Vervial | Talvero Systems",
    "BE": "Lindewaard Services | Groupe Vervial", "NL": "Ostvelde Techniek B.V. | Lindewaard Installatie B.V.",
    "UK": "Keldmoor Engineering Ltd | Brennfeld Foods | Talvero Systems | Pellworth Retail",
    "IE": "Brennfeld Foods | Pellworth Retail", "ES": "Clínica Orvenda S.L. | Transportes Aldevia S.A.",
    "IT": "Vellacastra Ristorazione S.r.l. | Officine Stralvio S.p.A.",
    "PL": "Wierzbolin Logistyka Sp. z o.o. | Drelmak Budownictwo S.A.", "PT": "Carvalhena Serviços Lda.",
    "SE": "Fjällbrunn Omsorg AB", "CZ": "Dravec Strojírny s.r.o.",
}
EMPLOYERS = {k: ws(v) for k, v in EMPLOYERS.items()}
EMP_FORM = {"*": " - {}:3 | | {}:2 | ({}):1", "de": " bei {}:4 | {} sucht :2 | {}: :1", "en": " at {}:4 | @ {}:1 | {} is hiring: :1",
            "fr": " chez {}:4 | {} recrute :2", "nl": " bij {}:4", "es": " en {}:2", "it": " presso {}:3",
            "pl": " w firmie {}:2", "pt": " na {}:1", "sv": " till {}:2", "cs": " ve firmě {}:1"}
EMP_FORM = {k: ws(v) for k, v in EMP_FORM.items()}
SEP = W([(" - ", 30), (" – ", 14), (" | ", 12), (", ", 10), (" / ", 6), (" · ", 3), (" — ", 3), (" ", 8),
         (" -- ", 1), ("; ", 1)])
QUOTES = {"de": "„“", "cs": "„“", "pl": "„”", "fr": "«»", "sv": "””"}
FULLWIDTH = {c: chr(ord(c) + 0xFEE0) for c in map(chr, range(0x21, 0x7F))}

# German inflection endings; Romance -o/-a and -eur/-euse style pairs
DE_END = ws("/in:35 | /-in:10 | *in:20 | :in:15 | In:10 | _in:5 | (in):5")
ES_END = ws("/a:6 | (a):3 | /-a:1")
FR_END = {"ier": ("/ère", "(ère)", "/ière"), "teur": ("/trice", "(trice)"), "eur": ("/euse", "(euse)", "·euse"),
          "ien": ("/ne", "(ne)", "·ne"), "ant": ("/e", "(e)", "·e"), "é": ("e", "(e)", "·e")}
STOP = frozenset("de di da del della do du des em en a al à per com con e y et".split())


def de_ending(r, t):
    toks = t.split(" ")
    for i in range(len(toks) - 1, -1, -1):
        w = toks[i]
        if w[:1].isupper() and not w.isupper():
            if w.endswith("mann"):
                toks[i] = w + r.pick(("/-frau", "/frau", "/-frau"))
                return " ".join(toks)
            if w.endswith(("er", "eur", "ent", "ist", "ant", "eut", "ekt")) and w != "Manager":
                toks[i] = w + DE_END(r)
                return " ".join(toks)
    return t


def romance_ending(r, t, lang):
    toks = t.split(" ")
    for i, w in enumerate(toks):
        lw = w.lower()
        if lw in STOP:
            break
        if lang == "fr":
            if lw.endswith(("sseur", "nieur", "ffeur")):     # professeure, ingénieure, chauffeure
                toks[i] = w + r.pick(FR_END["é"])
                return " ".join(toks)
            for suf in ("ier", "teur", "eur", "ien", "ant", "é"):
                if lw.endswith(suf):
                    toks[i] = w + r.pick(FR_END[suf])
                    return " ".join(toks)
        elif len(w) > 3 and (lw.endswith("o") or lw.endswith("or") or (lang == "it" and lw.endswith("iere"))):
            toks[i] = w + ES_END(r)
            return " ".join(toks)
    return t


def amount(v, th):
    return f"{v:,}".replace(",", th)


def pay_text(r, key, th):
    hl, hh, ml, mh, yl, yh = PAY_RANGE[key]
    hv = hl + r.below(int((hh - hl) * 2) + 1) / 2
    h = f"{hv:.2f}" if hv % 1 else str(int(hv))
    if key not in ("uk", "ie"):
        h = h.replace(".", ",")
    step = 100 if mh < 30000 else 1000
    m = ml + r.below((mh - ml) // step + 1) * step
    m2 = m + step * (2 + r.below(8))
    y1 = (yl + r.below((yh - yl) // 1000 + 1) * 1000) // 1000 * 1000
    y2 = y1 + 1000 * (5 + r.below(15))
    k1 = y1 // 1000
    s = PAY[key](r)
    return s.format(h=h, m=amount(m, th), m2=amount(m2, th), y1=amount(y1, th), y2=amount(y2, th),
                    k=k1 + 5, k1=k1, k2=y2 // 1000)


def location(r, lang, ckey, sep):
    city, pc = r.pick(CITIES[ckey])
    form = r.next() % 100
    if form < 30:
        return sep + city
    if form < 50:
        return ", " + city
    if form < 62 and lang in PREP:
        return f" {PREP[lang]} {city}"
    if form < 77:
        return f" ({city})"
    if form < 83 and lang in REGION:
        return " " + REGION[lang](r).format(city)
    if form < 90 and pc:
        if city == "Paris":
            pc = f"750{1 + r.below(20):02d}"
        elif city == "Lyon":
            pc = f"6900{1 + r.below(9)}"
        return f"{sep}{pc} {city}" if r.chance(0.5) else f" {pc} {city}"
    if form < 96:
        rem = REMOTE[lang](r)
        if r.chance(0.4):
            return f" – {rem.lower()} ({COUNTRY[ckey][0]})"
        return sep + rem
    other = r.pick(CITIES[ckey])[0]
    if other == city:
        return sep + city
    return sep + city + r.pick(("/", " / ", ", ", " oder " if lang == "de" else " or ")) + other


def unicode_noise(r, s, lang):
    """Low-rate Unicode noise on a finished title; returns str (maybe with surrogate escapes)."""
    x = r.next() % 100000
    if not s:
        return s
    if x < 1000 and " " in s:                      # 1 % one NBSP for a space
        i = s.find(" ", r.below(len(s)))
        i = s.find(" ") if i < 0 else i
        s = s[:i] + "\u00a0" + s[i + 1:]
    elif x < 1300:                                  # 0.3 % zero-width space
        i = r.below(len(s) + 1)
        s = s[:i] + "\u200b" + s[i:]
    elif x < 1400:                                  # 0.1 % soft hyphen
        i = r.below(len(s) + 1)
        s = s[:i] + "\u00ad" + s[i:]
    elif x < 1600:                                  # 0.2 % full-width forms
        s = "".join(FULLWIDTH.get(c, c) for c in s)
    elif x < 1900:                                  # 0.3 % decomposed accents (NFD)
        s = unicodedata.normalize("NFD", s)
    elif x < 2000:                                  # 0.1 % mojibake (UTF-8 read as Latin-1)
        if not s.isascii():
            s = s.encode("utf-8").decode("latin-1")
    elif x < 2100:                                  # 0.1 % invalid UTF-8
        b = s.encode("latin-1", "replace") if r.chance(0.5) else b""   # legacy 8-bit line
        if not b or b.isascii():
            i = r.below(len(s) + 1)
            b = s[:i].encode() + r.pick((b"\xff", b"\xc3", b"\x80", b"\xe2\x82", b"\xc0\xaf", b"\xed\xa0\x80")) \
                + s[i:].encode()
        s = b.decode("utf-8", "surrogateescape")
    elif x < 3600:                                  # 1.5 % doubled or stray spaces
        i = s.find(" ", r.below(len(s) + 1))
        s = s[:i] + " " + s[i:] if i > 0 else " " + s + " "
    elif x < 4600:                                  # 1 % trailing/leading blanks
        s = r.pick(("", " ", "  ")) + s + r.pick((" ", "  ", "\u00a0"))
    return s


class Gen:
    def __init__(self, seed, vocab):
        self.r = Rng(seed)
        byocc = {}
        for occ, lang, title in vocab:
            byocc.setdefault(occ, {}).setdefault(lang, []).append(title)
        # occupation popularity: a hand-picked head of large occupations, then Zipf over the rest
        head = ("5223 8332 9333 4321 2512 2221 5120 9112 9329 4110 3322 7411 5321 8322 5131 2513 4222 "
                "7231 7233 3313 5414 1221").split()
        occs = sorted(byocc)
        order = ["occ:" + h for h in head if "occ:" + h in byocc] + [o for o in occs if o[4:] not in head]
        self.occ = W([(o, 1.0 / (i + 3) ** 0.9) for i, o in enumerate(order)])
        self.langs = {o: W([(l, LANG_WEIGHT[l]) for l in sorted(byocc[o])]) for o in occs}
        self.var = {(o, l): W([(t, (1.0, 0.55, 0.3)[i]) for i, t in enumerate(v)])
                    for o in occs for l, v in sorted(byocc[o].items())}
        self.cats = {}
        for ck in sorted(COUNTRY):
            g = COUNTRY[ck][1]
            self.cats[ck] = W([(c, g if c == "gender" else w) for c, w in CAT_WEIGHT])
        self.byocc = byocc
        self.occs = occs

    def title(self):
        """One raw title: returns (occupation, lang, text)."""
        r = self.r
        occ = self.occ(r)
        lang = self.langs[occ](r)
        ckey = LANG_COUNTRY[lang](r)
        iso, _, markers, paykey, ths = COUNTRY[ckey]
        x = r.next() % 100000
        if x < 50:
            return occ, lang, ""                        # 0.05 % empty lines
        t = self.var[(occ, lang)](r)
        if "'" in t and r.chance(0.3):
            t = t.replace("'", "’")
        if x < 350:                                     # 0.3 % curly quotes
            q = QUOTES.get(lang, "“”")
            t = q[0] + ("\u00a0" + t + "\u00a0" if q == "«»" else t) + q[1]
        sep = SEP(r)
        pre, mid, tail = [], [], []
        cats = ()
        if r.chance(P_NOISY) or x < 100:
            k, want, cw = NCATS(r), [], self.cats[ckey]
            for _ in range(12):
                c = cw(r)
                if c not in want:
                    want.append(c)
                    if len(want) == k:
                        break
            cats = want
        if "gender" in cats:
            marker = True
            if lang == "de" and r.chance(0.3):
                t2 = de_ending(r, t)
                marker = t2 == t or r.chance(0.12)
                t = t2
            elif lang in ("es", "it", "pt", "fr") and r.chance(0.45 if lang != "fr" else 0.15):
                t2 = romance_ending(r, t, lang)
                marker = t2 == t or r.chance(0.1)
                t = t2
            if marker and markers is not None:
                mid.append(" " + markers(r))
        if "bilingual" in cats:
            other = COUNTRY_LANG.get(ckey, "en") if lang == "en" else "en"
            if other != lang and (occ, other) in self.var:
                t += r.pick((" / ", " | ", " - ", " ")) + self.var[(occ, other)](r)
        if "seniority" in cats:
            if lang in SENIOR_POST and (lang not in SENIOR_PRE or r.chance(0.35)):
                mid.insert(0, " " + SENIOR_POST[lang](r))
            else:
                s = SENIOR_PRE[lang](r)
                if lang in ("pl", "cs", "sv") and t[1:2].islower() and s not in ("Senior", "Junior"):
                    t = t[0].lower() + t[1:]
                pre.append(s + " ")
        if "schedule" in cats:
            s = SCHEDULE[lang](r)
            if r.chance(0.15):
                pre.insert(0, s + sep)
            else:
                tail.append(sep + s if r.chance(0.8) else f" ({s})")
        if "location" in cats:
            tail.append(location(r, lang, ckey, sep))
        if "pay" in cats:
            p = pay_text(r, paykey, r.pick(ths))
            tail.append(sep + p if r.chance(0.75) else f" ({p})")
        if "reference" in cats:
            n = r.next()
            ref = REF(r).format(n3=f"{n % 1000:03d}", n4=f"{n % 10000:04d}", n5=f"{n % 100000:05d}",
                                n6=f"{n % 1000000:06d}", A=chr(65 + (n >> 40) % 26))
            if r.chance(0.3):
                pre.insert(0, ref + " ")
            else:
                tail.append(sep + ref if ref[0] not in "[(#" or r.chance(0.5) else " " + ref)
        if "marketing" in cats:
            if r.chance(0.45):
                pre.insert(0, (MKT_PRE[lang] if r.chance(0.7) else MKT_PRE["*"])(r) + " ")
            else:
                s = (MKT_POST[lang] if r.chance(0.6) else MKT_POST["*"])(r)
                tail.append((" " if s[0] in "!#🚀🔥💼✅" else sep) + s)
        if "employer" in cats:
            emp = EMPLOYERS[iso](r)
            form = (EMP_FORM[lang] if r.chance(0.6) else EMP_FORM["*"])(r)
            if form.endswith(" "):
                pre.insert(0, form.format(emp))
            else:
                tail.append((form if form[0] == " " else " " + form).format(emp))
        if len(tail) > 1 and r.chance(0.2):
            r_tail = []
            while tail:
                r_tail.append(tail.pop(r.below(len(tail))))
            tail = r_tail
        if x < 100:                                     # 0.05 % all-noise lines
            t = ""
            pre = pre or ["URGENT "]
        s = "".join(pre) + t + "".join(mid) + "".join(tail)
        c = r.next() % 1000
        if c < 50:
            s = s.upper()                                # 5 % ALL CAPS
        elif c < 70:
            s = s.lower()
        elif c < 80:
            s = s.title()
        return occ, lang, unicode_noise(r, s.strip(" "), lang)

    def related(self, occ):
        """A second occupation of the same ISCO sub-major group when there is one."""
        same = [o for o in self.occs if o[4:6] == occ[4:6] and o != occ]
        return self.r.pick(same or [o for o in self.occs if o != occ])


def load_vocab(path):
    rows = []
    with open(path, encoding="utf-8") as f:
        head = f.readline().rstrip("\n").split("\t")
        ci, li, ti = head.index("occupation"), head.index("lang"), head.index("title")
        for line in f:
            p = line.rstrip("\n").split("\t")
            if len(p) > max(ci, li, ti) and p[ti]:
                rows.append((p[ci], p[li], p[ti]))
    return rows


def main():
    ap = argparse.ArgumentParser(description="Write a deterministic benchmark corpus of raw job-posting titles.")
    ap.add_argument("--count", type=int, required=True, help="number of lines (postings) to write")
    ap.add_argument("--seed", type=int, default=1, help="seed of the generator (default 1)")
    ap.add_argument("--postings", action="store_true", help="write a postings TSV instead of bare titles")
    ap.add_argument("--vocab", default=os.path.join(os.path.dirname(os.path.abspath(__file__)), "vocab.tsv"))
    a = ap.parse_args()
    if a.count < 0:
        ap.error("--count must be >= 0")
    g = Gen(a.seed * 0x2545F4914F6CDD1D + 0x1234567, load_vocab(a.vocab))
    out = sys.stdout.buffer
    buf = []
    if a.postings:
        buf.append("id\tdate\tlang\toccupations\ttitle")
    r = g.r
    nid = 40000000 + (a.seed % 1000) * 100000
    ring = []                                            # recent postings for republication
    for i in range(a.count):
        if a.postings:
            day = 1 + i * 31 // max(a.count, 1)
            if ring and r.chance(0.05):
                pid, d0, lang, occs, t = ring[r.below(len(ring))]
                if d0 < 31:
                    d = day if day > d0 else d0 + 1 + r.below(min(5, 31 - d0))
                    buf.append(f"{pid}\t2026-03-{d:02d}\t{lang}\t{occs}\t{t}")
                    if len(buf) >= 20000:
                        out.write(("\n".join(buf) + "\n").encode("utf-8", "surrogateescape"))
                        buf = []
                    continue
            occ, lang, t = g.title()
            if r.chance(0.03):
                occ = occ + "|" + g.related(occ)
            nid += 1 + r.below(4)
            rec = (str(nid), day, lang, occ, t)
            if len(ring) < 20000:
                ring.append(rec)
            else:
                ring[r.below(20000)] = rec
            buf.append(f"{nid}\t2026-03-{day:02d}\t{lang}\t{occ}\t{t}")
        else:
            buf.append(g.title()[2])
        if len(buf) >= 20000:
            out.write(("\n".join(buf) + "\n").encode("utf-8", "surrogateescape"))
            buf = []
    if buf:
        out.write(("\n".join(buf) + "\n").encode("utf-8", "surrogateescape"))


if __name__ == "__main__":
    try:
        main()
    except BrokenPipeError:                               # reader stopped early (head): not an error here
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        sys.exit(1)
