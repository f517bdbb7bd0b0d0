"""The practice a project follows (European / American): sieve series, envelopes by
interpolation on the envelope's own series, mortar classes, the EN 1015-18 two-point
coefficient — and the bad inputs, messages asserted word for word."""
from __future__ import annotations

import math

import numpy as np
import pytest

from specgen import practice, refdata
from specgen.build import check
from specgen.science import grading as gr
from tests.helpers import by_check, edit, problems


def _follow(project, text: str) -> None:
    """Replace the demo's practice block (European, mixing stated) with ``text``."""
    path = project / "dossier.yaml"
    doc = path.read_text(encoding="utf-8")
    start = doc.index("\npractice:\n") + 1
    end = doc.index("\n\n", start) + 1
    path.write_text(doc[:start] + text + doc[end:], encoding="utf-8")


# EN 933-2 / ISO 565 basic set, mm: the ends 0.063 and 125 mm as DIN's public page of
# DIN EN 933-2:2020 states them (references.json din_en933_2), the sizes between from memory
EN_SERIES = [0.063, 0.125, 0.25, 0.5, 1, 2, 4, 8, 16, 31.5, 63, 125]
# ASTM E11 sieves of the ASTM C125 fineness modulus plus No. 200, mm: No. 100 (150 µm) … 3 in.
# (75 mm), 6 in. (150 mm) as dictionaryofconstruction.com lists them (fm_dictionary), 1 1/2 in.
# as 37.5 mm (Wikipedia 'Fineness modulus'), No. 200 as 75 µm (the C33 table on civilengineer.co.in)
ASTM_SERIES = [0.075, 0.15, 0.3, 0.6, 1.18, 2.36, 4.75, 9.5, 19, 37.5, 75, 150]


def test_the_two_series_are_the_published_apertures():
    series = refdata.load("sieve_series").data["series"]
    assert [round(a * 1000, 6) for a in series["en933_2"]["apertures"]] == EN_SERIES
    assert [round(a * 1000, 6) for a in series["astm_e11"]["apertures"]] == ASTM_SERIES
    # a 2:1 series: each EN size doubles the one below, within the rounding of the R 20
    # numbers (31.5 for 10^1.5 = 31.6, 63 for 63.1, 125 for 125.9), so it is R 20/6, not
    # R 20/3, whose step is 10^(3/20) = 1.41 (the derived-series notation Rr/p: every p-th term)
    steps = [b / a for a, b in zip(EN_SERIES, EN_SERIES[1:])]
    assert all(1.96 <= s <= 2.02 for s in steps), steps
    assert all(abs(s - 10 ** (6 / 20)) < 0.03 for s in steps)
    assert "R 20/3" not in series["en933_2"]["title"] + series["en933_2"]["source"]
    # each practice names a series, an envelope on that series and a mortar classification
    for key, s in practice.sets().items():
        env = refdata.load("grading_envelopes").data[s["grading_envelope"]]
        assert env["practice"] == key and env["series"] == s["sieve_series"]
        assert s["mortar_classes"] in refdata.load("strength_classes").data


@pytest.mark.parametrize("key, sieve, low, high", [
    # EN 13139 general grading of 0/D: 2D 100, 1.4D 95-100, D 85-99; fines category 1 at most
    # 3 % (from memory)
    ("en13139_0_2", 4.0, 100, 100), ("en13139_0_2", 2.8, 95, 100), ("en13139_0_2", 2.0, 85, 99),
    ("en13139_0_2", 0.063, 0, 3), ("en13139_0_4", 8.0, 100, 100), ("en13139_0_4", 5.6, 95, 100),
    ("en13139_0_4", 4.0, 85, 99),
    # ASTM C144 natural sand: Table 1 of the Portland Cement Association's "Trowel Tips: Mortar
    # Sand" (Masonry Magazine, August 1993, p. 17) gives No. 30 40-75 and No. 100 2-15
    ("astm_c144_natural", 0.6, 40, 75), ("astm_c144_natural", 0.15, 2, 15),
])
def test_envelope_limits(key, sieve, low, high):
    limits = {e["sieve_mm"]: (e["low"], e["high"])
              for e in refdata.load("grading_envelopes").data[key]["limits"]}
    assert limits[sieve] == (low, high)


@pytest.mark.parametrize("mean_mpa, expected", [
    # EN 998-2 classes M 1, M 2,5, M 5, M 10, M 15, M 20 (M d above 25 N/mm²), a mortar named by
    # the class above which its strength lies: ÖNORM EN 998-2 Table 1 as ziegel.at's page
    # 'Mörtel' gives it (references.json ziegel_moertel)
    (0.9, ()), (1.0, ("M1",)), (2.49, ("M1",)), (2.5, ("M2.5",)), (9.99, ("M5",)),
    (10.0, ("M10",)), (21.0, ("M20",)),
])
def test_en_998_2_classes_on_the_mean(mean_mpa, expected):
    from specgen.science import strength_classes as scl
    table = refdata.load("strength_classes").data["en998_2"]
    got = scl.strongest_minimum(mean_mpa * 1e6, scl.classes_from_table(table),
                                standard="EN 998-2", source=table["source"])
    assert got.matches == expected


def test_interpolation_is_linear_in_log_aperture():
    # by hand: between 4 mm (100 %) and 2 mm (92 %), 2.8 mm reads
    # 92 + 8·ln(2.8/2)/ln(4/2) = 95.883 %
    g = gr.from_passing([0.004, 0.002, 0.001], [1.0, 0.92, 0.70], [s / 1000 for s in EN_SERIES])
    assert gr.interpolated_passing(g, 0.0028) == pytest.approx(0.95883, abs=1e-5)
    # below the finest sieve with material passing it: no extrapolation
    assert gr.interpolated_passing(g, 0.0005) is None


def test_european_project_with_en_sieves(demo_copy):
    """EN 933-2 sieve data goes in; the EN 13139 0/2 envelope is read on its own sieves."""
    rows = ["sample,sieve [mm],passing [%]"]
    for sample, values in (("S1", (100, 92, 70, 45, 18, 6, 1)),
                           ("S2", (100, 97, 80, 55, 30, 12, 2)),
                           ("HM1-agg", (100, 95, 76, 50, 22, 8, 2))):
        rows += [f"{sample},{s:g},{v}" for s, v in zip((4, 2, 1, 0.5, 0.25, 0.125, 0.063), values)]
    (demo_copy / "lab/sieves.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    _follow(demo_copy, "practice:\n  follows: european\n")
    edit(demo_copy / "dossier.yaml", "grading_envelope: astm_c144_natural",
          "grading_envelope: en13139_0_2")
    _, r = check(demo_copy)
    c = by_check(r)[("COMP-GRAD", "Z1/M3")]          # M3: sand S1 alone
    assert c.status != "not_assessed", c.message
    # S1 by hand on the envelope's sieves: 4 mm 100 (measured), 2.8 mm 95.883 (between 4 and
    # 2 mm, log-linear), 2 mm 92 (measured), 0.063 mm 1 (measured): all within 0/2 limits
    # except none; 2.8 mm is the supplementary sieve 1.4D of EN 13139
    assert "within the EN 13139, aggregate for mortar: fine aggregate 0/2" in c.message
    curves = r.quantities["Z1/M3"]["grading_curves"].value
    assert curves["envelope"]["sieves_mm"] == [0.063, 2.0, 2.8, 4.0]


def test_astm_sieves_on_an_en_envelope_by_interpolation_when_said(demo_copy):
    _follow(demo_copy, "practice:\n  follows: european\n  mixing_reason: the laboratory sieved "
            "on its ASTM E11 sieves\n")
    edit(demo_copy / "dossier.yaml", "grading_envelope: astm_c144_natural",
          "grading_envelope: en13139_0_2")
    _, r = check(demo_copy)
    c = by_check(r)[("COMP-GRAD", "Z1/M3")]
    step = next(s for s in c.steps if s.title.startswith("Passing on the envelope's sieves"))
    got = {i.symbol: i.value for i in step.inputs}
    # reference: numpy.interp on log(aperture) through demo S1 (lab/sieves.csv)
    sizes = np.log([0.15, 0.3, 0.6, 1.18, 2.36, 4.75])
    passing = [7, 24, 51, 74, 92, 100]
    for mm in (4.0, 2.8, 2.0):
        assert got[f"P({mm:g})"] == pytest.approx(np.interp(math.log(mm), sizes, passing),
                                                  abs=0.01)
    assert "P(0.063)" not in got     # below the finest ASTM sieve, 7 % passing: not read
    assert any("read between the two nearest sieves" in n for n in c.notes)


def test_en_1015_18_two_point_coefficient(demo_copy):
    _, r = check(demo_copy)       # the demo follows European practice
    caps = r.quantities["Z1/M2"]["capillary_coefficient"].value
    # demo lab/capillary.csv, M2: 1.04 kg/m2 at 10 min, 2.94 kg/m2 at 90 min:
    # C = (2.94 - 1.04)/(sqrt(90) - sqrt(10)) = 0.30041 kg/(m2 min^0.5)
    repair = caps["repair"] if isinstance(caps, dict) and "repair" in caps else caps
    value = repair["value"] if isinstance(repair, dict) else repair
    assert value == pytest.approx(1.90 / (math.sqrt(90) - math.sqrt(10)), abs=1e-4)
    # EN 1015-18 writes C = 0.1 (M2 - M1) for masses in g on a 40 mm x 40 mm face (from
    # memory): 0.1 x (2.94 - 1.04) x 1.6 g = 0.304, within the standard's rounding (1.5 %)
    assert value == pytest.approx(0.1 * (2.94 - 1.04) * 1.6, rel=0.015)


def test_american_practice_fits_the_slope_over_all_readings(demo_copy):
    from scipy import stats
    _follow(demo_copy, "practice:\n  follows: american\n")
    _, r = check(demo_copy)
    t = np.array([5, 10, 15, 30, 60, 90]) * 60.0                # demo lab/capillary.csv, M2
    w = np.array([0.78, 1.04, 1.27, 1.74, 2.43, 2.94])
    ref = stats.linregress(np.sqrt(t), w).slope * math.sqrt(60)  # scipy.stats, kg/(m²·min^0.5)
    assert r.quantities["Z2/M2"]["capillary_coefficient"].value["repair"] == pytest.approx(
        ref, abs=1e-4)
    # and the mortar is classed by ASTM C270: 3.333 MPa meets type O (2.4 MPa), not N (5.2)
    assert r.quantities["M2"]["strength_classes"].value["classes"] == ["O"]


BAD_PRACTICE = [
    pytest.param("practice:\n  follows: europen\n",
                 "dossier.yaml, line 74: practice.follows: unknown practice 'europen' "
                 "(content/data/practice.yaml). Fix: did you mean 'european'? Known: european, "
                 "american.", id="unknown_practice"),
    pytest.param("practice:\n  follows: european\n",
                 "dossier.yaml, line 78: compatibility.grading_envelope: the grading envelope "
                 "'astm_c144_natural' belongs to American practice but the project follows "
                 "European practice. Fix: choose an envelope of European practice (en13139_0_2, "
                 "en13139_0_4), or say why the project mixes the two in practice.mixing_reason.",
                 id="envelope_of_the_other_practice"),
    pytest.param("practice:\n  follows: american\n  mortar_classes: en998_2\n",
                 "dossier.yaml, line 75: practice.mortar_classes: the mortar classification "
                 "'en998_2' belongs to European practice but the project follows American "
                 "practice. Fix: remove the key (the practice names its own), or say why the "
                 "project mixes the two in practice.mixing_reason.",
                 id="classification_of_the_other_practice"),
]


@pytest.mark.parametrize("text, message", BAD_PRACTICE)
def test_bad_practice_is_refused_with_its_location(demo_copy, text, message):
    _follow(demo_copy, text)
    assert message in problems(demo_copy)


def test_sieve_data_of_the_other_practice_without_saying_so(demo_copy):
    _follow(demo_copy, "practice:\n  follows: european\n")
    edit(demo_copy / "dossier.yaml", "  grading_envelope: astm_c144_natural\n", "")
    assert ("dossier.yaml, line 74: practice.follows: the grading envelope 'en13139_0_4' is "
            "written on the EN 933-2 / ISO 565 basic set of test sieves, but "
            "lab/sieves.csv gives 'HM1-agg' (row 14), 'S1' (row 2), 'S2' (row 8) on the "
            "ASTM E11 test sieves.") in problems(demo_copy)


@pytest.mark.parametrize("block, override, paper", [
    ("practice:\n  follows: european\n  mixing_reason: the laboratory sieves on ASTM E11\n",
     None, "a4"),
    ("practice:\n  follows: american\n", None, "letter"),
    ("practice:\n  follows: american\n", "a4", "a4"),          # --page-size wins
    ("practice:\n  follows: european\n  mixing_reason: the laboratory sieves on ASTM E11\n",
     "letter", "letter"),
    ("", None, "a4"),                 # no practice stated: A4, as build() documents
])
def test_paper_follows_the_practice_unless_overridden(demo_copy, block, override, paper):
    from specgen.build import _paper, load
    _follow(demo_copy, block)
    assert _paper(load(demo_copy), override) == paper


@pytest.mark.parametrize("paper, points", [
    # ISO 216 A4 = 210 mm x 297 mm = 595.28 pt x 841.89 pt (1 pt = 1/72 in = 25.4/72 mm);
    # ANSI/ASME Y14.1 Letter = 8.5 in x 11 in = 612 pt x 792 pt
    ("a4", (210 / 25.4 * 72, 297 / 25.4 * 72)), ("letter", (612.0, 792.0)),
])
def test_the_print_stylesheet_prints_on_that_paper(paper, points):
    import io

    from pypdf import PdfReader
    from weasyprint import CSS, HTML

    from specgen.publish.pdf import stylesheet
    pdf = HTML(string="<p>paper</p>").write_pdf(stylesheets=[CSS(string=stylesheet(paper))])
    box = PdfReader(io.BytesIO(pdf)).pages[0].mediabox
    assert (float(box.width), float(box.height)) == pytest.approx(points, abs=0.01)
