"""The distribution functions of the strength statistics, against the reference library
(scipy.stats) and against printed tables; and the import that made them a module of their
own: the preview's first page loads the strength checks without scipy.stats."""
import subprocess
import sys

import numpy as np
import pytest
from scipy import stats

from specgen.science import distributions as d

PROBS = [1e-6, 0.001, 0.025, 0.05, 0.1, 0.3, 0.5, 0.7, 0.9, 0.95, 0.975, 0.995, 0.999999]
DOFS = [1.0, 2.0, 3.5, 4.0, 7.0, 12.0, 30.0, 120.0, 1e4]


@pytest.mark.parametrize("p", PROBS)
def test_normal_quantile_is_scipy_stats(p):
    # reference library: scipy.stats.norm.ppf, exactly (the same function underneath)
    assert d.norm_ppf(p) == stats.norm.ppf(p)


@pytest.mark.parametrize("dof", DOFS)
def test_student_t_quantiles_are_scipy_stats(dof):
    # reference library: scipy.stats.t.ppf / t.isf, exactly, over the probabilities a
    # characteristic value, a prediction interval and the stratified draws use
    p = np.array(PROBS)
    assert np.array_equal(d.t_ppf(p, dof), stats.t.ppf(p, dof))
    assert np.array_equal(d.t_isf(p, dof), stats.t.isf(p, dof))


@pytest.mark.parametrize("x, dn, dd", [(0.2, 1, 5), (1.0, 2, 10), (3.1, 3, 8), (7.5, 4.5, 2.5),
                                       (40.0, 2, 30)])
def test_f_upper_tail_is_scipy_stats(x, dn, dd):
    # reference library: scipy.stats.f.sf, exactly
    assert d.f_sf(x, dn, dd) == stats.f.sf(x, dn, dd)


@pytest.mark.parametrize("p, dof, value", [
    (0.95, 1, 6.314), (0.95, 2, 2.920), (0.95, 4, 2.132), (0.975, 4, 2.776),
    (0.975, 10, 2.228), (0.95, 30, 1.697)])
def test_student_t_against_a_printed_table(p, dof, value):
    # the one-sided Student t table of the statistics handbooks (NIST/SEMATECH e-Handbook of
    # Statistical Methods, 1.3.6.7.2, upper critical values), 3 decimals, from memory: the
    # reference that decides is scipy.stats above
    assert d.t_ppf(p, dof) == pytest.approx(value, abs=6e-4)


def test_normal_97_5_percent_point_against_a_printed_table():
    # the standard normal table (NIST/SEMATECH e-Handbook, 1.3.6.7.1): z(0.975) = 1.960,
    # from memory; scipy.stats above decides
    assert d.norm_ppf(0.975) == pytest.approx(1.95996, abs=1e-5)


def test_the_checks_do_not_import_scipy_stats():
    # scipy.stats costs about a second of CPU time to import; the checks (and so the
    # preview's first page) have no need of it
    code = ("import sys, specgen.build, specgen.checks.builtin; "
            "print('scipy.stats' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True)
    assert out.stdout.strip() == "False"
