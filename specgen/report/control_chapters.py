"""The "Before issue" page: the consistency audit's findings, read from the results."""
from __future__ import annotations

from specgen.report.chapters import chapter
from specgen.report.wording import input_terms


@chapter("before-issue.md", "Before issue", "before_issue.md.j2", volume="appendix")
def before_issue(env) -> list[dict]:
    """One page when the audit found anything (no page otherwise)."""
    r, rev = env.results, env.project.revision
    if not r.findings:
        return []
    title = "Before issue" if rev.status != "issued" else "Open findings"
    # the findings name the inputs to change: files and keys set as code, as written
    rows = [{"code": f.code, "title": f.title, "message": input_terms(f.message),
             "places": [input_terms(p) for p in f.places], "fix": input_terms(f.fix),
             "blocking": f.blocking} for f in r.findings]
    return [{"path": "before-issue.md", "title": title, "draft": rev.status != "issued",
             "blocking": [x for x in rows if x["blocking"]],
             "listed": [x for x in rows if not x["blocking"]],
             "purpose": rev.purpose.replace("_", " ")}]
