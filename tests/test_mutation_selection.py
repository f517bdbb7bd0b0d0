"""The mutation tool's test selection (tools/mutation.py, run by hand): a test is picked when
it names what a check module registers, directly or through the file's helpers, however
deeply the helpers call each other."""
import importlib.util
from pathlib import Path

TOOL = Path(__file__).resolve().parent.parent / "tools" / "mutation.py"


def _tool():
    spec = importlib.util.spec_from_file_location("mutation_tool", TOOL)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def test_tests_reached_through_helpers_of_helpers_are_selected(tmp_path):
    (tmp_path / "t.py").write_text(
        "def _run(x):\n    return check_it(x)\n\n"
        "def _pair():\n    return _run(1), _run(2)\n\n"
        "def _far():\n    return _pair()\n\n"
        "def test_direct():\n    assert check_it(0)\n\n"
        "def test_one_helper():\n    assert _run(0)\n\n"
        "def test_helper_of_helper():\n    assert _pair()\n\n"
        "def test_three_deep():\n    assert _far()\n\n"
        "def test_other():\n    assert 1 + 1 == 2\n", encoding="utf-8")
    got = _tool().tests_naming(["t.py"], {r"\bcheck_it\s*\("}, root=tmp_path)
    assert got == ["t.py::test_direct", "t.py::test_one_helper", "t.py::test_helper_of_helper",
                   "t.py::test_three_deep"]
    assert _tool().tests_naming(["t.py"], {r"\bnothing_here\s*\("}, root=tmp_path) == ["t.py"]


def test_codes_made_per_test_kind_are_read(tmp_path):
    # a check registered under a code made in an f-string (STR-INF-C and STR-INF-F from one
    # function) is read by a test naming either code
    checks = tmp_path / "specgen" / "checks"
    checks.mkdir(parents=True)
    (checks / "made_checks.py").write_text(
        'def _check(test):\n    code, title = f"STR-INF-{test[0].upper()}", "t"\n', "utf-8")
    names = _tool().names_read("made_checks", root=tmp_path)
    assert names == {r"STR\-INF\-[A-Z]"}
    (tmp_path / "t.py").write_text(
        'def test_c():\n    assert "STR-INF-C"\n\n'
        'def test_other():\n    assert "STR-AGG"\n', encoding="utf-8")
    assert _tool().tests_naming(["t.py"], names, root=tmp_path) == ["t.py::test_c"]


# --- the stratified sample of mutants and its estimate (tools/mutation.py sample/estimate) ---

def _names(module, n):
    return [f"specgen.checks.{module}.x_f__mutmut_{i}" for i in range(1, n + 1)]


def test_sample_is_stratified_without_duplicates_and_the_same_for_a_random_state():
    tool = _tool()
    pool = {"big": _names("big", 500), "mid": _names("mid", 90), "small": _names("small", 12)}
    got = tool.sample_names(pool, 30, rng_state=27)
    # every module is a stratum of its own: 30 each, the whole module when it has fewer
    assert {m: len(v) for m, v in got.items()} == {"big": 30, "mid": 30, "small": 12}
    for module, names in got.items():
        assert len(set(names)) == len(names)            # no mutant drawn twice
        assert set(names) <= set(pool[module])          # only the module's own mutants
    assert tool.sample_names(pool, 30, rng_state=27) == got             # reproducible
    assert tool.sample_names(pool, 30, rng_state=28)["big"] != got["big"]   # another state
    # a module's draw does not depend on the others drawn with it, nor on their order
    assert tool.sample_names({"big": pool["big"][::-1]}, 30, rng_state=27)["big"] == got["big"]
    # a fraction is of each module, rounded up: 10 % of 500 = 50, of 90 = 9, of 12 = 1.2 → 2
    frac = tool.sample_names(pool, 0.1, rng_state=27)
    assert {m: len(v) for m, v in frac.items()} == {"big": 50, "mid": 9, "small": 2}


def test_every_first_part_of_a_draw_spreads_over_the_module():
    # a run may stop after the first 10 of a 30-mutant draw: those 10 must be a simple
    # random sample themselves, so over many random states each mutant of a 40-mutant module
    # is among them about 10/40 of the time (the definition of a simple random sample;
    # 2000 draws, so each count is binomial(2000, 0.25): 500 ± 19.4 sd, 500 ± 100 is 5 sd)
    tool = _tool()
    pool = {"m": _names("m", 40)}
    counts = {}
    for state in range(2000):
        for name in tool.sample_names(pool, 30, rng_state=state)["m"][:10]:
            counts[name] = counts.get(name, 0) + 1
    assert len(counts) == 40
    assert all(400 <= c <= 600 for c in counts.values()), sorted(counts.values())


def test_wilson_interval_against_scipy():
    from scipy.stats import binomtest
    tool = _tool()
    for k, n in [(27, 30), (30, 30), (0, 10), (81, 263), (55, 60), (1, 2)]:
        # reference library: scipy.stats.binomtest(...).proportion_ci(method="wilson")
        ref = binomtest(k, n).proportion_ci(confidence_level=0.95, method="wilson")
        lo, hi = tool.wilson(k, n)
        assert abs(lo - ref.low) < 1e-12 and abs(hi - ref.high) < 1e-12, (k, n)
    # by hand (Wilson's formula): none of 10 killed → upper edge z²/(n + z²),
    # z = 1.959964 → 3.841459 / 13.841459 = 0.277533
    assert abs(tool.wilson(0, 10)[1] - 0.277533) < 1e-6


def test_stratified_share_and_interval_by_hand():
    tool = _tool()
    # Cochran, Sampling Techniques (3rd ed.), ch. 5: p_st = Σ W_h p_h,
    # v = Σ W_h² (1 − n_h/N_h) p_h q_h / (n_h − 1).  By hand for two strata:
    # A: N 300, n 30, 27 killed → W 0.75, p 0.9; B: N 100, n 20, 18 killed → W 0.25, p 0.9
    # p_st = 0.75·0.9 + 0.25·0.9 = 0.9
    # v = 0.5625·0.9·0.09/29 + 0.0625·0.8·0.09/19 = 0.0015711207 + 0.0002368421
    #   = 0.0018079628 → se 0.0425201
    est = tool.stratified([(300, 30, 27), (100, 20, 18)])
    assert abs(est["share"] - 0.9) < 1e-12
    assert abs(est["se"] - 0.0425201) < 1e-6
    assert abs(est["low"] - (0.9 - 1.959964 * 0.0425201)) < 1e-5
    # a module run whole adds its exact share and no variance: 3420 of 3475 and 90 of 100
    # whole → (3420 + 90) / 3575, standard error 0
    whole = tool.stratified([(3475, 3475, 3420), (100, 100, 90)])
    assert abs(whole["share"] - 3510 / 3575) < 1e-12 and whole["se"] == 0.0


def test_estimate_reads_the_sampled_modules_and_the_codes_of_the_run(tmp_path, capsys):
    import json
    tool = _tool()
    meta = tmp_path / "m" / "mutants" / "specgen" / "checks" / "m.py.meta"
    meta.parent.mkdir(parents=True)
    codes = {f"specgen.checks.m.x_f__mutmut_{i}": None for i in range(1, 101)}   # 100 made
    for i in range(1, 11):                    # 10 drawn: 8 killed at the run, 2 survived
        codes[f"specgen.checks.m.x_f__mutmut_{i}"] = 1 if i <= 8 else 0
    # a recheck with a test written from one survivor: killed now, survived at the run
    codes["specgen.checks.m.x_f__mutmut_9"] = 1
    meta.write_text(json.dumps({"exit_code_by_key": codes,
                                "exit_code_at_run": {"specgen.checks.m.x_f__mutmut_9": 0}}))
    now = tool.estimate("checks", tmp_path, exact=["whole=45/50"])
    run = tool.estimate("checks", tmp_path, exact=["whole=45/50"], as_run=True)
    capsys.readouterr()
    # by hand: N = 100 + 50; now (100/150)·0.9 + (50/150)·0.9 = 0.9; at the run
    # (100/150)·0.8 + (50/150)·0.9 = 0.83333
    assert now["mutants"] == 150 and abs(now["share"] - 0.9) < 1e-12
    assert abs(run["share"] - (2 / 3 * 0.8 + 1 / 3 * 0.9)) < 1e-12
    # the whole module adds no variance: v = (2/3)²·(1 − 10/100)·0.8·0.2/9 = 0.0071111
    assert abs(run["se"] - 0.0071111 ** 0.5) < 1e-6


def test_each_whole_result_file_runs_against_its_own_module_unlisted():
    """A check module's own ``tests/test_whole_<module>.py`` is in its selection and in the
    scope's list without being written into CHECK_TESTS_BY_MODULE; every such file is named
    after a check module that exists (a misspelt one would never run against any mutant)."""
    tool = _tool()
    root = TOOL.parent.parent
    whole = sorted(root.glob("tests/test_whole_*.py"))
    assert whole, "no whole-result test file found"
    for f in whole:
        module = f.stem.removeprefix("test_whole_")
        assert (root / "specgen" / "checks" / f"{module}.py").exists(), f.name
        rel = f"tests/{f.name}"
        assert rel in tool.module_test_files(module)
        assert rel in tool.CHECK_TESTS
    # a module without such a file keeps exactly its listed files
    assert tool.module_test_files("colour_checks") == ["tests/test_compatibility_checks.py"]
