"""The refusals a revision meets before anything is written (the pipeline calls them).

* an issued revision with open blocking audit findings (exit 1, the list);
* an issued revision whose archived inputs changed after it was issued (exit 2, each file);
* a revision for construction that rests on a value still tagged ``memory`` (exit 2).
"""
from __future__ import annotations

from pathlib import Path

from specgen.errors import AuditRefused, InputErrors, Problem

from specgen.project.layout import ARCHIVE_DIR


def blocks(project) -> bool:
    """Whether open blocking findings stop this revision from being built: issued for
    construction, or for approval when the project asks for that."""
    rev = project.revision
    strict = project.dossier.document_control.block_for_approval
    return rev.status == "issued" and (rev.purpose == "for_construction"
                                       or (strict and rev.purpose == "for_approval"))


def refuse_if_findings(project, results) -> None:
    """Stop (exit 1) with the list when an issued revision still has blocking findings."""
    found = results.blocking()
    if found and blocks(project):
        raise AuditRefused(project.revision, found)


def frozen_inputs(out: Path, archived: list, rebuild: dict[str, str]) -> set[str]:
    """Codes of the archived revisions to build: those not built as issued into ``out``, and
    those told to ``rebuild``.  An issued revision whose inputs changed after its manifest
    was written stops the build (nothing written) unless it is told to rebuild."""
    from specgen.publish.output import issued_manifest
    todo, problems = set(), []
    for old in archived:
        code, now = old.revision.code, {f.path: f.sha256 for f in old.inputs}
        manifest = issued_manifest(out / code)
        if manifest is None or code in rebuild:
            todo.add(code)
            continue
        then = manifest.get("inputs", {})
        changed = sorted(k for k in set(then) | set(now) if then.get(k) != now.get(k))
        for path in changed:
            what = ("was added" if path not in then else "was removed" if path not in now
                    else "was changed")
            problems.append(Problem(
                f"{ARCHIVE_DIR}/{code}/{path}", f"{what} after revision {code} was issued (its "
                f"inputs are hashed in {out / code / 'manifest.json'}); an issued revision is "
                "frozen.", fix=f"restore the file as issued (the PDF of {code} carries it as the "
                f"attachment input/{path}), or rebuild {code} from the changed inputs with "
                f"--rebuild-issued {code} --reason \"why\", which records the reason."))
    if problems:
        raise InputErrors(problems)
    return todo


def refuse_unconfirmed(project, results) -> None:
    """A revision for construction may not rest on a value still tagged ``memory``.

    Raises :class:`InputErrors` (exit 2, nothing written) naming the revision's purpose in
    dossier.yaml and every such value with the checks that used it.
    """
    values = results.unconfirmed()
    if project.revision.purpose != "for_construction" or not values:
        return
    from specgen.errors import ProblemLog
    from specgen.project.files import read_yaml
    log = ProblemLog()
    located = read_yaml(Path(project.root) / "dossier.yaml", "dossier.yaml", ProblemLog())
    log.add("dossier.yaml", f"revision {project.revision.code} is for construction but rests on "
            f"{len(values)} value(s) still tagged memory (recalled, not read in their source).",
            line=located.line_of(("revision", "purpose")) if located else None,
            field="revision.purpose",
            fix="confirm each value listed below against its source, or issue the revision "
            "for approval until then (purpose: for_approval).")
    for v in values:
        users = v["used_by"]
        log.add(f"content/data/{v['table']}.yaml", f"tagged memory (source named: {v['source']}); "
                f"used by {', '.join(users[:3])}" + (f" and {len(users) - 3} more" if
                                                     len(users) > 3 else "") + ".",
                field=v["path"] or "(the whole table)",
                fix="read the value in the source and cite its clause or table (then remove the "
                "tag), or declare it common practice with its range and reason, or a project "
                "requirement (rule_overrides with a justification).")
    log.raise_if_any()
