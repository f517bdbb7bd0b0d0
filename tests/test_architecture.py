"""The rules of the house as tests: the arrows allowed between the pipeline's stages
(DEVELOPERS.md, "The pipeline") are import contracts in ``.importlinter``, checked by
import-linter (a maintained tool: https://import-linter.readthedocs.io), so an arrow against
the design fails the suite with the contract's name."""
from __future__ import annotations

import configparser
from pathlib import Path

from importlinter.cli import lint_imports

ROOT = Path(__file__).resolve().parent.parent
CONFIG = ROOT / ".importlinter"
# the checks' contract: what the render stage, the exports and the tests may read
CONTRACT = {"__init__", "result", "run", "registry", "rules"}


def _contracts() -> configparser.ConfigParser:
    parser = configparser.ConfigParser()
    parser.read(CONFIG, encoding="utf-8")
    return parser


def test_import_contracts_are_kept(capsys):
    code = lint_imports(config_filename=str(CONFIG), no_cache=True)
    out = capsys.readouterr().out
    assert code == 0, out
    assert "0 broken" in out


def test_render_may_import_only_the_checks_contract():
    """The render stage's contract forbids all of specgen.checks but the contract modules
    (so a new check module is covered without being listed)."""
    section = _contracts()["importlinter:contract:render-not-checks"]
    assert section["forbidden_modules"].split() == ["specgen.checks"]
    allowed = {line.split("->")[1].strip() for line in section["ignore_imports"].splitlines()
               if "->" in line}
    assert allowed == {"specgen.checks"} | {f"specgen.checks.{m}" for m in CONTRACT - {"__init__"}}
    contract_files = {p.stem for p in (ROOT / "specgen" / "checks").glob("*.py")} & CONTRACT
    assert contract_files == CONTRACT


def test_the_stages_of_the_design_have_their_contracts():
    names = {s.split(":", 2)[2] for s in _contracts().sections() if s.count(":") == 2}
    assert names == {"layers", "no-cycles", "render-not-checks", "render-not-science",
                     "load-not-checks", "load-not-science", "checks-not-load",
                     "publish-not-render", "face", "publish-not-load",
                     "pipeline-through-checks"}


def test_one_reading_order_for_site_pdf_and_page_names():
    """The chapters come in the order of the one list (chapters.READING_ORDER), every
    chapter of ours has its place in it, and the page names a comment may be about are
    those chapters' (build.reference_names)."""
    from specgen.build import reference_names
    from specgen.report.chapters import READING_ORDER, chapters
    paths = [c.path for c in chapters()]
    assert paths == list(READING_ORDER)
    assert reference_names()[1] == {p.removesuffix(".md") for p in READING_ORDER} | {"summary"}


def test_the_appendices_come_after_every_chapter_of_the_report():
    """A reader turns from the report to its appendices once: no chapter of the main volume
    is printed after an appendix (the PDF's two volumes and the site's navigation)."""
    from specgen.report.chapters import chapters
    # the reference list is rendered last (every citation numbered) but read as the
    # report's last chapter: each volume keeps its own chapters in order
    volumes = [c.volume for c in chapters() if c.path != "references.md"]
    assert "appendix" in volumes
    first = volumes.index("appendix")
    assert volumes[first:] == ["appendix"] * (len(volumes) - first), \
        [c.path for c in chapters()]


def test_every_science_error_has_the_one_base():
    import importlib
    import inspect
    import pkgutil

    import specgen.science as science
    from specgen.errors import ScienceInputError, SpecgenError
    found = []
    for info in pkgutil.iter_modules(science.__path__):
        module = importlib.import_module(f"specgen.science.{info.name}")
        found += [cls for _, cls in inspect.getmembers(module, inspect.isclass)
                  if issubclass(cls, Exception) and cls.__module__ == module.__name__]
    assert len(found) == 12  # twelve modules' errors
    assert all(issubclass(cls, ScienceInputError) for cls in found), found
    assert issubclass(ScienceInputError, SpecgenError) and issubclass(ScienceInputError, ValueError)


def test_a_refused_science_input_is_not_assessed_with_its_reason():
    """Any check whose science refuses its input gives *not assessed* with the method's
    message, through the one mechanism of the check run (no crash, no special case)."""
    from specgen.build import load as _load
    from specgen.checks.registry import register, unregister
    from specgen.checks.run import evaluate
    from specgen.science.grading import GradingInputError

    @register("TEST-REFUSED", "A check whose method refuses its input", "project", order=999)
    def refused(subject, ctx):
        raise GradingInputError("the sieve series has fewer than three sieves")

    try:
        results = evaluate(_load(ROOT / "demo_project"))
    finally:
        unregister("TEST-REFUSED")
    found = [c for c in results.checks if c.code == "TEST-REFUSED"]
    assert [(c.status, c.message, c.subject) for c in found] == [
        ("not_assessed", "not assessed: the sieve series has fewer than three sieves",
         "WEP-2026")]


def test_sizes_modules_and_functions():
    """No module over 400 lines; no function over 60 lines without a reason in a comment
    (a line ``# long: <why>`` in its body)."""
    import ast
    too_big, too_long = [], []
    for path in sorted((ROOT / "specgen").rglob("*.py")):
        text = path.read_text(encoding="utf-8")
        lines = text.splitlines()
        if len(lines) > 400:
            too_big.append(f"{path.relative_to(ROOT)}: {len(lines)} lines")
        for node in ast.walk(ast.parse(text)):
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                body = lines[node.lineno - 1:node.end_lineno]
                if len(body) > 60 and not any(ln.strip().startswith("# long:") for ln in body):
                    too_long.append(f"{path.relative_to(ROOT)}:{node.lineno} {node.name}: "
                                    f"{len(body)} lines")
    assert too_big == [] and too_long == [], too_big + too_long


def test_the_face_reaches_the_stages_only_through_the_pipeline():
    """Every specgen module the face (cli.py) imports is the pipeline's public module or a
    module that reaches no stage by itself (errors, the progress display, the live preview,
    which calls back into the pipeline); so no path from the face to the loader, the checks or
    publishing runs beside the pipeline (the whiteboard's "the face calls the pipeline's API
    only", read through modules that belong to no stage)."""
    import grimp
    graph = grimp.build_graph("specgen", include_external_packages=False)
    direct = graph.find_modules_directly_imported_by("specgen.cli")
    assert direct <= {"specgen", "specgen.errors", "specgen.build", "specgen.console",
                      "specgen.preview"}, direct
    stages = ("specgen.project", "specgen.checks", "specgen.publish", "specgen.report",
              "specgen.science")
    for helper in ("specgen.console", "specgen.preview", "specgen.errors"):
        for module in graph.find_modules_directly_imported_by(helper):
            assert not module.startswith(stages), (helper, module)


def test_the_checks_contract_imports_no_check_module():
    """The whiteboard draws CheckImpl -> Contract, never the other way: the registry, the
    runner, the result types and the rules import nothing of specgen.checks but each other
    (the pipeline registers the built-in checks by importing specgen.checks.builtin)."""
    import grimp
    graph = grimp.build_graph("specgen", include_external_packages=False)
    contract = {"specgen.checks"} | {f"specgen.checks.{m}" for m in CONTRACT - {"__init__"}}
    for module in contract:
        inside = {m for m in graph.find_modules_directly_imported_by(module)
                  if m.startswith("specgen.checks")}
        assert inside <= contract, (module, inside - contract)
