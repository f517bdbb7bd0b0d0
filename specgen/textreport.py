"""Plain-text table of check results for the terminal.

Findings are never cut: they wrap under the finding column to the terminal's width, or stay
on one line each with ``wide`` (for a pager or a file).  Statuses are shown in the words the
site uses (``checks.result.STATUS_WORDS``).
"""
from __future__ import annotations

import shutil
import textwrap

from specgen.checks.result import STATUS_WORDS
from specgen.precision import SYMBOL_PRECISION, by_symbol

MIN_FINDING = 30   # below this many columns for the finding, wrap under the whole line instead


def _fmt(value, unit: str, kind: str = "") -> str:
    if value is None:
        return "—"
    if isinstance(value, float) and kind in SYMBOL_PRECISION:
        value = by_symbol(value, kind)    # as the dossier shows it (ΔE00 6.35)
    elif isinstance(value, float):
        value = f"{value:.4g}"
    return f"{value} {unit}".strip()


def table(results, *, width: int | None = None, wide: bool = False) -> str:
    """One row per check: code, subject, status word, value, finding (wrapped, never cut)."""
    width = width or shutil.get_terminal_size((120, 20)).columns
    rows = [("CHECK", "SUBJECT", "STATUS", "VALUE", "FINDING")]
    rows += [(c.code, c.subject, STATUS_WORDS[c.status], _fmt(c.value, c.unit, c.value_symbol),
              c.message)
             for c in results.checks]
    widths = [max(len(r[i]) for r in rows) for i in range(4)]
    offset = sum(widths) + 2 * 4
    room = width - offset
    lines = []
    for r in rows:
        head = "  ".join(r[i].ljust(widths[i]) for i in range(4)) + "  "
        if wide or len(head) + len(r[4]) <= width:
            lines.append(head + r[4])
            continue
        indent = offset if room >= MIN_FINDING else 4
        parts = textwrap.wrap(r[4], width=width - indent, break_long_words=False,
                              break_on_hyphens=False) or [""]
        if room >= MIN_FINDING:
            lines.append(head + parts[0])
            lines += [" " * indent + p for p in parts[1:]]
        else:
            lines.append(head.rstrip())
            lines += [" " * indent + p for p in parts]
    counts = ", ".join(f"{n} {STATUS_WORDS[s]}" for s, n in results.counts().items() if n)
    lines.append("")
    lines.append(f"{results.project_code} revision {results.revision}: {counts or 'no checks ran'}")
    blocking = len(results.blocking())
    if results.findings:
        lines.append(f"consistency audit: {blocking} finding(s) to resolve before issue, "
                     f"{len(results.findings) - blocking} value(s) to confirm "
                     "(specgen status lists them)")
    return "\n".join(lines)


def status_text(s: dict) -> str:
    """``specgen status`` for people: where the project stands."""
    lines = [f"{s['project']} revision {s['revision']}: {s['status']}, {s['purpose']}, "
             f"dated {s['date']}",
             f"last issued revision: {s['last_issued'] or 'none yet'}"]
    blocking = [f for f in s["findings"] if f["blocking"]]
    lines.append(f"open findings: {len(blocking)} to resolve before issue"
                 + (f", {len(s['findings']) - len(blocking)} values to confirm"
                    if len(s["findings"]) > len(blocking) else "")
                 + (" (this revision cannot be built until they are resolved)"
                    if blocking and s["blocks"] else ""))
    lines += [f"  - {f['code']}: {f['message']}" for f in blocking]
    lines.append(f"open hold points: {', '.join(s['hold_points']) or 'none'}")
    lines.append(f"open review comments: {', '.join(s['comments']) or 'none'}")
    lines.append("since the last issue:")
    lines += [f"  {fact}" for fact in s["facts"]] or ["  nothing to compare with"]
    return "\n".join(lines)
