"""Values that decide verdicts, checked against the public text they were read in (named beside
each value), and the bookkeeping that keeps a recalled value from passing as a read one."""
from __future__ import annotations

import json
import re

import yaml

from specgen import refdata
from specgen.checks.rules import RULES_DIR, builtin_rules
from specgen.report.references import format_entry, library


def _rule(name: str):
    return builtin_rules()[f"durability.{name}"]


def test_cement_setting_and_soundness_limits_are_held_as_memory():
    # EN 197-1, from memory: initial setting time at least 75, 60 and 45 min for the strength
    # classes 32,5, 42,5 and 52,5; expansion not more than 10 mm for every class.  Cement
    # makers' public summaries give the same figures, but the standard itself was not read
    # (and a maker's page is not cited), so both stay tagged and an issued verdict holds.
    initial = _rule("setting_initial_min_portland")
    assert (initial.value, initial.unit) == (min(75, 60, 45), "min")
    expansion = _rule("expansion_max_cement")
    assert (expansion.value, expansion.unit) == (10, "mm")
    for r in (initial, expansion):
        assert r.tag == "memory" and r.basis.ref == "en197" and not r.basis.read_in
        assert r.basis.note.startswith("from memory")


def test_thaumasite_cold_condition_as_published():
    # The Thaumasite Expert Group report (1999) as summarised in teg_summary: primary risk
    # factors "a sulfate source", "mobile water", "carbonate" and "Low temperatures, generally
    # below 15 °C".
    cold = _rule("thaumasite_temperature_max")
    assert (cold.value, cold.unit, cold.tag) == (15, "degC", "")
    assert cold.basis.read_in == "teg_summary" and "15 °C" in cold.basis.clause
    from specgen.checks.sulfate_checks import TEG
    assert TEG.read_in == "teg_summary" and "generally below 15 °C" in TEG.clause


def test_c144_gradation_as_printed_in_1993():
    # ASTM C144 gradation, Table 1 of 'Trowel Tips: Mortar Sand' (Portland Cement Association,
    # Masonry Magazine, August 1993, p. 17; references.json pca1993), % passing:
    #   sieve       natural    manufactured
    #   No. 4       100        100
    #   No. 8       95-100     95-100
    #   No. 16      70-100     70-100
    #   No. 30      40-75      40-75
    #   No. 50      10-35      20-40
    #   No. 100     2-15       10-25
    #   No. 200     (none)     0-10
    sieve_mm = {"No. 4": 4.75, "No. 8": 2.36, "No. 16": 1.18, "No. 30": 0.6, "No. 50": 0.3,
                "No. 100": 0.15, "No. 200": 0.075}
    natural = {"No. 4": (100, 100), "No. 8": (95, 100), "No. 16": (70, 100),
               "No. 30": (40, 75), "No. 50": (10, 35), "No. 100": (2, 15)}
    manufactured = {"No. 4": (100, 100), "No. 8": (95, 100), "No. 16": (70, 100),
                    "No. 30": (40, 75), "No. 50": (20, 40), "No. 100": (10, 25),
                    "No. 200": (0, 10)}
    with refdata.unrecorded():
        envs = refdata.load("grading_envelopes").data

    def rows(key):
        return {e["sieve_mm"]: (e["low"], e["high"]) for e in envs[key]["limits"]}

    assert rows("astm_c144_manufactured") == {sieve_mm[k]: v for k, v in manufactured.items()}
    got = rows("astm_c144_natural")
    assert {s: got[s] for s in got if s != 0.075} == {sieve_mm[k]: v for k, v in natural.items()}
    # every manufactured row was read: no longer recalled; the natural envelope's 75 µm row
    # is not in the 1993 table, so that envelope stays to be confirmed
    assert "tag" not in envs["astm_c144_manufactured"]
    assert envs["astm_c144_manufactured"]["read_in"] == "pca1993"
    assert envs["astm_c144_natural"]["tag"] == "memory"
    # ASTM's public page of work item WK97666 (references.json astm_wk97666): "the allowable
    # sand gradations in C144 are listed in the text under 5.1" of C144-25, not in a table
    for key in ("astm_c144_natural", "astm_c144_manufactured"):
        assert envs[key]["source"].startswith("ASTM C144, 5.1 (grading requirements")
    assert library()["astmc144"]["issued"]["date-parts"] == [[2025]]
    assert "astm_wk97666" in library()


def test_en1990_table_d1_as_an_open_library_gives_it():
    # EN 1990 Table D1, 'Values of k_n for the 5% characteristic value', as the open-source
    # library pamd_eurocodes (version 0.3.0, eurocode_0.Tables,
    # values_of_kn_for_the_5p_characteristic_value; references.json pamd_eurocodes) gives it:
    #   n            1     2     3     4     5     6     8     10    20    30    inf
    #   Vx known     2.31  2.01  1.89  1.83  1.80  1.77  1.74  1.72  1.68  1.67  1.64
    #   Vx unknown   -     -     3.37  2.63  2.33  2.18  2.00  1.92  1.76  1.73  1.64
    n = [1, 2, 3, 4, 5, 6, 8, 10, 20, 30, float("inf")]
    known = [2.31, 2.01, 1.89, 1.83, 1.80, 1.77, 1.74, 1.72, 1.68, 1.67, 1.64]
    unknown = [None, None, 3.37, 2.63, 2.33, 2.18, 2.00, 1.92, 1.76, 1.73, 1.64]
    with refdata.unrecorded():
        table = refdata.load("en1990_kn")
    assert (table.data["n"], table.data["vx_known"], table.data["vx_unknown"]) == (
        n, known, unknown)
    # read in a public library, so no longer tagged memory
    assert table.tag == "" and table.extra["read_in"] == "pamd_eurocodes"
    assert "pamd_eurocodes" in library() and "from memory" not in table.notes


def test_exposure_classes_are_located_in_eurocode_6_part_2():
    # EN 1996-2:2006, 2.1.2.1 (3), lists MX1 ... MX5 and refers to its Annex A for the
    # sub-classes (read only in a copy that is not cited): the table names that part, not
    # EN 1996-1-1, and stays tagged memory until the sub-class wording is read.
    with refdata.unrecorded():
        table = refdata.load("exposure_classes")
    assert table.source.startswith("EN 1996-2:2006, 2.1.2.1 (3)") and table.tag == "memory"
    assert "1996-1-1" not in table.source
    assert library()["en1996_2"]["number"] == "EN 1996-2"
    assert set(table.data["european"]) == {"MX1", "MX2.1", "MX2.2", "MX3.1", "MX3.2", "MX4",
                                           "MX5"}


def test_density_of_water_is_the_iapws95_value():
    # reference: the iapws package (a reference implementation of IAPWS-95), liquid water at
    # 293.15 K and 0.101325 MPa: 998.207 kg/m³
    from iapws import IAPWS95
    rho = IAPWS95(T=293.15, P=0.101325).rho
    with refdata.unrecorded():
        water = refdata.load("mix_densities").data["water"]
    assert abs(water["value"] - rho) < 0.05 and "tag" not in water
    assert "IAPWS-95" in water["source"]


def test_every_summary_a_value_was_read_in_is_in_the_bibliography():
    for key, rule in builtin_rules().items():
        if rule.basis.read_in:
            assert rule.basis.read_in in library(), key
            assert rule.basis.kind == "reference", key
    with refdata.unrecorded():
        for key, env in refdata.load("grading_envelopes").data.items():
            if env.get("read_in"):
                assert env["read_in"] in library(), key
        for p in sorted(refdata.DATA_DIR.glob("*.yaml")):     # a table read as a whole
            read_in = refdata.load(p.stem).extra.get("read_in")
            if read_in:
                assert read_in in library(), p.name


def test_a_web_page_shows_its_address_and_the_day_it_was_read():
    text = format_entry(library()["teg_summary"])
    url = "https://civilengineeringx.com/dccc/the-thaumasite-expert-group-report-and-its-ramifications"
    assert f"[`{url}`]({url}) (read 2026-12-04)." in text
    assert "(a public summary of the Thaumasite Expert Group report of 1999; the report " \
           "itself was not read)" in text
    assert text.startswith("civilengineeringx.com (n.d.). *The Thaumasite Expert Group report")


def test_bibliography_keys_are_unique():
    from specgen.refdata import CONTENT_DIR
    ids = [e["id"] for e in json.loads((CONTENT_DIR / "references.json").read_text("utf-8"))]
    assert sorted({i for i in ids if ids.count(i) > 1}) == []


RECALLED = re.compile(r"\bfrom memory\b|\brecalled\b", re.I)


def _untagged_recollections(node, path, tagged):
    """Places whose own words say the value was recalled while neither they nor a table
    above them carries tag: memory."""
    if isinstance(node, dict):
        here = tagged or node.get("tag") == "memory"
        for key in ("notes", "note", "source"):     # a table's own notes speak of its entries
            if path and isinstance(node.get(key), str) and RECALLED.search(node[key]) \
                    and not here:
                yield f"{path}.{key}".lstrip(".")
        for k, v in node.items():
            yield from _untagged_recollections(v, f"{path}.{k}", here)
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from _untagged_recollections(v, f"{path}[{i}]", tagged)


def test_a_value_said_to_be_recalled_is_tagged_memory():
    """A value the data calls recalled is tagged memory, so the Values to confirm page lists it
    and a revision for construction refuses it; none is recalled in words only."""
    found = {}
    for folder in (refdata.DATA_DIR, RULES_DIR):
        for p in sorted(folder.glob("*.yaml")):
            doc = yaml.safe_load(p.read_text(encoding="utf-8"))
            if folder == RULES_DIR:   # a rule's tag sits beside its basis
                places = [f"{name}.basis" for name, raw in (doc.get("rules") or {}).items()
                          if raw.get("tag") != "memory" and RECALLED.search(
                              str(raw.get("basis", {}).get("note", "")))]
            else:
                places = list(_untagged_recollections(doc, "", doc.get("tag") == "memory"))
            if places:
                found[p.name] = places
    assert found == {}


DESIGNATION = re.compile(r"\b(?:EN ISO|EN|ISO|ASTM) [A-Z]?\d{2,}(?:-\d+)*")


def test_every_standard_the_dossier_names_is_in_the_bibliography():
    """A standard named in the dossier's words (sheets, clauses, cautions, tables, templates)
    is in content/references.json, so the reference list carries it (cited where named)."""
    from specgen.refdata import CONTENT_DIR
    from specgen.report.references import _designations
    from specgen.build import check
    from tests.conftest import DEMO
    texts = [check(DEMO)[1].to_json()]
    for folder in ("templates", "rules", "data"):
        texts += [p.read_text(encoding="utf-8") for p in sorted((CONTENT_DIR / folder).rglob("*"))
                  if p.is_file()]
    texts.append((CONTENT_DIR / "cautions.yaml").read_text(encoding="utf-8"))
    named = {m.group(0) for t in texts for m in DESIGNATION.finditer(t)}
    known = set(_designations())
    assert sorted(named - known) == []


def test_mortar_and_lime_strength_classes_as_published():
    with refdata.unrecorded():
        tables = refdata.load("strength_classes").data
    # EN 998-2 (ÖNORM EN 998-2 Table 1 as ziegel.at gives it, references.json ziegel_moertel):
    # M 1, M 2,5, M 5, M 10, M 15, M 20 at 1, 2,5, 5, 10, 15, 20 N/mm²
    en998 = tables["en998_2"]
    assert sorted((c["name"], c["lower_mpa"]) for c in en998["classes"]) == sorted(
        [("M1", 1.0), ("M2.5", 2.5), ("M5", 5.0), ("M10", 10.0), ("M15", 15.0), ("M20", 20.0)])
    # EN 459-1, from memory (lime makers' public summaries agree; the standard was not read,
    # so the table stays tagged): NHL 2 2-7, NHL 3,5 3,5-10, NHL 5 5-15 N/mm² at 28 d; NHL 5
    # at least 2,0 MPa at 7 d
    en459 = {c["name"]: c for c in tables["en459_1"]["classes"]}
    assert {k: (c["lower_mpa"], c["upper_mpa"]) for k, c in en459.items()} == {
        "NHL 2": (2.0, 7.0), "NHL 3.5": (3.5, 10.0), "NHL 5": (5.0, 15.0)}
    assert en459["NHL 5"]["early"] == {"age_days": 7, "lower_mpa": 2.0}
    assert "tag" not in tables["en998_2"] and tables["en998_2"]["read_in"] == "ziegel_moertel"
    assert tables["en459_1"]["tag"] == "memory" and "read_in" not in tables["en459_1"]
    from specgen.checks.strength_class_checks import EN998
    assert EN998.read_in == "ziegel_moertel"
