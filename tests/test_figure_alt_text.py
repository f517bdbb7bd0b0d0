"""The words a screen reader gives for a strength chart: ages and strengths read as the
tables print them (whole days; 0.1 MPa, as laboratory reports give strengths — common
practice, `specgen/report/fmt.py` PRECISION), never padded ("1.00 d", "28.0 days")."""
from specgen.report.strength_chapters import _strength_alt


def test_strength_chart_alt_text_reads_like_the_tables():
    data = {"test": "compressive", "model": "two-stage law with the family's prior",
            "specimens": [(1.0, 1.1), (1.0, 1.3), (28.0, 4.7), (28.0, 4.9), (90.0, 7.6)],
            "means": [(1.0, 1.2, 0.14), (28.0, 4.8, 0.14), (90.0, 7.62, 0.0)],
            "curve": {"ages_d": [1.0, 365.0], "value": [1.05, 9.734]},
            "limits": [(28.0, 2.0, "min 2 MPa at 28 d", "min")]}
    # the means as written above, rounded by hand to 0.1 MPa (7.62 → 7.6; 9.734 → 9.7)
    assert _strength_alt(data) == (
        "Chart of compressive strength in MPa against age in days on a logarithmic axis. "
        "5 specimen results as circles at 1, 28 and 90 days; their means: 1.2 MPa at 1 d, "
        "4.8 MPa at 28 d and 7.6 MPa at 90 d. A line for the fitted two-stage law with the "
        "family's prior, reaching 9.7 MPa at 365 days, with its shaded band. A horizontal "
        "line marks the min 2 MPa at 28 d.")
