"""The "Before issue" page: the consistency audit's findings, read from the results."""
from __future__ import annotations

from specgen.report.chapters import chapter


@chapter("before-issue.md", "Before issue", "before_issue.md.j2", volume="appendix")
def before_issue(env) -> list[dict]:
    """One page when the audit found anything (no page otherwise)."""
    r, rev = env.results, env.project.revision
    if not r.findings:
        return []
    title = "Before issue" if rev.status != "issued" else "Open findings"
    rows = [{"code": f.code, "title": f.title, "message": f.message, "places": list(f.places),
             "fix": f.fix, "blocking": f.blocking} for f in r.findings]
    return [{"path": "before-issue.md", "title": title, "draft": rev.status != "issued",
             "blocking": [x for x in rows if x["blocking"]],
             "listed": [x for x in rows if not x["blocking"]],
             "purpose": rev.purpose.replace("_", " ")}]
