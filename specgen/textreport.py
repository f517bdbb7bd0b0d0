"""Plain-text table of check results for the terminal."""
from __future__ import annotations

import shutil

from specgen.checks.result import STATUS_WORDS


def _fmt(value, unit: str) -> str:
    if value is None:
        return "—"
    if isinstance(value, float):
        value = f"{value:.4g}"
    return f"{value} {unit}".strip()


def table(results) -> str:
    """One line per check: code, subject, status word, value, finding (cut to the terminal)."""
    width = shutil.get_terminal_size((120, 20)).columns
    rows = [("CHECK", "SUBJECT", "STATUS", "VALUE", "FINDING")]
    rows += [(c.code, c.subject, STATUS_WORDS[c.status], _fmt(c.value, c.unit), c.message)
             for c in results.checks]
    widths = [max(len(r[i]) for r in rows) for i in range(4)]
    lines = []
    for r in rows:
        line = "  ".join(r[i].ljust(widths[i]) for i in range(4)) + "  " + r[4]
        lines.append(line if len(line) <= width else line[: width - 1] + "…")
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
