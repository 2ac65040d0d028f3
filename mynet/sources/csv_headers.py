"""Header words the CSV importer recognises, per field (several languages), and their qualifiers.

Data only: :mod:`mynet.sources.csv` reads these tables to map column headers
to record fields. Phrases are compared after :func:`mynet.sources.csv._tokens`.
"""

# Header words per slot. Phrases are reduced by _tokens(), so "E-mail" == "email".
SYNONYM_TEXT: dict[str, str] = {
    "full_name": "name|full name|display name|contact|contact name|person|fullname|nom complet|nombre completo|"
    "nome completo|volledige naam|vollstandiger name|anzeigename",
    "given": "first name|given name|forename|first|given|firstname|vorname|prenom|nombre|nome|voornaam|primeiro nome",
    "family": "last name|surname|family name|last|family|lastname|nachname|familienname|nom|nom de famille|"
    "apellido|apellidos|cognome|achternaam|sobrenome|apelido",
    "additional": "middle name|middle|additional name|additional names|middle names|second name|zweiter vorname",
    "prefix": "prefix|name prefix|honorific|salutation title|anrede|civilite|tratamiento",
    "suffix": "suffix|name suffix|generation|namenszusatz",
    "nicknames": "nickname|nick name|nick|alias|known as|preferred name|spitzname|surnom|apodo|soprannome|bijnaam",
    "emails": "email|mail|email address|mail address|emailaddress|emails|email addresses|courriel|adresse email|"
    "email adresse|mail adresse|adresse electronique|correo|correo electronico|direccion de correo|"
    "posta elettronica|indirizzo email|emailadres|epost",
    "phones": "phone|phones|telephone|tel|phone number|telephone number|mobile|mobile phone|mobile number|cell|"
    "cell phone|cellphone|fax|pager|telefon|telefonnummer|handy|mobil|mobiltelefon|telephone portable|portable|"
    "telefono|cellulare|telefone|celular|movil|telefoon|mobiel|gsm",
    "orgs": "company|organisation|organization|org|employer|company name|organisation name|organization name|"
    "org name|current company|current employer|firma|unternehmen|arbeitgeber|entreprise|societe|organisme|"
    "empresa|organizacion|azienda|societa|bedrijf|organisatie|werkgever|organizacao",
    "org_units": "department|dept|unit|division|team|organisation department|organization department|"
    "company department|abteilung|departement|service|departamento|reparto|afdeling|setor",
    "titles": "job title|title|position|job|occupation|designation|jobtitle|job position|organisation title|"
    "organization title|company title|position title|berufsbezeichnung|funktion|beruf|titre|poste|fonction|"
    "cargo|puesto|titolo|ruolo|functie|functietitel|profissao",
    "roles": "role|roles|job role|organisation role|organization role|rolle|rol",
    "tags": "tags|tag|groups|group|categories|category|labels|label|group membership|lists|list|keywords|"
    "kategorie|kategorien|gruppe|gruppen|etiquettes|etiquette|categories|groupes|groupe|categorias|etiquetas|"
    "grupos|etichette|gruppi|categorieen|groepen",
    "notes": "notes|note|comments|comment|remarks|remark|description|memo|about|bemerkung|bemerkungen|notiz|"
    "notizen|kommentar|remarques|commentaire|commentaires|notas|nota|comentarios|note personali|opmerkingen|"
    "notities|observacoes",
    "urls": "website|web site|url|web page|webpage|homepage|home page|web|web address|website url|"
    "profile url|webseite|site web|sitio web|pagina web|sito web",
    "locality": "city|town|locality|municipality|village|stadt|ort|wohnort|ville|ciudad|localidad|citta|"
    "plaats|woonplaats|cidade",
    "region": "state|region|province|state province|county|bundesland|provincia|estado|provincie|regione",
    "country": "country|country region|nation|land|pays|pais|paese|staat",
    "street": "address|street|street address|address line|addr|street line|adresse|strasse|anschrift|rue|"
    "direccion|calle|indirizzo|adres|straat|endereco|rua|formatted address|full address|postal address",
    "postcode": "postcode|postal code|zip|zip code|zipcode|post code|plz|postleitzahl|code postal|cp|"
    "codigo postal|cap|cep",
    "uid": "uid|unique id|contact uid",
}
# Words that qualify a channel ("work phone") and the address type they give.
QUALIFIERS = {
    "home": "home", "personal": "home", "private": "home", "privat": "home", "domicile": "home", "casa": "home",
    "work": "work", "business": "work", "office": "work", "company": "work", "buro": "work", "travail": "work",
    "trabajo": "work", "lavoro": "work", "werk": "work", "geschaftlich": "work", "dienstlich": "work",
    "other": "other", "andere": "other", "autre": "other", "otro": "other",
    "primary": "", "main": "", "alt": "", "alternate": "", "alternative": "", "secondary": "", "preferred": "",
    "pref": "", "current": "", "contact": "", "my": "", "default": "", "value": "", "de": "", "du": "",
}
# Columns about someone else, or a past employer: never mapped automatically.
BLOCK = {
    "assistant", "assistants", "manager", "managers", "spouse", "partner", "child", "children", "referred",
    "previous", "former", "past", "ex", "prior", "im", "sip", "skype", "messenger", "ip", "yomi", "phonetic",
    "type", "label", "birthday", "anniversary", "date",
}
# A header ending in one of these slots names that slot ("company phone", "address 1 - city").
SUFFIX_OK = {"emails", "phones", "urls", "street", "locality", "region", "postcode", "country"}
