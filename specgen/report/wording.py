"""Reader's wording: the check layer's plain text turned into what a reader should see.

Check results name their sources as the program knows them (``materials.yaml
EB1.compressive_strength``, ``rule works.placing_rate``, ``lab/strength.csv row 2``,
a density set ``'bentz_nist'``) and write units in ASCII (``degC``, ``m^2``).  Readers
see labels instead: every file gets a label (the input listing pairs label and file),
every rule its description, every other key its words; symbols get their subscripts
and units their symbols.  This is the one place where that translation is made, for
every page and the PDF alike.
"""
from __future__ import annotations

import re
from functools import lru_cache

from markupsafe import Markup, escape

#: what each project file or reference table is called in reader text
FILE_LABELS = {
    "dossier.yaml": "dossier data",
    "analyses.yaml": "analyses",
    "materials.yaml": "materials data",
    "mixes.yaml": "mix designs",
    "specification.yaml": "specification data",
    "comments.yaml": "review comments",
    "samples.yaml": "sample register",
    "lab/strength.csv": "lab strength results",
    "lab/sieves.csv": "lab sieve analyses",
    "lab/colour.csv": "lab colour readings",
    "lab/capillary.csv": "lab capillary absorption results",
    "lab/site-temperature.csv": "site temperature record",
    "results.json": "results file",
}
#: the program's own reference tables and rule sets (content/...)
CONTENT_LABELS = {
    "atomic_weights": "standard atomic weights table",
    "cement_densities": "phase density sets",
    "mix_densities": "default densities of mix constituents",
    "en1990_kn": "EN 1990 factors table",
    "hydraulicity_bands": "hydraulicity bands table",
    "kiln_stages": "kiln stages table",
    "maturity_defaults": "maturity defaults table",
    "salt_load": "salt-load tables",
    "sieve_series": "sieve series table",
    "strength_classes": "strength classes table",
    "grading_envelopes": "grading envelopes table",
    "curing_regimes": "curing regimes table",
}
#: named choices that reach text as keys (models, density sets, tables …)
KEY_LABELS = {
    "two_component": "two-component model (aluminate + silicate)",
    "en1992_age": "EN 1992-1-1 age function",
    "hyperbolic": "hyperbolic law",
    "bentz_nist": "NIST phase densities (Bentz)",
    "rounded_practice": "rounded densities of practice",
    "wta_2_9": "WTA salt-load table for assessing masonry",
    "onorm_b3355": "salt-load assessment after WTA-Merkblatt 3-13-01/D",
    "en1015_11_lime": "EN 1015-11 regime for lime-rich mortars",
    "en1015_11_hydraulic": "EN 1015-11 regime for hydraulic mortars",
    "water_20": "water curing at 20 °C",
    "sealed_20": "sealed curing at 20 °C",
    "air_65": "air curing at 65 % RH",
}
#: any key of KEY_LABELS as a whole word (one pass: no label holds another key)
_KEY_WORD = re.compile(r"\b(?:" + "|".join(sorted(map(re.escape, KEY_LABELS), key=len,
                                                  reverse=True)) + r")\b")
#: ASCII units and signs as the checks write them → typographic symbols
UNIT_TEXT = [
    (re.compile(r"kg/\(m\^2·min\^0\.5\)|kg/\(m2·min0\.5\)"), "kg/(m²·min^½)"),
    (re.compile(r"\bdeg ?C\b"), "°C"),
    (re.compile(r"\bm\^2\b|\bm2\b(?=[\s/·),.;]|$)"), "m²"),
    (re.compile(r"\bm\^3\b|\bm3\b(?=[\s/·),.;]|$)"), "m³"),
    (re.compile(r"\bcm\^3\b|\bcm3\b"), "cm³"),
    (re.compile(r"min\^0\.5"), "min^½"),
    (re.compile(r"\s->\s"), " → "),
    (re.compile(r"(?<=\d) ?x ?(?=\d)"), " × "),
    # a range whose ends are one number is that number ("100–100 %" reads "100 %")
    (re.compile(r"(?<![\d.])(\d+(?:\.\d+)?)–\1(?![\d.])"), r"\1"),
]
PLURALS = re.compile(r"\b(\d+(?:\.\d+)?) ((?:[a-z-]+ ){0,2}[a-z]+)\(s\)")
MINUS = re.compile(r"(?<![\w.])-(?=\d)")
SUBSCRIPT = re.compile(r"(?<![\w/.-])([A-Za-zα-ωΔ])_\{?([A-Za-z0-9,]{1,12})\}?(?![\w/])")

_FILE = re.compile(r"\b(?:content/(?:data|rules)/)?([\w/-]+)\.(ya?ml|csv|json)\b")
#: a key of a record, an entry of a list by its position (``coats[0]``) allowed
_KEY = r"[a-z][a-z0-9]*(?:_[a-z0-9]+)*(?:\[\d+\])?"
#: what follows a file's label: a list of the file and the id of its entry (``mortar_properties
#: M3``), an id (``Z2``), and a path of keys in that entry (``.carbonation[0]``, ``.firing.peak``)
_FIELD_AFTER_FILE = re.compile(
    rf"(?P<label>⟦[^⟧]+⟧),? (?:(?P<section>[a-z][a-z0-9]*(?:_[a-z0-9]+)*) (?=[A-Z]))?"
    rf"(?:(?P<id>[A-Z][\w-]*)(?:\.(?=[a-z])|\b))?(?P<field>{_KEY}(?:\.{_KEY})*)?(?![\w\[])")
_INDEXED = re.compile(r"([a-z][a-z0-9_]*)\[(\d+)\]")
#: a list of a project file named before the id of one of its entries, as a reader says it
SECTION_WORDS = {"mortar_properties": "mortar properties of", "unit_prices": "unit price of"}
#: the noun of one entry of a list named by its position (``carbonation[0]``)
ENTRY_WORDS = {"carbonation": "carbonation depth reading"}
#: keys (or paths of keys) whose words are not their name's
FIELD_WORDS = {
    "per": "quantity priced per",
    "freeze_thaw": "freeze–thaw test",
    "firing.peak": "peak firing temperature",
    "water_binder_ratio": "water/binder ratio",
    "requirements.min_compressive": "required minimum compressive strength",
    "requirements.max_compressive_long_term": "required maximum long-term compressive strength",
    "known_cv": "known coefficient of variation",
}
_ORDINALS = ("first", "second", "third", "fourth", "fifth", "sixth", "seventh", "eighth",
             "ninth", "tenth")
_RULE = re.compile(r"\brule `?([a-z]+)\.([a-z0-9_]+)`?")
_QUOTED_KEY = re.compile(r"(?:set )?'([a-z0-9]+(?:_[a-z0-9]+)+)'")
_SNAKE = re.compile(r"\b[a-z][a-z0-9]*(?:_[a-z0-9]+)+\b")


@lru_cache(maxsize=None)
def _rule_words() -> dict[str, str]:
    from specgen.checks.rules import builtin_rules
    return {key: rule.description for key, rule in builtin_rules().items()}


def rule_label(key: str) -> str:
    """A rule as readers see it: its description (``works.placing_rate`` → “mortar placed
    by the crew …”); empty for no rule."""
    if not key:
        return ""
    return _rule_words().get(key) or key.rsplit(".", 1)[-1].replace("_", " ")


def _rule(m: re.Match) -> str:
    return f"⟦rule “{rule_label(f'{m.group(1)}.{m.group(2)}')}”⟧"


def _file(m: re.Match) -> str:
    path = f"{m.group(1)}.{m.group(2)}"
    label = FILE_LABELS.get(path)
    if label is None and path.startswith("lab/firing-"):
        label = f"kiln firing record of {m.group(1)[len('lab/firing-'):]}"
    if label is None and path.startswith(("data/", "rules/")) or m.group(0).startswith("content/"):
        stem = m.group(1).rsplit("/", 1)[-1]
        if m.group(0).startswith("content/rules/") or m.group(1).startswith("rules/"):
            label = f"default rules of {stem.replace('_', ' ')}"
        else:
            label = CONTENT_LABELS.get(stem, stem.replace("_", " ") + " table")
    return f"⟦{label or m.group(1).rsplit('/', 1)[-1].replace('_', ' ').replace('-', ' ')}⟧"


def ordinal(n: int) -> str:
    """``n`` (from 1) as an ordinal: ``first`` … ``tenth``, then ``11th``, ``21st``."""
    if n <= len(_ORDINALS):
        return _ORDINALS[n - 1]
    suffix = "th" if 10 <= n % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")
    return f"{n}{suffix}"


def singular(words: str) -> str:
    """The noun of one entry of a list named in the plural (``hold points`` → ``hold point``,
    ``analyses`` → ``analysis``, ``mixes`` → ``mix``)."""
    for end, one in (("yses", "ysis"), ("ies", "y"), ("xes", "x"), ("ches", "ch"),
                     ("sses", "ss")):
        if words.endswith(end):
            return words[:-len(end)] + one
    return words[:-1] if words.endswith("s") and not words.endswith("ss") else words


def key_words(path: str) -> str:
    """A path of keys in a project file as a reader says it: ``coats[0]`` → ``first coat``,
    ``unit_prices[0].per`` → ``first unit price, quantity priced per``; a key of
    :data:`FIELD_WORDS` by its words, any other by its name with spaces."""
    if path in FIELD_WORDS:
        return FIELD_WORDS[path]
    words = []
    for key in path.split("."):
        m = _INDEXED.fullmatch(key)
        if m:
            noun = ENTRY_WORDS.get(m.group(1)) or singular(m.group(1).replace("_", " "))
            words.append(f"{ordinal(int(m.group(2)) + 1)} {noun}")
        else:
            words.append(FIELD_WORDS.get(key, key.replace("_", " ")))
    return ", ".join(words)


def _field(m: re.Match) -> str:
    section, ident, field = m.group("section"), m.group("id"), m.group("field") or ""
    if not (section or ident) and not re.search(r"[_.\[]", field):
        return m.group(0)      # a plain word after the file ("lab/strength.csv row 2"), no key
    what = key_words(field) if field else ""
    if section:
        entry = f"{SECTION_WORDS.get(section) or singular(section.replace('_', ' '))} {ident}"
        text = f"{entry}, {what}" if what else entry
    else:
        text = " ".join(filter(None, (ident, what)))
    return f"{m.group('label')[:-1]}, {text}⟧"


def _key_label(m: re.Match) -> str:
    """A key's label, unless the text already goes on with the rest of it ("hyperbolic law"
    stays, not "hyperbolic law law")."""
    label = KEY_LABELS[m.group(0)]
    rest = label[len(m.group(0)):] if label.startswith(m.group(0)) else ""
    return m.group(0) if rest and m.string.startswith(rest, m.end()) else label


def typeset(text: str) -> str:
    """Units by their symbols, plurals right, true minus signs (no names changed)."""
    for pat, sym in UNIT_TEXT:
        text = pat.sub(sym, text)
    text = PLURALS.sub(lambda m: f"{m.group(1)} {m.group(2)}" +
                       ("" if m.group(1) in ("1", "1.0") else "s"), text)
    return MINUS.sub("−", text)


#: a token written as a chemical formula (SiO2, Ca(OH)2, CaSO4·2H2O; "Al2O3+Fe2O3" is two), or
#: a phase in the cement chemist's notation (C2S, C3A, C4AF, C1.7-S-H4); its counts are set as
#: subscripts (IUPAC Red Book 2005, IR-4, from memory; the notation's own usage, Taylor,
#: *Cement Chemistry*, from memory)
_PART = r"[A-Z][a-z]?\d*(?:[A-Z][a-z]?\d*|\((?:[A-Z][a-z]?\d*)+\)\d*)*"
_FORMULA = re.compile(rf"(?<![\w.·/-])(?:{_PART}(?:·\d*{_PART})*"
                      r"|C\d+(?:\.\d+)?(?:-?[ASFH]\d*)+)(?![\w(]|\.\d|-\w)")
_COUNT = re.compile(r"(?<=[A-Za-z)])\d+(?:\.\d+)?")
_CEMENT = re.compile(r"C\d+(?:\.\d+)?(?:-?[ASFH]\d*)+")


@lru_cache(maxsize=None)
def _elements() -> frozenset[str]:
    from specgen import refdata
    return frozenset(refdata.load("atomic_weights").data)


def _is_formula(token: str) -> bool:
    """A count, and only elements the program weighs (content/data/atomic_weights.yaml), two
    or more of them, one an anion of the trade's chemistry (O, Cl): ids such as NC1, NH35 or
    B2 stay as written."""
    if _CEMENT.fullmatch(token):
        return True
    elements = set(re.findall(r"[A-Z][a-z]?", token))
    return bool(_COUNT.search(token)) and len(elements) > 1 and elements <= _elements() \
        and bool(elements & {"O", "Cl"})


def formulas(text: str, sub=lambda count: f"<sub>{count}</sub>") -> str:
    """``text`` with the counts of its chemical formulas set by ``sub``: ``SiO2`` →
    ``SiO<sub>2</sub>`` (the default, for a page's markup), or whatever a figure's labels
    need (:func:`formula_label`).  Identifiers, ``so3_max`` and numbers stay as written."""
    def one(m: re.Match) -> str:
        token = m.group(0)
        return _COUNT.sub(lambda c: sub(c.group(0)), token) if _is_formula(token) else token
    return _FORMULA.sub(one, text)


def formula_label(text: str) -> str:
    """``text`` for a figure's label, its formulas' counts as mathtext subscripts
    (``SiO$_2$``): matplotlib sets them the way the pages' ``<sub>`` does."""
    return formulas(text, lambda count: f"$_{{{count}}}$")


@lru_cache(maxsize=16384)   # pure; the same sources recur on page after page
def plain(text: str) -> str:
    """``text`` with labels for files, rules and keys, symbols for units (plain text)."""
    if not text:
        return text
    text = _RULE.sub(_rule, text)
    text = _FILE.sub(_file, text)
    text = _FIELD_AFTER_FILE.sub(_field, text)
    text = _QUOTED_KEY.sub(lambda m: KEY_LABELS.get(m.group(1), m.group(1).replace("_", " ")),
                           text)
    text = _KEY_WORD.sub(_key_label, text)
    text = typeset(text)
    text = text.replace("⟦", "").replace("⟧", "")
    return _SNAKE.sub(lambda m: m.group(0).replace("_", " ") if not SUBSCRIPT.fullmatch(
        m.group(0)) else m.group(0), text)


def reader(text) -> Markup:
    """``text`` for a page: :func:`plain`, escaped, with symbols' subscripts and
    ``^½`` set as superscripts (markup)."""
    if text is None:
        return Markup("")
    out = str(escape(plain(str(text))))
    out = SUBSCRIPT.sub(lambda m: f"{m.group(1)}<sub>{m.group(2)}</sub>", out)
    return Markup(out.replace("^½", "<sup>½</sup>"))


#: what names an input as it is written: a file inside the project or the program (with its
#: line), a key path (``selections[0].covers``), a snake_case key or a rule key
_INPUT_TERM = re.compile(
    r"(?:content/)?[\w./-]*\w\.(?:ya?ml|csv|json|md|j2)\b(?:,? line \d+)?"
    r"|\b[a-z]\w*\[\d+\](?:\.[a-z]\w*(?:\[\d+\])?)*"
    r"|\b(?:[a-z]+\.)?[a-z][a-z0-9]*(?:_[a-z0-9]+)+(?:\[\d+\])?(?:\.[a-z]\w*(?:\[\d+\])?)*")


def input_terms(text) -> Markup:
    """``text`` that tells the person editing the project what to change (the audit's
    findings, their places and fixes): escaped, each file, key or rule it names set as code,
    as written in the input, so that it reads as a name to type and not as prose; the prose
    between them typeset as :func:`plain` typesets it."""
    if not text:
        return Markup("")
    out, last = [], 0
    for m in _INPUT_TERM.finditer(str(text)):
        out += [str(escape(typeset(text[last:m.start()]))),
                f"<code>{escape(m.group(0))}</code>"]
        last = m.end()
    return Markup("".join(out) + str(escape(typeset(text[last:]))))


def symbol(text: str) -> Markup:
    """A symbol of a calculation (``f_k``, ``V_m,min``, ``x_repair``) with its subscript; a
    list of symbols (``S_L, S_C, S_H``) each with its own."""
    if ", " in (text or "") and all("_" in part for part in text.split(", ")):
        return Markup(", ").join(symbol(part) for part in text.split(", "))
    out = str(escape(text or ""))
    m = re.fullmatch(r"([^_]+)_\{?(.+?)\}?", out)
    return Markup(f"{m.group(1)}<sub>{m.group(2)}</sub>" if m else out)
