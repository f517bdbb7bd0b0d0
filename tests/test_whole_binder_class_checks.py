"""BIND-CLASS read whole: every field of the result (status, message, basis, notes, each step's
title, formula, inputs with value, unit, label and source, substituted values and result) on
hand-made binders built in memory, at the edges of EN 459-1's single-result limits.

The limit values are EN 459-1, Annex A, Table A.4 "Limit values for single results", as
``tests/test_binder_classes.py`` quotes them (TABLE_A4, STRENGTH_A4); the designations of a
natural cement are ASTM C10/C10M 1.1 Scope.  Each expected sheet is written out here from
those, never taken from the check's output.
"""
from __future__ import annotations

from types import SimpleNamespace as NS

from specgen.checks.binder_class_checks import binder_class_check
from specgen.checks.result import Basis, CheckResult, Input, Step
from tests.test_binder_classes import STRENGTH_A4, TABLE_A4

TITLE = "Binder against its declared class"
# EN 459-1, Annex A, Table A.4: the basis every BIND-CLASS result of a lime names
EN459 = Basis("reference", "en459", "Annex A, Table A.4, limit values for single results")
# ASTM C10/C10M, 1.1 Scope: the basis of a natural cement's designation
C10 = Basis("reference", "astmc10", "1.1 Scope: natural cement and quick-setting natural cement")
TABLE = "EN 459-1, Annex A, Table A.4 (content/data/binder_classes.yaml)"
LAB = "Eastmoor Test House, report ETH-0071"        # an invented laboratory
NOTES = ("each measured value is one result, judged against the limit values for single "
         "results; the supplier's declared (characteristic) values are not judged from one "
         "sample",
         "setting times, fineness, soundness, air content and water retention are declared by "
         "the supplier to EN 459-2 and not judged here")


def _binder(kind, declared, so3=None, lab=LAB, **tests):
    """A binder of ``kind`` declared ``declared``, its analysis A1 giving ``so3`` (mass %) and
    its class tests ``tests`` (available_lime, free_water in %; strength_7d/28d in Pa)."""
    fields = {k: tests.get(k) for k in ("available_lime", "free_water", "strength_7d",
                                        "strength_28d")}
    class_tests = NS(laboratory=lab, **fields) if tests or lab != LAB else None
    analysis = NS(id="A1", laboratory="Westcombe Lab", kind="binder", material="B1",
                  mass_percent={} if so3 is None else {"SO3": so3, "CaO": 60.0})
    binder = NS(id="B1", type=kind, declared_class=declared, class_tests=class_tests,
                analysis="A1")
    return binder, NS(project=NS(analyses={"A1": analysis}))


def _limit_step(title, formula, measured, limits, substituted, value, unit, symbol, where):
    """The sheet's step for one measured value against its single-result limits."""
    inputs = (Input(symbol, measured, value, unit, where),) + tuple(
        Input(symbol + bound, label, limit, unit, TABLE) for bound, label, limit in limits)
    return Step(title, formula, inputs, substituted, value, unit, symbol)


def _so3(value, limit, substituted):
    # SO3 has an upper limit only (Table A.4): S̄ <= S̄max
    return _limit_step("SO3 against the single-result limit", r"\bar{S} \le \bar{S}_{max}",
                       "SO3 measured", [("max", "largest SO3, single result", limit)],
                       substituted, value, "%", "S̄", "analysis A1 (Westcombe Lab)")


def _al(value, limit, substituted, where=LAB):
    # available lime has a lower limit only (Table A.4): AL >= ALmin
    return _limit_step("Available lime against the single-result limit",
                       r"\mathrm{AL}_{min} \le \mathrm{AL}", "available lime measured",
                       [("min", "least available lime, single result", limit)],
                       substituted, value, "%", "AL", where)


def _water(value, substituted, where=LAB):
    # free water: at most 2,5 % (Table A.4)
    return _limit_step("Free water against the single-result limit", r"w_{f} \le w_{f,max}",
                       "free water measured", [("max", "largest free water, single result", 2.5)],
                       substituted, value, "%", "wf", where)


def _strength(age, value, low, high, substituted, where=LAB):
    limits = [("min", f"least {age}-d strength, single result", low)]
    if high is not None:
        limits.append(("max", f"largest {age}-d strength, single result", high))
    formula = (rf"f_{{c,{age},min}} \le f_{{c,{age}}}" if high is None else
               rf"f_{{c,{age},min}} \le f_{{c,{age}}} \le f_{{c,{age},max}}")
    return _limit_step(f"{age}-d strength against the single-result limit", formula,
                       f"{age}-d strength measured", limits, substituted, value, "MPa",
                       f"fc{age}", where)


def _result(status, message, steps):
    return CheckResult(code="BIND-CLASS", title=TITLE, subject="B1", subject_kind="binder",
                       status=status, value=None, unit="", basis=(EN459,), steps=tuple(steps),
                       message=message, notes=NOTES)


def test_nhl_on_every_edge_of_its_single_result_limits_passes_whole():
    # NHL 3.5 (Table A.4): SO3 <= 2,5; available lime >= 22; free water <= 2,5; 28-d strength
    # 2,7 to 14 MPa.  Every measured value set on its limit: `<=` and `>=` both hold.
    assert (TABLE_A4[("NHL", "so3_max")], TABLE_A4[("NHL", "3.5")]) == (2.5, 22.0)
    s = STRENGTH_A4["3.5"]
    binder, ctx = _binder("nhl", "NHL 3.5", so3=2.5, available_lime=22.0, free_water=2.5,
                          strength_28d=s["min_28d"] * 1e6)
    got = binder_class_check(binder, ctx)
    assert got == _result(
        "pass", "declared NHL 3.5: SO3 2.5 %, available lime 22 %, free water 2.5 %, "
        "28-d strength 2.7 MPa within the single-result limits",
        [_so3(2.5, 2.5, r"2.5 \le 2.5"), _al(22.0, 22.0, r"22 \le 22"),
         _water(2.5, r"2.5 \le 2.5"),
         _strength("28", 2.7, 2.7, 14.0, r"2.7 \le 2.7 \le 14")])


def test_nhl_just_beyond_every_limit_fails_whole():
    # a hundredth beyond each limit of NHL 3.5 (Table A.4): SO3 2.51 > 2,5; available lime
    # 21.99 < 22; free water 2.51 > 2,5; 28-d strength 14.01 MPa > 14
    binder, ctx = _binder("nhl", "NHL 3,5", so3=2.51, available_lime=21.99, free_water=2.51,
                          strength_28d=14.01e6)
    got = binder_class_check(binder, ctx)
    assert got == _result(
        "fail", "declared NHL 3.5: SO3 2.51 %; available lime 21.99 %; free water 2.51 %; "
        "28-d strength 14.01 MPa beyond the single-result limit",
        [_so3(2.51, 2.5, r"2.51 > 2.5"), _al(21.99, 22.0, r"22 > 21.99"),
         _water(2.51, r"2.51 > 2.5"),
         _strength("28", 14.01, 2.7, 14.0, r"2.7 \le 14.01 > 14")])


def test_class_5_below_its_least_strengths_fails_whole():
    # HL 5 (Table A.4): SO3 <= 3,5; available lime >= 2,5; 7-d >= 1,5 MPa; 28-d 4,0-20 MPa.
    # 7-d 1.49 and 28-d 3.99 fail; the rest pass (only the failing ones are in the message).
    binder, ctx = _binder("hl", "hl 5", so3=3.5, available_lime=2.5,
                          strength_7d=1.49e6, strength_28d=3.99e6)
    got = binder_class_check(binder, ctx)
    assert got == _result(
        "fail", "declared HL 5: 7-d strength 1.49 MPa; 28-d strength 3.99 MPa beyond the "
        "single-result limit",
        [_so3(3.5, 3.5, r"3.5 \le 3.5"), _al(2.5, 2.5, r"2.5 \le 2.5"),
         _strength("7", 1.49, 1.5, None, r"1.5 > 1.49"),
         _strength("28", 3.99, 4.0, 20.0, r"4 > 3.99 \le 20")])


def test_formulated_lime_without_a_strength_class_by_its_category():
    # FL C (Table A.4): available lime >= 12 % as one result; with no strength class named no
    # strength limit applies, so the 28-d result given is not judged.  No laboratory named:
    # the sheet says the values are the materials.yaml class tests.
    where = "materials.yaml class_tests"
    binder, ctx = _binder("fl", "FL C", lab="", available_lime=12.0, strength_28d=30e6)
    got = binder_class_check(binder, ctx)
    assert got == _result("pass", "declared FL C: available lime 12 % within the single-result "
                          "limits", [_al(12.0, 12.0, r"12 \le 12", where)])


def test_formulated_lime_of_a_category_and_class_reads_the_category():
    # FL B 2: available lime by its category B (>= 22 %, Table A.4), not by the strength
    # class 2 (whose row, read as NHL 2's, would ask 37 %): 30 % passes
    binder, ctx = _binder("fl", "fl b 2", available_lime=30.0)
    got = binder_class_check(binder, ctx)
    assert got == _result("pass", "declared FL B 2: available lime 30 % within the "
                          "single-result limits", [_al(30.0, 22.0, r"22 \le 30")])


def test_nothing_measured_is_not_assessed_whole():
    binder, ctx = _binder("nhl", "NHL 5")
    got = binder_class_check(binder, ctx)
    assert got == CheckResult(
        code="BIND-CLASS", title=TITLE, subject="B1", subject_kind="binder",
        status="not_assessed", value=None, unit="", basis=(EN459,),
        message="not assessed: nothing measured of B1 to judge NHL 5 by: no SO3 in its "
        "analysis and no materials.yaml B1.class_tests")


def test_free_water_alone_is_one_step():
    # NHL 3.5 with only its free water measured (no analysis SO3): one step, <= 2,5 (Table A.4)
    binder, ctx = _binder("nhl", "NHL 3.5", free_water=0.4)
    got = binder_class_check(binder, ctx)
    assert got.steps == (_water(0.4, r"0.4 \le 2.5"),)
    assert got.message == "declared NHL 3.5: free water 0.4 % within the single-result limits"


def test_undeclared_and_mismatched_declarations_are_not_assessed_whole():
    binder, ctx = _binder("fl", None, so3=1.0)
    got = binder_class_check(binder, ctx)
    # no declaration: the message names the family and an example of its designation
    assert got == CheckResult(
        code="BIND-CLASS", title=TITLE, subject="B1", subject_kind="binder",
        status="not_assessed", value=None, unit="", basis=(EN459,),
        message="not assessed: binder B1 declares no EN 459-1 class of FL such as 'FL B 3.5' "
        "(materials.yaml declared_class)")
    binder, ctx = _binder("hl", "NHL 2", so3=1.0)
    assert binder_class_check(binder, ctx).message == (
        "not assessed: binder B1 declares 'NHL 2', which is no EN 459-1 class of HL such as "
        "'HL 5' (materials.yaml declared_class)")
    binder, ctx = _binder("nhl", "FL A 2", so3=1.0)      # a formulated class on an NHL
    assert binder_class_check(binder, ctx).message == (
        "not assessed: binder B1 declares 'FL A 2', which is no EN 459-1 class of NHL such as "
        "'NHL 3.5' (materials.yaml declared_class)")


def test_binders_outside_the_standards_give_no_result():
    # EN 459-1's lime with hydraulic properties only: an air lime and a Portland cement are
    # not classed here; a natural cement that declares nothing is not named
    for kind, declared in (("air_lime", "CL 90"), ("portland", "CEM I"),
                           ("natural_cement", None)):
        binder, ctx = _binder(kind, declared, so3=1.0)
        assert binder_class_check(binder, ctx) == []


def test_natural_cement_designations_whole():
    # ASTM C10/C10M 1.1 Scope names "natural cement" and "quick-setting natural cement"
    binder, ctx = _binder("natural_cement", "Quick-Setting  Natural-Cement (ASTM C10/C10M)")
    assert binder_class_check(binder, ctx) == CheckResult(
        code="BIND-CLASS", title=TITLE, subject="B1", subject_kind="binder", status="info",
        value=None, unit="", basis=(C10,), steps=(),
        message="declared as quick-setting natural cement (ASTM C10/C10M); the specification's "
        "chemical and physical requirements have not been read here, so the declaration is "
        "named, not judged",
        notes=("judge the binder by the strength, soundness and setting records of this "
               "dossier, which do not rest on the designation",))
    binder, ctx = _binder("natural_cement", "natural cement astm c 10")
    assert binder_class_check(binder, ctx).message.startswith("declared as natural cement (")
    binder, ctx = _binder("natural_cement", "rapid cement")
    assert binder_class_check(binder, ctx) == CheckResult(
        code="BIND-CLASS", title=TITLE, subject="B1", subject_kind="binder",
        status="not_assessed", value=None, unit="", basis=(C10,),
        message="not assessed: binder B1 declares 'rapid cement', which is no designation of a "
        "natural cement in ASTM C10/C10M (known: natural cement, quick-setting natural cement)")
