"""The strength-versus-age laws' own edges: the EN 1992-1-1 age function's refusals and young
ages, and the count of fitted parameters (ages in s, DAY = 86 400 s)."""
import math

import numpy as np
import pytest

from specgen.science.strength_laws import DAY, StrengthFitError, age_function_en1992, n_parameters

MESSAGE = "the age function needs positive finite ages and a finite s"


@pytest.mark.parametrize("ages, s", [
    ([7 * DAY, 0.0], 0.25),                 # an age of zero
    ([-1.0 * DAY], 0.25),                   # a negative age
    ([7 * DAY, float("nan")], 0.25),        # a missing age
    ([float("inf")], 0.25),                 # an endless age
    ([7 * DAY], float("nan")),              # no s
    ([7 * DAY], float("inf")),
])
def test_age_function_refusals_whole(ages, s):
    with pytest.raises(StrengthFitError) as err:
        age_function_en1992(ages, s)
    assert str(err.value) == MESSAGE


def test_age_function_under_a_day():
    # EN 1992-1-1 eq. 3.2 written out, βcc(t) = exp{s[1 − (28/t)^0.5]}: at half a day with
    # s = 0.25, exp{0.25 × (1 − √56)} = exp(−1.620829) = 0.197735; at 7 d 0.7788 (the
    # standard's own example value for s = 0.25, DOMAIN primer)
    beta = age_function_en1992([0.5 * DAY, 7 * DAY], 0.25)
    assert beta == pytest.approx([math.exp(0.25 * (1 - math.sqrt(56.0))), 0.7788], abs=5e-5)
    assert beta[0] == pytest.approx(0.197735, abs=1e-6)


@pytest.mark.parametrize("ages_d, n", [
    ([1, 3, 7, 28], 4),                     # no early age: τA held
    ([0.25, 1, 3, 7, 28], 4),               # one early age: τA held
    ([0.25, 0.25, 1, 28], 4),               # one early age twice: still one age
    ([0.5, 0.25, 1, 28], 4),                # half a day is not under half a day
    ([0.1, 0.25, 1, 28], 5),                # two early ages: τA fitted
    ([0.05, 0.1, 0.25, 28], 5),             # three early ages: τA fitted
])
def test_two_component_parameters_by_early_ages(ages_d, n):
    # the module's rule: τA is fitted only with at least two distinct ages under half a day
    assert n_parameters("two_component", np.array(ages_d) * DAY) == n


def test_two_parameter_laws_count_two():
    for model in ("en1992_age", "hyperbolic"):
        assert n_parameters(model, np.array([0.1, 0.25, 28.0]) * DAY) == 2
