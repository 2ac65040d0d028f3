"""Invented name pools, organisations and places for the sample scenario.

Every organisation, town, street and e-mail domain here is made up. E-mail
domains are all reserved for examples (RFC 2606 / RFC 6761: ``*.example``,
``example.com``, ``example.net``, ``example.org``). Given and family names are
common names of many cultures, drawn and combined at random; no combination
refers to a real person on purpose.
"""

from __future__ import annotations

import unicodedata

#: Domains for private addresses (web mail of the invented world).
PERSONAL_DOMAINS = ("example.net", "example.com", "mail.example", "post.example")


def _pool(female: str, male: str, family: str) -> tuple[list[str], list[str], list[str]]:
    return female.split(","), male.split(","), family.split(",")


#: culture -> (female given names, male given names, family names). A family
#: name written "a|b" has a masculine and a feminine form.
CULTURES = {
    "en": _pool(
        "Amelia,Isla,Ava,Emily,Sophie,Charlotte,Lucy,Hannah,Grace,Rebecca,Elizabeth,Victoria,Rachel,Helen,"
        "Claire,Fiona,Siobhan,Carys,Niamh,Harriet,Imogen,Philippa,Joanne,Bethany,Zoë,Siân",
        "Oliver,Harry,George,Jack,Thomas,William,James,Daniel,Samuel,Benjamin,Christopher,Jonathan,Robert,"
        "Matthew,Andrew,Simon,Gareth,Ewan,Rhys,Declan,Alistair,Callum,Edward,Patrick,Nathan",
        "Smith,Jones,Taylor,Brown,Williams,Wilson,Davies,Robinson,Wright,Thompson,Evans,Walker,White,Roberts,"
        "Green,Hall,Wood,Jackson,Clarke,Hughes,Edwards,Turner,Harris,Morgan,Price,Bennett,Ward,Fletcher,Murray,"
        "Campbell,Stewart,MacLeod,Byrne,O'Brien,Gallagher,Kennedy,Lloyd,Pritchard,Holloway,Ashworth,Whitfield",
    ),
    "de": _pool(
        "Katrin,Anna,Lena,Sabine,Julia,Jana,Ute,Franziska,Miriam,Leonie",
        "Jürgen,Lukas,Felix,Matthias,Tobias,Jörg,Stefan,Moritz,Günter,Florian",
        "Müller,Schmidt,Schneider,Fischer,Weber,Becker,Hoffmann,Schäfer,Koch,Bauer,Richter,Krüger,Weiß,Köhler",
    ),
    "fr": _pool(
        "Amélie,Hélène,Camille,Léa,Chloé,Céline,Anaïs,Margaux,Élodie,Noémie",
        "Benoît,Théo,Julien,Mathieu,François,Étienne,Loïc,Rémi,Jérôme,Hugo",
        "Dubois,Lefèvre,Moreau,Laurent,Girard,Bonnet,Fontaine,Rousseau,Mercier,Lemaître,Chevalier,Gauthier",
    ),
    "es": _pool(
        "María,Lucía,Sofía,Paula,Carmen,Mónica,Inés,Pilar,Ainhoa,Rocío",
        "José,Javier,Alejandro,Andrés,Diego,Raúl,Íñigo,Álvaro,Sergio,Joaquín",
        "García,Fernández,López,Martínez,Sánchez,Pérez,Gómez,Ruiz,Díaz,Morales,Navarro,Ortega,Muñoz,Ibáñez",
    ),
    "pt": _pool("Ana,Beatriz,Mariana,Luísa,Joana", "João,Luís,Tiago,Rui,Gonçalo",
                "Silva,Oliveira,Costa,Pereira,Gonçalves,Ribeiro,Carvalho,Azevedo"),
    "it": _pool("Giulia,Francesca,Chiara,Elena,Martina,Alessia", "Marco,Alessandro,Luca,Matteo,Giorgio,Davide",
                "Rossi,Russo,Ferrari,Esposito,Bianchi,Romano,Colombo,Ricci,Marino,Greco,Conti,De Luca"),
    "nordic": _pool("Ingrid,Astrid,Sigrid,Freja,Åsa,Maren,Solveig,Liv",
                    "Søren,Lars,Mikkel,Björn,Nils,Anders,Håkon,Erik",
                    "Hansen,Johansen,Nielsen,Lindqvist,Andersson,Berg,Dahl,Haugen,Sørensen,Eriksson,Løvaas,Nyström"),
    "nl": _pool("Femke,Marieke,Sanne,Anouk,Lotte", "Sander,Joost,Bram,Thijs,Ruben",
                "de Vries,van den Berg,Jansen,Bakker,Visser,van Dijk,Smit,Mulder"),
    "pl": _pool("Agnieszka,Katarzyna,Magdalena,Zofia,Tereza,Małgorzata", "Łukasz,Tomasz,Piotr,Jakub,Ondřej,Paweł",
                "Nowak,Kowalski|Kowalska,Wiśniewski|Wiśniewska,Wójcik,Lewandowski|Lewandowska,Dvořák|Dvořáková,"
                "Zieliński|Zielińska"),
    "ru": _pool("Olga,Natalia,Irina,Oksana,Svetlana,Yulia", "Dmitri,Sergei,Mikhail,Andriy,Pavel,Oleksandr",
                "Volkov|Volkova,Petrenko,Sokolov|Sokolova,Kuznetsov|Kuznetsova,Morozov|Morozova,Bondarenko,"
                "Shevchuk,Melnyk"),
    "el": _pool("Eleni,Katerina,Sofia,Despina", "Giorgos,Nikos,Dimitris,Yannis",
                "Papadopoulos|Papadopoulou,Georgiou,Nikolaidis|Nikolaidou,Karagiannis|Karagianni,Alexiou"),
    "tr": _pool("Elif,Zeynep,Ayşe,Defne,Ebru", "Emre,Mehmet,Can,Burak,Kerem",
                "Yılmaz,Kaya,Demir,Şahin,Çelik,Aydın,Öztürk,Arslan"),
    "ng": _pool("Ngozi,Adaeze,Funmilayo,Yetunde,Folake,Chiamaka,Temitope",
                "Chidi,Oluwaseun,Emeka,Ifeanyi,Babatunde,Obinna,Kelechi",
                "Okafor,Adeyemi,Okonkwo,Balogun,Eze,Nwosu,Adebayo,Ogunleye,Obi,Chukwu"),
    "east_africa": _pool("Ama,Akosua,Wanjiru,Amani,Selam,Abena,Njeri", "Kwame,Kofi,Otieno,Tesfaye,Kwabena,Dawit,Baraka",
                         "Mensah,Asante,Owusu,Boateng,Kamau,Odhiambo,Mwangi,Tadesse,Haile,Ochieng"),
    "in": _pool("Priya,Ananya,Kavya,Deepa,Meera,Aditi,Lakshmi,Shreya,Pooja,Divya",
                "Arjun,Rohan,Vikram,Sanjay,Rahul,Nikhil,Siddharth,Karthik,Aditya,Varun",
                "Sharma,Patel,Raman,Iyer,Nair,Gupta,Reddy,Menon,Kulkarni,Desai,Chatterjee,Banerjee,Singh,Kapoor,Rao"),
    "ar": _pool("Ayesha,Fatima,Zainab,Nadia,Layla,Samira,Hira,Mariam",
                "Imran,Omar,Yusuf,Tariq,Karim,Hassan,Bilal,Faisal",
                "Khan,Hussain,Ahmed,Rahman,Chowdhury,Haddad,Nasser,Saleh,Farouk,Aziz,Qureshi,Malik"),
    "zh": _pool("Jing,Mei,Fang,Xiu,Ying,Lan,Yuting,Shu", "Wei,Lei,Hao,Jun,Xiaoming,Zhiwei,Tao,Bo",
                "Chen,Wang,Zhang,Liu,Huang,Zhao,Wu,Zhou,Lin,Chan,Leung,Wong"),
    "ja": _pool("Yui,Aoi,Emi,Naomi,Yuki,Haruka,Sakura", "Haruto,Sota,Kenji,Takeshi,Hiroshi,Ren,Daiki",
                "Sato,Suzuki,Takahashi,Tanaka,Watanabe,Ito,Nakamura,Kobayashi,Yamamoto,Mori"),
    "ko": _pool("Seo-yeon,Hye-jin,Soo-ah,Ji-woo,Min-ji", "Min-jun,Ji-ho,Jae-won,Dong-hyun,Sung-min",
                "Kim,Lee,Park,Choi,Jung,Kang,Yoon,Han"),
    "vi": _pool("Linh,Thảo,Hương,Trang,Ngọc", "Minh,Quang,Tuấn,Huy,Đức", "Nguyễn,Trần,Lê,Phạm,Hoàng,Vũ,Đặng"),
    "fil": _pool("Maricel,Rowena,Jasmine,Kristine", "Paolo,Marvin,Jericho,Rommel",
                 "Reyes,Cruz,Bautista,Mendoza,Villanueva,Dela Cruz"),
    "hu": _pool("Zsófia,Réka,Eszter,Dóra", "Bence,Ádám,Gergely,Levente", "Nagy,Tóth,Szabó,Kovács,Horváth,Farkas"),
}

#: How often each culture is drawn (an address book of someone living in an invented English county).
CULTURE_WEIGHTS = {
    "en": 30, "de": 4, "fr": 4, "es": 4, "pt": 2, "it": 3, "nordic": 3, "nl": 2, "pl": 3, "ru": 2, "el": 2,
    "tr": 2, "ng": 5, "east_africa": 3, "in": 7, "ar": 4, "zh": 4, "ja": 2, "ko": 2, "vi": 2, "fil": 2, "hu": 2,
}

#: Common short forms of given names.
NICKNAMES = {
    "Thomas": "Tom", "William": "Will", "James": "Jamie", "Daniel": "Dan", "Samuel": "Sam", "Benjamin": "Ben",
    "Christopher": "Chris", "Jonathan": "Jon", "Robert": "Rob", "Matthew": "Matt", "Andrew": "Andy",
    "Edward": "Ted", "Alistair": "Ali", "Nathan": "Nate", "Elizabeth": "Liz", "Rebecca": "Becky",
    "Victoria": "Vicky", "Philippa": "Pippa", "Harriet": "Hattie", "Charlotte": "Lottie", "Joanne": "Jo",
    "Bethany": "Beth", "Franziska": "Franzi", "Alejandro": "Álex", "José": "Pepe", "Francesca": "Fran",
    "Alessandro": "Sandro", "Oluwaseun": "Seun", "Babatunde": "Tunde", "Temitope": "Tope", "Chiamaka": "Amaka",
    "Funmilayo": "Funmi", "Oleksandr": "Sasha", "Dmitri": "Dima", "Katerina": "Kat", "Siddharth": "Sid",
    "Aditya": "Adi", "Katarzyna": "Kasia", "Małgorzata": "Gosia", "Magdalena": "Magda", "Giorgos": "George",
}


class Org:
    """An invented organisation: name, e-mail domain and address style, office phone range."""

    def __init__(self, name: str, domain: str, style: str, office: str = "", short: str = "",
                 street: str = "", town: str = "", country: str = "United Kingdom"):
        self.name, self.domain, self.style, self.office = name, domain, style, office
        self.short = short or name.split()[0]
        self.street, self.town, self.country = street, town, country


ORGS = {o.name: o for o in [
    Org("Quillon Labs", "quillon.example", "first.last", "+44207946", street="4 Tanner's Yard", town="Wrenhallow"),
    Org("Harrowgate Logistics", "harrowgate.example", "flast", "+44117496",
        street="Harrowgate House\nUnit 4, Canal Wharf", town="Tarrowby Cross"),
    Org("Brennick Maritime", "brennick.example", "f.last", "+44131496", street="2 Ropewalk Quay", town="Fennmouth"),
    Org("Corrimont Labs", "corrimont.example", "first.last", "+44161496", street="9 Beacon Row", town="Calderwyn"),
    Org("Dunmere Consulting", "dunmere.example", "f.last", "+44113496", street="31 Linnet Street",
        town="Pellingsford"),
    Org("Velvane Robotics", "velvane.example", "first", "+1617555", street="120 Foundry Way", town="Cedarwick",
        country="United States"),
    Org("Orsolan Biotech", "orsolan.example", "flast", "+44115496", street="Orsolan Park", town="Sallowmere"),
    Org("Thistlecombe Energy", "thistlecombe.example", "first.last", "+44141496", street="1 Turbine Walk",
        town="Elderwick Down"),
    Org("Aldermoor University", "aldermoor.example", "first.last", street="Cloister Lane", town="Aldermoor"),
    Org("Ombrelle Systems", "ombrelle.example", "first.last"),
    Org("Brightfen Analytics", "brightfen.example", "flast"),
    Org("Callowmere Freight", "callowmere.example", "f.last"),
    Org("Dovenhall Software", "dovenhall.example", "first"),
    Org("Emberwick Insurance", "emberwick.example", "first.last"),
    Org("Fairhollow Foods", "fairhollow.example", "flast"),
    Org("Glimmerbank", "glimmerbank.example", "first.last"),
    Org("Ironwick Systems", "ironwick.example", "firstl"),
    Org("Larkspire Mobility", "larkspire.example", "first.last"),
    Org("Mossgarth Retail", "mossgarth.example", "f.last"),
    Org("Northmere Mutual", "northmere.example", "flast"),
    Org("Oxhollow Engineering", "oxhollow.example", "first.last"),
    Org("Pennistow Water", "pennistow.example", "f.last"),
    Org("Brackenhold Security", "brackenhold.example", "first"),
    Org("Tallowmere Cloud", "tallowmere.example", "first.last"),
    Org("Umberfield Pharma", "umberfield.example", "flast"),
    Org("Wexcombe Transit", "wexcombe.example", "first.last"),
    Org("Yarrowdale Council", "yarrowdale.example", "first.last"),
    Org("Zephrine Travel", "zephrine.example", "firstl"),
    Org("Talentmoor Partners", "talentmoor.example", "first.last"),
    Org("Kestlebury Academy", "kestlebury-academy.example", "f.last"),
    Org("Fennmouth Health Trust", "fennmouth-health.example", "first.last"),
]}

#: Employers drawn for people whose job is not part of a planned cluster.
OTHER_EMPLOYERS = [name for name in ORGS if name not in (
    "Quillon Labs", "Harrowgate Logistics", "Brennick Maritime", "Corrimont Labs", "Dunmere Consulting",
    "Velvane Robotics", "Orsolan Biotech", "Thistlecombe Energy", "Aldermoor University", "Talentmoor Partners",
)]

JOB_TITLES = [
    "Software Engineer", "Data Analyst", "Product Manager", "Operations Lead", "Research Scientist",
    "Account Manager", "Senior Consultant", "Director of Operations", "Head of Data", "Supply Chain Analyst",
    "Project Manager", "UX Designer", "Finance Manager", "Mechanical Engineer", "Lab Manager", "Policy Officer",
    "Solutions Architect", "Marketing Lead", "Procurement Manager", "Business Analyst", "Software Engineer",
]

#: Invented towns (UK, with invented counties) and abroad.
TOWNS_UK = ["Kestlebury", "Wrenhallow", "Tarrowby Cross", "Lindenfold", "Brackwater Mill", "Sallowmere",
            "Elderwick Down", "Fennmouth", "Calderwyn", "Oakhallow", "Pellingsford", "Morrowdene",
            "Ashcombe Reach", "Quenby Marsh", "Aldermoor"]
COUNTIES = ["Wexmoor", "Calder Vale", "Fenreach", ""]
TOWNS_ABROAD = [("Port Hallow", "OR", "United States"), ("Cedarwick", "MA", "United States"),
                ("Marlow Springs", "CO", "United States"), ("Altenbrück", "", "Germany"),
                ("Villaserra del Monte", "", "Spain"), ("Saint-Aubrin-sur-Lys", "", "France"),
                ("Nørrevik", "", "Norway"), ("Port Ikenna", "Lagos", "Nigeria"), ("Varunagiri", "", "India")]
STREET_WORDS = ["Larch", "Copper", "Mill", "Wharf", "Heron", "Orchard", "Beacon", "Quarry", "Linnet", "Foundry",
                "Tanner's", "Cobble", "Willow", "Kiln", "Ferry"]
STREET_KINDS = ["Road", "Lane", "Row", "Close", "Terrace", "Street", "Walk"]

_FOLD_EXTRA = {"ł": "l", "Ł": "L", "đ": "d", "Đ": "D", "ı": "i", "ø": "o", "Ø": "O", "æ": "ae", "Æ": "AE",
               "ß": "ss", "œ": "oe", "Œ": "OE"}


def ascii_fold(text: str) -> str:
    """Drop accents (``Müller`` -> ``Muller``, ``Łukasz`` -> ``Lukasz``)."""
    text = "".join(_FOLD_EXTRA.get(ch, ch) for ch in text)
    return "".join(ch for ch in unicodedata.normalize("NFKD", text) if not unicodedata.combining(ch))


def cp1252_fold(text: str) -> str:
    """Keep what windows-1252 can hold, fold the rest (``Wiśniewska`` -> ``Wisniewska``)."""
    out = []
    for ch in text:
        try:
            ch.encode("cp1252")
            out.append(ch)
        except UnicodeEncodeError:
            out.append(ascii_fold(ch))
    return "".join(out)


def slug(text: str) -> str:
    """Lower-case ASCII letters only, for e-mail local parts (``O'Brien`` -> ``obrien``)."""
    return "".join(ch for ch in ascii_fold(text).lower() if ch.isalnum())


def name_key(given: str, family: str) -> str:
    """How a careless comparison sees a name: folded, lower case, no punctuation."""
    return slug(given) + " " + slug(family)
