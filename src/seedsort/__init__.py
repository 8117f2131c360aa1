"""seedsort: categorise a pile of documents from a few hand-labelled seeds, offline.

Pipeline: files -> documents (:mod:`seedsort.sources`) -> vectors (:mod:`seedsort.vectors`)
-> cosine kNN graph (:mod:`seedsort.graph`) -> label spreading (:mod:`seedsort.spreading`)
blended with a seed classifier (:mod:`seedsort.combine`) -> results (:mod:`seedsort.results`).
"""

from __future__ import annotations

from .combine import ModelSettings
from .errors import (
    InputError,
    SeedError,
    SeedsortError,
    SeedsortWarning,
    SpreadingNotConvergedWarning,
)
from .results import SortResult, write_results
from .seeds import SeedSet, resolve_seeds
from .sorting import SortSettings, sort_documents, sort_folder
from .sources import Collection, Document, TableColumns, read_collection
from .vectors import VectorSettings, vectorise

__version__ = "0.1.0"

__all__ = [
    "Collection",
    "Document",
    "InputError",
    "ModelSettings",
    "SeedError",
    "SeedSet",
    "SeedsortError",
    "SeedsortWarning",
    "SortResult",
    "SortSettings",
    "SpreadingNotConvergedWarning",
    "TableColumns",
    "VectorSettings",
    "read_collection",
    "resolve_seeds",
    "sort_documents",
    "sort_folder",
    "vectorise",
    "write_results",
]
