"""seedsort: categorise a pile of documents from a few hand-labelled seeds, offline.

Pipeline: files -> documents (:mod:`seedsort.sources`) -> vectors (:mod:`seedsort.vectors`)
-> cosine kNN graph (:mod:`seedsort.graph`) -> label spreading (:mod:`seedsort.spreading`)
blended with a seed classifier (:mod:`seedsort.combine`) -> results (:mod:`seedsort.results`).
Runs that remember documents, decisions and results live in a workspace
(:mod:`seedsort.workspace`, :mod:`seedsort.workflow`).

Names are imported on first use (PEP 562), so ``import seedsort.workspace`` or the command's
``--help`` does not pay for scikit-learn.
"""

from __future__ import annotations

import importlib
from typing import Any

__version__ = "0.1.0"

_EXPORTS = {
    "Collection": "sources",
    "Document": "sources",
    "TableColumns": "sources",
    "read_collection": "sources",
    "InputError": "errors",
    "SeedError": "errors",
    "SeedsortError": "errors",
    "SeedsortWarning": "errors",
    "SpreadingNotConvergedWarning": "errors",
    "ModelSettings": "combine",
    "SortResult": "results",
    "write_results": "results",
    "SeedSet": "seeds",
    "resolve_seeds": "seeds",
    "SortSettings": "sorting",
    "sort_documents": "sorting",
    "sort_folder": "sorting",
    "VectorSettings": "vectors",
    "vectorise": "vectors",
    "Workspace": "workspace",
    "open_review": "workflow",
    "sort_into_workspace": "workflow",
}

__all__ = sorted(_EXPORTS)


def __getattr__(name: str) -> Any:
    module = _EXPORTS.get(name)
    if module is None:
        raise AttributeError(f"module 'seedsort' has no attribute {name!r}")
    value = getattr(importlib.import_module(f".{module}", __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted([*globals(), *__all__])
