"""Math drawn with the layout shortcuts (specgen/report/mathlayout.py) is byte for byte what
ziamath draws as it ships: the reference is the library itself (ziamath from the package
index, its layout left untouched inside ``mathlayout.plain()``).  And each expression's SVG
is held once: the page set's asset is the in-process memo's own object."""
from __future__ import annotations

import random

import pytest

from specgen.report import mathlayout, mathsvg

# constructed cases for each path of the shortcut: rows with and without stretchy operators,
# nested at several depths, stretchy operators said not to stretch, fences, big operators,
# accents, roots, fractions in fences, matrices and line breaks
HARD = [
    r"x = 1",
    r"\frac{a}{b} + \sqrt{c_{1}^{2} + d}",
    r"f(t) = 10.433\left[0.106\left(1 - e^{-t/0.03873}\right) + 0.894\left(1 - e^{-(t/50.08)"
    r"^{0.691}}\right)\right]",
    r"\left\{ \frac{\left(a + b\right)^{2}}{\left|c\right|} \right\}",
    r"\bar{x} = \frac{1}{n}\sum_{i=1}^{n} x_{i}",
    r"\hat{f}_{90} = 7.2\,\mathrm{MPa} \in [6.1,\ 8.4]",
    r"\lceil 2.4 \rceil = 3,\ \lfloor 2.6 \rfloor = 2",
    r"\sqrt[3]{\frac{\left(x+1\right)}{y}}",
    r"\begin{matrix} a & \left(b\right) \\ c & d \end{matrix}",
    r"a = b \\ c = \left(\frac{d}{e}\right)",
    r"k_{n} = t_{0.95,\,n-1}\sqrt{1 + \frac{1}{n}} = 3.37",
    r"\beta_{cc}(t) = \exp\left\{s\left[1 - \left(\frac{28}{t}\right)^{0.5}\right]\right\}",
    r"\Delta E_{00} = \sqrt{\left(\frac{\Delta L'}{k_L S_L}\right)^2 + \left(\frac{\Delta C'}"
    r"{k_C S_C}\right)^2 + R_T \frac{\Delta C'}{k_C S_C}\frac{\Delta H'}{k_H S_H}}",
    r"\overline{AB} \to \vec{v},\ \underbrace{a+b}_{c}",
]


def _both(latex: str) -> tuple[bytes, bytes]:
    with mathlayout.plain():
        reference = mathsvg._draw(latex)
    return reference, mathsvg._draw(latex)


@pytest.fixture(scope="module")
def checked_version():
    import ziamath
    if not mathlayout.install():
        pytest.skip(f"ziamath {ziamath.__version__} is not the version the shortcuts were read "
                    f"against ({mathlayout.CHECKED}): it draws unchanged")


@pytest.mark.parametrize("latex", HARD)
def test_constructed_formulas_draw_the_same_bytes(latex, checked_version):
    reference, drawn = _both(latex)
    assert drawn == reference


def test_demo_formulas_draw_the_same_bytes(demo_checked, checked_version):
    """A fixed sample of the demo's calculation-sheet formulas (substituted values included):
    the same SVG bytes with the shortcuts as without."""
    _, results = demo_checked
    every = sorted({t for c in results.checks for s in c.steps for t in (s.formula, s.substituted)})
    sample = random.Random(25).sample(every, 40)
    differ = [x for x in sample if len(set(_both(x))) != 1]
    assert differ == []


def test_a_row_without_stretchy_operators_is_measured_no_more(monkeypatch, checked_version):
    """The shortcut is in force: a formula with no stretchy operator never runs ziamath's
    second measuring layout, and one with a fence does (its fence is sized by it)."""
    calls = []
    measure = mathlayout._ORIGINAL["measure"]
    monkeypatch.setitem(mathlayout._ORIGINAL, "measure",
                        lambda *a, **k: (calls.append(1), measure(*a, **k))[1])
    mathsvg._draw(r"x_{1} = \frac{a + b}{c} \cdot 2 = 3.5")
    assert calls == []
    mathsvg._draw(r"y = \left(\frac{a}{b}\right)")
    assert calls


def test_each_formula_svg_is_held_once():
    """The page set's asset is the memo's very bytes object (one copy in memory), and the
    text form is those bytes decoded."""
    from specgen.report.pageset import PageSet
    latex = r"w/b = \frac{0.6\,\mathrm{kg}}{1\,\mathrm{kg}}"
    mathsvg.svg_bytes.cache_clear()
    pages = PageSet()
    mathsvg.MathAssets(pages).img(latex)
    [asset] = [v for k, v in pages.assets.items() if k.startswith("math/")]
    assert asset is mathsvg.svg_bytes(latex)
    assert mathsvg.svg_of(latex) == asset.decode("utf-8") and asset.startswith(b"<svg")
    mathsvg.svg_bytes.cache_clear()
