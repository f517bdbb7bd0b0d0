"""Audit rules on the record of the revision itself: values still to confirm against their
source, and the sign-off of an issued revision (the consistency audit: ``audit_checks.py``).
"""
from __future__ import annotations

from specgen.checks.registry import audit_rule
from specgen.checks.result import Finding


# ---------------------------------------------------------------- unverified values
@audit_rule("AUD-UNVERIFIED", "Values still to confirm against their source", order=80)
def unverified_rule(ctx) -> list[Finding]:
    """Every value the checks read that is still tagged as recalled (not yet checked against
    its printed source): a reference table or entry, or a rule (``Results.unconfirmed``, as
    the checks recorded them)."""
    out = []
    for v in ctx.results.unconfirmed():
        keys = sorted(v["used_by"])
        what = v["title"] or v["where"]
        out.append(Finding(
            "AUD-UNVERIFIED", "Values still to confirm against their source",
            f"{what} ({v['source']}) is used by {', '.join(keys[:4])}"
            f"{' …' if len(keys) > 4 else ''} and is still to be confirmed against its source.",
            ("page Values to confirm",) + tuple(f"calculation sheet {k}" for k in keys[:4]),
            "confirm the value against the printed source and cite its clause or table, or "
            "override it in dossier.yaml with a justification.", subject=what, blocking=False))
    return out


# ---------------------------------------------------------------- sign-off
@audit_rule("AUD-SIGNOFF", "Issued revision without its sign-off", order=90)
def signoff_rule(ctx) -> list[Finding]:
    """A revision issued for construction names who prepared, checked and approved it."""
    rev = ctx.project.revision
    if rev.status != "issued" or rev.purpose != "for_construction":
        return []
    missing = [k for k in ("prepared", "checked", "approved")
               if getattr(rev.sign_off, k) is None]
    if not missing:
        return []
    return [Finding("AUD-SIGNOFF", "Issued revision without its sign-off",
                    f"revision {rev.code} is issued but names no one who {' or '.join(missing)} "
                    "it.", ("dossier.yaml: revision.sign_off", "cover: sign-off"),
                    "give name, role, organisation and date under revision.sign_off for "
                    f"{', '.join(missing)}.", subject=rev.code)]
