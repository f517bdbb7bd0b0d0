"""The few distribution functions the strength statistics use: normal and Student's t
quantiles and the upper tail of Snedecor's F.

Each is the ``scipy.special`` function that ``scipy.stats`` itself evaluates for it
(``norm.ppf`` → ``ndtri``, ``t.ppf`` → ``stdtrit``, ``t.isf`` → ``-stdtrit``, ``f.sf`` →
``fdtrc``), so the numbers are the same; only the import differs: ``scipy.stats`` builds
every one of its distributions when imported (about a second of CPU time, most of the
preview's first page), ``scipy.special`` is already loaded with ``scipy.optimize``.
``tests/science/test_distributions.py`` holds them to ``scipy.stats``.
Arguments: probabilities in (0, 1), degrees of freedom > 0 (``inf`` allowed for t).
"""
from __future__ import annotations

from scipy import special


def norm_ppf(p):
    """Standard normal quantile at probability ``p`` (float or array)."""
    return special.ndtri(p)


def t_ppf(p, dof):
    """Student's t quantile at probability ``p`` with ``dof`` degrees of freedom."""
    return special.stdtrit(dof, p)


def t_isf(p, dof):
    """Student's t upper quantile: the value exceeded with probability ``p``."""
    return -special.stdtrit(dof, p)


def f_sf(x, dof_num, dof_den):
    """Upper tail P(F > ``x``) of Snedecor's F with (``dof_num``, ``dof_den``) degrees of
    freedom."""
    return special.fdtrc(dof_num, dof_den, x)
