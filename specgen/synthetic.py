"""Synthetic projects for benchmarks and scale tests (invented data, deterministic)."""
from __future__ import annotations

import math
import random
import shutil
from pathlib import Path

from specgen.refdata import CONTENT_DIR

AGES_D = (1, 3, 7, 14, 28, 56, 90, 180)


def _strength(age_d: float, f_a: float, f_s: float) -> float:
    # a fast aluminate part and a slow silicate part, as natural cements show
    return f_a * (1 - math.exp(-age_d / 0.5)) + f_s * (1 - math.exp(-((age_d / 40) ** 0.8)))


def write_project(root: Path, mixes: int, specimens: int = 3, ages=AGES_D, rng_state: int = 1) -> Path:
    """A valid project with ``mixes`` mixes, each tested at ``ages`` with ``specimens`` each."""
    rng = random.Random(rng_state)
    root = Path(root)
    if root.exists():
        shutil.rmtree(root)
    shutil.copytree(CONTENT_DIR / "starter", root)
    mix_lines = ["mixes:"]
    rows = ["specimen,mix,age [d],test,value [MPa],curing_temperature [degC]"]
    for m in range(1, mixes + 1):
        mid = f"M{m}"
        mix_lines.append(f"  - {{id: {mid}, name: \"Synthetic mix {m}\", binders: [{{binder: B1, parts: 1}}], "
                         f"sands: [{{sand: S1, parts: {1.5 + (m % 4) * 0.5}}}], water_binder_ratio: 0.6}}")
        f_a, f_s = rng.uniform(0.6, 1.6), rng.uniform(3.0, 9.0)
        for age in ages:
            for k in range(specimens):
                value = _strength(age, f_a, f_s) * (1 + rng.gauss(0, 0.06))
                rows.append(f"{mid}-{age}-{k},{mid},{age},compressive,{max(value, 0.05):.3f},20")
    (root / "mixes.yaml").write_text("\n".join(mix_lines) + "\n", encoding="utf-8")
    (root / "lab" / "strength.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    dossier = (root / "dossier.yaml").read_text(encoding="utf-8")
    (root / "dossier.yaml").write_text(dossier.replace("candidates: [M1]", "candidates: [M1, M2]"
                                                       if mixes > 1 else "candidates: [M1]"),
                                       encoding="utf-8")
    # the synthetic strengths may fail a check of the starter's chosen mix: say why it stands
    spec = root / "specification.yaml"
    spec.write_text(spec.read_text(encoding="utf-8").replace(
        "  - zone: Z1\n    mix: M1\n", "  - zone: Z1\n    mix: M1\n    justification: >-\n"
        "      A synthetic project for benchmarks: the choice is no design decision.\n", 1),
        encoding="utf-8")
    return root
