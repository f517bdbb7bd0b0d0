"""Same drawing, same bytes: the ids matplotlib gives clip paths and hatch patterns in an SVG
hash the printed form of unrounded numbers, so they changed with the process's NumPy print
state (``numpy.set_printoptions(legacy="1.25")`` prints ``0.2`` where NumPy 2 prints
``np.float64(0.2)``, NumPy 2.0 release notes, "representation of NumPy scalars changed").
A re-issue then differed from a cold build of the same inputs in eight figures
(tests/test_reissue.py).  ``figures.stable_ids`` names each by its definition as written."""
from __future__ import annotations

import io
import re

import numpy as np

from specgen.report.figures import _pyplot, stable_ids, to_svg


def _draw(to_bytes):
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(4, 2))
    ax.bar([0, 1], [1, 2], hatch="//", color=np.array([0.2, 0.3, 0.4]))
    ax.plot([0, 1], [0.5, 1.5])
    return to_bytes(fig)


def _matplotlib_svg(fig) -> bytes:
    buf = io.BytesIO()
    fig.savefig(buf, format="svg", metadata={"Date": None})
    _pyplot().close(fig)
    return buf.getvalue()


def test_matplotlib_ids_follow_the_print_state_and_ours_do_not():
    plain = _draw(_matplotlib_svg)
    ours = _draw(to_svg)
    np.set_printoptions(legacy="1.25")
    try:
        plain_legacy = _draw(_matplotlib_svg)
        ours_legacy = _draw(to_svg)
    finally:
        np.set_printoptions(legacy=False)
    assert plain != plain_legacy                     # the fault, as matplotlib writes it
    assert ours == ours_legacy                       # mended
    assert stable_ids(plain) == stable_ids(plain_legacy)


def test_renamed_ids_keep_every_reference_and_distinct_definitions():
    svg = (b'<defs><clipPath id="p0123456789"><rect x="1" y="2"/></clipPath>'
           b'<clipPath id="p9999999999"><rect x="1" y="2"/></clipPath>'
           b'<pattern id="h00000000ab" width="72"><path d="M0 0"/></pattern></defs>'
           b'<path clip-path="url(#p0123456789)" style="fill: url(#h00000000ab)"/>'
           b'<path clip-path="url(#p9999999999)"/>')
    out = stable_ids(svg)
    ids = re.findall(rb'id="(\w+)"', out)
    refs = re.findall(rb'url\(#(\w+)\)', out)
    assert len(set(ids)) == 3                         # two rects written alike: two names
    assert set(refs) == set(ids)                      # every reference follows its definition
    assert [i[:1] for i in ids] == [b"p", b"p", b"h"]
    assert b"0123456789" not in out and b"00000000ab" not in out
    # the name is a hash of the definition as written: the same definition under any old id
    # is given the same name
    assert stable_ids(svg.replace(b"0123456789", b"aaaaaaaaaa")) == out
