"""BibTeX fields of the references cinderclock's models cite.

``cinderclock cite --bibtex`` writes one entry per model reference recorded in a table's
provenance. A model may carry its own fields (``bibtex`` in its provenance entry, e.g. from
:class:`cinderclock.relation.PublishedRelation`); otherwise the reference text is matched here
by first author, year and volume. A reference with no entry is written as ``@misc`` with the
reference text as its note, so nothing the run used is left out.

``checked`` says where the bibliographic fields (authors, year, journal, volume, first page)
were compared with the publication record; entries without it are marked in the BibTeX note.
"""

from __future__ import annotations

import re

#: (match: first-author surname, year, volume) -> fields.
ENTRIES = [
    {"match": ("Hurley", "2000", "315"), "authors": ["Hurley, J. R.", "Pols, O. R.", "Tout, C. A."], "year": "2000",
     "title": "Comprehensive analytic formulae for stellar evolution as a function of mass and metallicity",
     "journal": "MNRAS", "volume": "315", "page": "543",
     "checked": "publication record: MNRAS 315, issue 3, pp. 543-569 (2000)"},
    {"match": ("Bailer-Jones", "2015", "127"), "authors": ["Bailer-Jones, C. A. L."], "year": "2015",
     "title": "Estimating Distances from Parallaxes", "journal": "PASP", "volume": "127", "page": "994",
     "checked": "bibcode 2015PASP..127..994B"},
    {"match": ("Cummings", "2018", "866"), "authors": ["Cummings, J. D.", "Kalirai, J. S.", "Tremblay, P.-E.",
                                                        "Ramirez-Ruiz, E.", "Choi, J."], "year": "2018",
     "title": "The White Dwarf Initial-Final Mass Relation for Progenitor Stars from 0.85 to 7.5 Msun",
     "journal": "ApJ", "volume": "866", "page": "21", "checked": "authors and title: arXiv:1809.01673 record"},
    {"match": ("Kalirai", "2008", "676"), "authors": ["Kalirai, J. S.", "Hansen, B. M. S.", "Kelson, D. D.",
                                                       "Reitzel, D. B.", "Rich, R. M.", "Richer, H. B."],
     "year": "2008", "title": "The Initial-Final Mass Relation: Direct Constraints at the Low-Mass End",
     "journal": "ApJ", "volume": "676", "page": "594", "checked": "authors and title: arXiv:0706.3894 record"},
    {"match": ("Kalirai", "2009", "705"), "authors": ["Kalirai, J. S.", "Davis, D. S.", "Richer, H. B."],
     "year": "2009", "journal": "ApJ", "volume": "705", "page": "408"},
    {"match": ("Catal", "2008", "387"), "authors": ["Catalan, S.", "Isern, J.", "Garcia-Berro, E.", "Ribas, I."],
     "year": "2008", "journal": "MNRAS", "volume": "387", "page": "1693"},
    {"match": ("Salaris", "2009", "692"), "authors": ["Salaris, M.", "Serenelli, A.", "Weiss, A.",
                                                       "Miller Bertolami, M."], "year": "2009",
     "title": "Semi-empirical white dwarf initial-final mass relationships: a thorough analysis of systematic "
              "uncertainties due to stellar evolution models",
     "journal": "ApJ", "volume": "692", "page": "1013", "checked": "authors and title: arXiv:0807.3567 record"},
    {"match": ("Williams", "2009", "693"), "authors": ["Williams, K. A.", "Bolte, M.", "Koester, D."],
     "year": "2009", "journal": "ApJ", "volume": "693", "page": "355"},
    {"match": ("Salpeter", "1955", "121"), "authors": ["Salpeter, E. E."], "year": "1955", "journal": "ApJ",
     "volume": "121", "page": "161"},
    {"match": ("Kroupa", "2001", "322"), "authors": ["Kroupa, P."], "year": "2001", "journal": "MNRAS",
     "volume": "322", "page": "231"},
    {"match": ("Schmidt", "1968", "151"), "authors": ["Schmidt, M."], "year": "1968", "journal": "ApJ",
     "volume": "151", "page": "393"},
    {"match": ("Schmidt", "1975", "202"), "authors": ["Schmidt, M."], "year": "1975", "journal": "ApJ",
     "volume": "202", "page": "22"},
    {"match": ("Oke", "1983", "266"), "authors": ["Oke, J. B.", "Gunn, J. E."], "year": "1983", "journal": "ApJ",
     "volume": "266", "page": "713"},
    {"match": ("Riello", "2021", "649"), "authors": ["Riello, M.", "De Angeli, F.", "Evans, D. W.", "et al."],
     "year": "2021", "journal": "A&A", "volume": "649", "page": "A3"},
    {"match": ("Gordon", "2023", "950"), "authors": ["Gordon, K. D.", "et al."], "year": "2023", "journal": "ApJ",
     "volume": "950", "page": "86"},
    {"match": ("Fitzpatrick", "1999", "111"), "authors": ["Fitzpatrick, E. L."], "year": "1999", "journal": "PASP",
     "volume": "111", "page": "63"},
    {"match": ("Cardelli", "1989", "345"), "authors": ["Cardelli, J. A.", "Clayton, G. C.", "Mathis, J. S."],
     "year": "1989", "journal": "ApJ", "volume": "345", "page": "245"},
    {"match": ("Mestel", "1952", "112"), "authors": ["Mestel, L."], "year": "1952", "journal": "MNRAS",
     "volume": "112", "page": "583"},
    {"match": ("Nauenberg", "1972", "175"), "authors": ["Nauenberg, M."], "year": "1972", "journal": "ApJ",
     "volume": "175", "page": "417"},
    {"match": ("Planck", "2020", "641"), "authors": ["Planck Collaboration"], "year": "2020", "journal": "A&A",
     "volume": "641", "page": "A6"},
]


def lookup(reference):
    """BibTeX fields for a reference text (None if no entry matches)."""
    if not reference:
        return None
    text = str(reference)
    for e in ENTRIES:
        surname, year, volume = e["match"]
        if text.startswith(surname) or text.split(",")[0].strip().startswith(surname):
            if year in text and re.search(rf"\b{re.escape(volume)}\b", text):
                return {k: v for k, v in e.items() if k != "match"}
    return None


def _key(fields, used):
    surname = re.sub(r"[^A-Za-z]", "", fields["authors"][0].split(",")[0]) if fields.get("authors") else "ref"
    base = f"{surname}{fields.get('year', '')}"
    key, n = base, 1
    while key in used:
        key = f"{base}{chr(ord('a') + n)}"
        n += 1
    used.add(key)
    return key


def _esc(text):
    return str(text).replace("{", "\\{").replace("}", "\\}").replace("&", "\\&")


def bibtex(references):
    """BibTeX text for a list of ``(reference text, fields or None)`` pairs, in order."""
    used, out = set(), []
    for text, fields in references:
        fields = fields or lookup(text)
        if not fields:
            key = _key({"authors": [text.split(",")[0] or "ref"], "year": ""}, used)
            out.append(f"@misc{{{key},\n  note = {{{_esc(text)}}}\n}}")
            continue
        key = _key(fields, used)
        lines = [f"  author = {{{' and '.join(_esc(a) for a in fields['authors'])}}}",
                 f"  year = {{{fields['year']}}}"]
        if fields.get("title"):
            lines.append(f"  title = {{{{{_esc(fields['title'])}}}}}")
        lines += [f"  journal = {{{_esc(fields['journal'])}}}", f"  volume = {{{fields['volume']}}}",
                  f"  pages = {{{fields['page']}}}"]
        if not fields.get("checked"):
            lines.append("  note = {bibliographic fields not yet checked against the publication record}")
        out.append(f"@article{{{key},\n" + ",\n".join(lines) + "\n}")
    return "\n\n".join(out) + "\n"
