#!/usr/bin/env python3
"""Counted postings for part of the evaluation taxonomy: the titles the
market uses for 30 of its occupations, labels and non-labels, each
written a few ways (decoration before and after), with a fixed seed.
Writes a postings TSV (id, lang, occupations, title) to standard output."""
import random
import sys

# occupation -> (lang, market title, weight)
MARKET = {
 "hx:01": [("de", "Staplerfahrer", 30), ("de", "Gabelstaplerfahrer", 20), ("en", "Forklift Truck Driver", 12),
           ("fr", "Cariste CACES 3", 10), ("nl", "Heftruckchauffeur", 8), ("de", "Lagermitarbeiter mit Staplerschein", 6)],
 "hx:02": [("de", "Lagermitarbeiter", 40), ("de", "Kommissionierer", 25), ("en", "Warehouse Associate", 15),
           ("en", "Picker Packer", 10), ("fr", "Préparateur de commandes", 12), ("es", "Mozo de almacén", 10),
           ("it", "Magazziniere", 10), ("nl", "Logistiek medewerker", 8), ("de", "Lagerlogistiker", 6)],
 "hx:03": [("en", "Backend Developer", 20), ("en", "Full Stack Developer", 20), ("en", "Java Developer", 15),
           ("de", "Softwareentwickler", 20), ("de", "Fullstack Entwickler", 8), ("fr", "Développeur Full Stack", 10),
           ("es", "Desarrollador Java", 8), ("nl", "Software Developer", 6)],
 "hx:04": [("de", "Pflegefachkraft", 30), ("de", "Pflegefachfrau", 10), ("en", "Staff Nurse", 15),
           ("fr", "Infirmier diplômé d'état", 12), ("es", "Enfermero", 10), ("it", "Infermiere professionale", 8),
           ("nl", "Verpleegkundige", 10)],
 "hx:05": [("de", "Koch", 30), ("de", "Jungkoch", 10), ("en", "Line Cook", 10), ("en", "Sous Chef", 8),
           ("fr", "Commis de cuisine", 12), ("es", "Ayudante de cocina", 10), ("it", "Aiuto cuoco", 8)],
 "hx:06": [("de", "Servicemitarbeiter", 20), ("de", "Kellner", 15), ("en", "Waiting Staff", 10),
           ("fr", "Chef de rang", 10), ("es", "Camarero de sala", 10), ("it", "Cameriere di sala", 10)],
 "hx:07": [("de", "Elektroniker", 25), ("de", "Elektriker", 20), ("en", "Maintenance Electrician", 12),
           ("fr", "Électricien", 10), ("es", "Oficial electricista", 8), ("nl", "Elektromonteur", 8)],
 "hx:09": [("de", "LKW-Fahrer", 30), ("de", "Berufskraftfahrer CE", 20), ("de", "Kraftfahrer", 10),
           ("en", "Class 1 Driver", 12), ("fr", "Chauffeur SPL", 12), ("es", "Conductor de tráiler", 8),
           ("nl", "Chauffeur CE", 8)],
 "hx:10": [("de", "Buchhalter", 20), ("en", "Accounts Assistant", 12), ("en", "Accountant", 10),
           ("fr", "Comptable", 12), ("es", "Contable", 8)],
 "hx:11": [("de", "Verkäufer", 25), ("de", "Verkaufsmitarbeiter", 10), ("en", "Retail Assistant", 10),
           ("en", "Store Associate", 8), ("fr", "Vendeur en magasin", 10), ("es", "Dependiente", 10),
           ("it", "Addetto vendite", 8), ("nl", "Verkoper", 8)],
 "hx:12": [("de", "Kassierer", 15), ("fr", "Hôte de caisse", 10), ("es", "Cajero reponedor", 10),
           ("en", "Cashier", 10)],
 "hx:13": [("de", "Reinigungskraft", 30), ("de", "Raumpfleger", 8), ("en", "Cleaner", 15),
           ("fr", "Agent d'entretien", 12), ("es", "Limpiadora", 10), ("nl", "Schoonmaker", 8),
           ("it", "Addetta alle pulizie", 8)],
 "hx:19": [("de", "Kfz-Mechatroniker", 25), ("de", "KFZ Mechaniker", 8), ("en", "Vehicle Technician", 10),
           ("fr", "Mécanicien automobile", 10), ("es", "Mecánico", 8), ("nl", "Monteur", 6)],
 "hx:24": [("de", "Sicherheitsmitarbeiter", 20), ("de", "Security Mitarbeiter", 10), ("en", "Security Officer", 15),
           ("fr", "Agent de sécurité SSIAP", 10), ("es", "Vigilante de seguridad", 10)],
 "hx:25": [("de", "Pflegehelfer", 20), ("de", "Pflegeassistent", 10), ("en", "Care Assistant", 15),
           ("en", "Healthcare Assistant", 12), ("fr", "Aide-soignant", 12), ("es", "Gerocultora", 8),
           ("it", "OSS", 8)],
 "hx:29": [("en", "Project Manager", 20), ("de", "Projektleiter", 15), ("de", "Projektmanager", 8),
           ("fr", "Chef de projet", 10), ("it", "Project Manager", 6)],
 "hx:35": [("en", "Customer Service Advisor", 15), ("de", "Kundenberater", 15), ("de", "Kundenservice Mitarbeiter", 10),
           ("fr", "Téléconseiller", 12), ("es", "Teleoperador", 12), ("it", "Operatore call center", 8),
           ("nl", "Klantenservice medewerker", 8)],
 "hx:36": [("de", "Sachbearbeiter", 20), ("de", "Bürokauffrau", 10), ("en", "Office Administrator", 12),
           ("fr", "Assistante administrative", 12), ("es", "Auxiliar administrativo", 10),
           ("it", "Impiegata amministrativa", 8), ("nl", "Administratief medewerker", 8)],
 "hx:42": [("de", "Paketzusteller", 20), ("de", "Fahrer", 6), ("de", "Kurierfahrer", 10), ("en", "Delivery Driver", 15),
           ("en", "Van Driver", 10), ("fr", "Chauffeur livreur", 12), ("es", "Repartidor", 10),
           ("nl", "Pakketbezorger", 8)],
 "hx:43": [("de", "Produktionshelfer", 20), ("de", "Maschinenbediener", 15), ("en", "Production Operative", 12),
           ("fr", "Opérateur de production", 12), ("es", "Operario de producción", 10),
           ("it", "Operaio", 8), ("nl", "Productiemedewerker", 8)],
 "hx:44": [("de", "Maurer", 15), ("en", "Bricklayer", 10), ("fr", "Maçon", 10), ("es", "Oficial de albañilería", 8)],
 "hx:45": [("de", "Erzieher", 20), ("de", "pädagogische Fachkraft", 10), ("en", "Nursery Practitioner", 10),
           ("fr", "Auxiliaire de puériculture", 8), ("nl", "Pedagogisch medewerker", 8)],
 "hx:46": [("de", "Zimmermädchen", 10), ("de", "Housekeeping Mitarbeiter", 8), ("en", "Room Attendant", 10),
           ("fr", "Femme de chambre", 10), ("es", "Camarera de pisos", 10)],
 "hx:47": [("de", "Außendienstmitarbeiter", 15), ("de", "Vertriebsmitarbeiter", 10), ("en", "Sales Executive", 12),
           ("en", "Business Development Manager", 8), ("fr", "Commercial terrain", 10), ("es", "Comercial", 10)],
 "hx:09x": [],
}
# the truck drivers also write "Fahrer"
MARKET["hx:09"].append(("de", "Fahrer", 8))
del MARKET["hx:09x"]

BEFORE = ["", "", "", "Senior ", "Junior ", "Erfahrener ", "Stellenangebot: ", "URGENT ", "Nouveau : "]
AFTER = {"de": ["", "", " (m/w/d)", " in Vollzeit", " - Teilzeit", " (m/w/d) Dortmund", " ab sofort"],
         "en": ["", "", " - Full Time", " (Nights)", " | Leeds", " - £24,000"],
         "fr": ["", "", " H/F", " (H/F) - CDI", " - Lyon", " en CDD"],
         "es": ["", "", " - Jornada completa", " (Madrid)", " h/m"],
         "it": ["", "", " - Full time", " (Milano)", " m/f"],
         "nl": ["", "", " (32-40 uur)", " - Utrecht", " fulltime"]}

def main():
    rng = random.Random(20261205)
    out = sys.stdout
    out.write("id\tlang\toccupations\ttitle\n")
    n = 0
    for occ in sorted(MARKET):
        for lang, title, w in MARKET[occ]:
            for _ in range(w):
                n += 1
                t = rng.choice(BEFORE) + title + rng.choice(AFTER[lang])
                out.write(f"p{n}\t{lang}\t{occ}\t{t}\n")

if __name__ == "__main__":
    main()
