"""Command line: parse arguments, call one library function, render the result.

Exit codes: 0 success, 1 bad data or a runtime error, 2 usage error, 130 interrupted.
Errors are one sentence on stderr; ``--debug`` adds the traceback.
"""

from __future__ import annotations

import argparse
import os
import sys
import traceback
import warnings
from collections.abc import Sequence
from pathlib import Path

from typing import TYPE_CHECKING

from ..errors import SeedsortError, SeedsortWarning
from ..review import REVIEW_ORDERS
from . import _interrupt

if TYPE_CHECKING:
    from ..sorting import SortSettings
    from ._report import Reporter

# The library (scikit-learn, pandas) is imported inside each command, so '--help' and usage
# errors answer at once. Kept equal to seedsort.vectors.VECTOR_MODES by a test.
VECTOR_MODES = ("tfidf", "hashed", "embed")
#: seedsort.graph_approx.AUTO_APPROXIMATE_ABOVE, for the help text (a test keeps them equal).
APPROXIMATE_ABOVE = 15_000

EXIT_OK, EXIT_DATA, EXIT_USAGE, EXIT_INTERRUPTED = 0, 1, 2, 130

SORT_EXAMPLES = """\
examples:
  seedsort sort corpora_demo/documents --seeds corpora_demo/seeds.csv
  seedsort sort corpora_demo/documents          # again, with every label recorded so far
  seedsort sort tickets.csv --text-column description --label-column category
  seedsort sort inbox/ --examples hand-sorted/ --out results.jsonl
  seedsort sort notes/ --seeds labels.csv --stem english --show 40

The labels file is a CSV with the header 'document,category'; document is a
document id (as written in the results file) or a path to the file.

Each run is remembered in a workspace file beside the collection
(<folder>.seedsort.sqlite): the documents, every label given (seed files,
examples, reviews) and each run's results. Later runs use every label recorded,
so --seeds is only needed when there are new ones.
"""


REVIEW_EXAMPLES = """\
examples:
  seedsort review corpora_demo/documents
  seedsort review corpora_demo/documents --order suggested
  seedsort review corpora_demo/documents --category lost_property
  seedsort review corpora_demo/documents --order seeds     # audit the seeds themselves
  printf 'a\\n2\\nq\\n' | seedsort review corpora_demo/documents   # scripted

Run 'seedsort sort' on the collection first; afterwards run it again (no --seeds
needed) to write the results file with your corrections.
"""

EXPORT_EXAMPLES = """\
examples:
  seedsort export corpora_demo/documents --out results.parquet
  seedsort export corpora_demo/documents --history labels-history.csv
  seedsort export corpora_demo/documents --copy-to sorted/ --dry-run
  seedsort export corpora_demo/documents --copy-to sorted/
"""

SUGGEST_EXAMPLES = """\
examples:
  seedsort suggest corpora_demo/documents
  seedsort suggest corpora_demo/documents --count 40 --out to-label.csv
"""


class _Parser(argparse.ArgumentParser):
    """argparse that reports a usage error as one line and exit code 2."""

    def error(self, message: str) -> None:  # type: ignore[override]
        self.exit(EXIT_USAGE, f"seedsort: usage error: {message} (see '{self.prog} --help')\n")


def _fraction(text: str) -> float:
    value = float(text)
    if not 0.0 <= value <= 1.0:
        raise argparse.ArgumentTypeError(f"must be between 0 and 1, got {text}")
    return value


def _alpha(text: str) -> float:
    value = float(text)
    if not 0.0 <= value < 1.0:
        raise argparse.ArgumentTypeError(f"must be at least 0 and below 1, got {text}")
    return value


def _positive(text: str) -> int:
    value = int(text)
    if value < 1:
        raise argparse.ArgumentTypeError(f"must be a positive whole number, got {text}")
    return value


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="seedsort",
        description="Categorise a pile of documents from a few hand-labelled seeds. Runs offline.",
    )
    parser.add_argument("--version", action="version", version=f"seedsort {_version()}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    sort = commands.add_parser(
        "sort",
        help="categorise every document of a folder or file from seed labels",
        description=(
            "Read documents (.txt .md .html .eml .mbox .csv .tsv .jsonl, folders recursively), "
            "spread the seed labels over a neighbour graph, write one result row per document "
            "and show a report with the least confident first."
        ),
        epilog=SORT_EXAMPLES,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    sort.add_argument("path", help="folder (read recursively) or single file of documents")
    seeds = sort.add_argument_group("seed labels (needed on the first run; later runs reuse the recorded ones)")
    seeds.add_argument("--seeds", metavar="FILE", help="labels CSV with header 'document,category'")
    seeds.add_argument("--examples", metavar="DIR", help="folder of examples, one subfolder per category")
    seeds.add_argument("--label-column", metavar="NAME", help="column of a CSV/TSV/JSONL input holding seed labels")
    tables = sort.add_argument_group("tables (.csv .tsv .jsonl)")
    tables.add_argument("--text-column", metavar="NAME", action="append",
                        help="column with the text; repeat to join several (default: guessed)")
    tables.add_argument("--id-column", metavar="NAME", help="column with a document id (default: guessed)")
    out = sort.add_argument_group("output")
    out.add_argument("--out", metavar="FILE", default="seedsort-results.csv",
                     help="results file, .csv or .jsonl (default: %(default)s)")
    out.add_argument("--show", metavar="N", type=int, default=10,
                     help="how many of the least confident documents to list (default: %(default)s)")
    out.add_argument("--quiet", action="store_true", help="no progress bars, only the summary")
    out.add_argument("--workspace", metavar="FILE",
                     help="workspace file (default: <folder or file>.seedsort.sqlite beside the collection)")
    out.add_argument("--no-workspace", action="store_true",
                     help="remember nothing: no workspace is read or written")
    method = sort.add_argument_group("method (defaults are measured; see README)")
    method.add_argument("--vectors", choices=VECTOR_MODES, default="tfidf",
                        help="n-gram TF-IDF with a vocabulary (default), hashed n-grams for huge "
                        "collections, or sentence embeddings (needs: pip install \"seedsort[embed]\")")
    method.add_argument("--embedding-cache", metavar="FILE",
                        help="with --vectors embed: cache file of embeddings per document content "
                        "(default: beside the workspace, <workspace>.embeddings.npz; with "
                        "--no-workspace beside the results)")
    method.add_argument("--stem", metavar="LANGUAGE", help="Snowball stemming for a language, e.g. english")
    method.add_argument("--neighbours", metavar="K", type=_positive, default=10,
                        help="neighbours per document in the graph (default: %(default)s)")
    method.add_argument("--graph", choices=("auto", "exact", "approximate"), default="auto",
                        help="neighbour search: exact, approximate (faster on large collections), "
                        f"or auto: approximate above {APPROXIMATE_ABOVE:,} documents (default: %(default)s)")
    method.add_argument("--alpha", type=_alpha, default=0.99,
                        help="how far labels spread, 0 to <1 (default: %(default)s)")
    method.add_argument("--graph-weight", metavar="W", type=_fraction, default=None,
                        help="weight of the graph against the seed classifier, 0 to 1 "
                        "(default: chosen per run by cross-validation on the seeds)")
    method.add_argument("--out-of-scope-quantile", metavar="Q", type=_fraction, default=0.95,
                        help="leave unassigned the documents less typical than this share of "
                        "held-out seeds (default: %(default)s)")
    method.add_argument("--assign-all", action="store_true",
                        help="give every reachable document a category, even if it fits none well")
    method.add_argument("--class-mass", action="store_true",
                        help="class mass normalisation: keep category sizes near the seeds' shares")
    sort.add_argument("--debug", action="store_true", help="show tracebacks on errors")

    review = commands.add_parser(
        "review",
        help="check doubtful documents one by one; each decision is saved at once",
        description=(
            "Go through the documents of the last run one at a time: accept the proposed "
            "category, pick another, mark it as fitting none, skip or undo. Decisions are saved "
            "in the workspace the moment they are made and become seeds; every few decisions "
            "the labels re-spread and the queue reorders. Single keys on a terminal (press ? "
            "for the keys), one command per line otherwise."
        ),
        epilog=REVIEW_EXAMPLES,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    _workspace_arguments(review)
    review.add_argument("--order", choices=REVIEW_ORDERS, default="margin",
                        help="margin: closest calls first (default); suggested: the labels that would "
                        "help the run most; category: one category's members (with --category); "
                        "seeds: seeds whose label a held-out model disputes")
    review.add_argument("--category", metavar="NAME", help="review the members of this category (implies --order category)")
    review.add_argument("--limit", metavar="N", type=_positive, default=200,
                        help="documents in the queue at a time (default: %(default)s)")
    review.add_argument("--refresh-every", metavar="N", type=_positive, default=5,
                        help="re-spread the labels after this many decisions (default: %(default)s)")
    review.add_argument("--debug", action="store_true", help="show tracebacks on errors")

    suggest = commands.add_parser(
        "suggest",
        help="list the documents whose labels would improve the run most",
        description=(
            "Propose documents to label next: uncertain ones in dense parts of the graph and "
            "parts no seed reaches yet, spread across categories, no two near-duplicates. "
            "Label them in 'seedsort review --order suggested', or fill in the category "
            "column of the --out file and pass it to 'seedsort sort --seeds'."
        ),
        epilog=SUGGEST_EXAMPLES,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    _workspace_arguments(suggest)
    suggest.add_argument("--count", metavar="N", type=_positive, default=20, help="how many (default: %(default)s)")
    suggest.add_argument("--out", metavar="FILE",
                         help="also write them as a labels CSV with an empty category column to fill in")
    suggest.add_argument("--debug", action="store_true", help="show tracebacks on errors")

    export = commands.add_parser(
        "export",
        help="write the latest results, the label history, or copies sorted into category folders",
        description=(
            "Export a workspace's current state: every document's category with all decisions "
            "so far (as CSV, JSON Lines or Parquet), the full label history, and/or a copy of "
            "each categorised document in one folder per category (copies only: sources are "
            "never moved or changed, nothing existing is overwritten)."
        ),
        epilog=EXPORT_EXAMPLES,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    _workspace_arguments(export)
    export.add_argument("--out", metavar="FILE", help="results file: .csv, .jsonl or .parquet (Parquet needs seedsort[parquet])")
    export.add_argument("--history", metavar="FILE", help="label history file: .csv, .jsonl or .parquet")
    export.add_argument("--copy-to", metavar="DIR", help="copy each categorised document into DIR/<category>/")
    export.add_argument("--dry-run", action="store_true", help="with --copy-to: list what would be copied, write nothing")
    export.add_argument("--debug", action="store_true", help="show tracebacks on errors")
    return parser


def _workspace_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("path", nargs="?", help="the collection given to 'seedsort sort' (its workspace is used)")
    parser.add_argument("--workspace", metavar="FILE",
                        help="the workspace file (default: <folder or file>.seedsort.sqlite beside the collection)")


def _version() -> str:
    from .. import __version__

    return __version__


def _default_embedding_cache(args: argparse.Namespace) -> str:
    """Beside the workspace (one per collection), or beside the results without one."""
    if args.no_workspace:
        return str(Path(args.out).with_suffix(".embeddings.npz"))
    from ..workspace import default_workspace_path

    workspace = Path(args.workspace or default_workspace_path(args.path))
    return str(workspace.with_name(workspace.name + ".embeddings.npz"))


def _settings(args: argparse.Namespace) -> SortSettings:
    from ..combine import ModelSettings
    from ..sorting import SortSettings
    from ..vectors import VectorSettings

    return SortSettings(
        vectors=VectorSettings(
            mode=args.vectors,
            stem_language=args.stem,
            embedding_cache=(args.embedding_cache or _default_embedding_cache(args)) if args.vectors == "embed" else None,
        ),
        neighbours=args.neighbours,
        graph=args.graph,
        out_of_scope_quantile=None if args.assign_all else args.out_of_scope_quantile,
        model=ModelSettings(
            alpha=args.alpha, graph_weight=args.graph_weight, class_mass_normalisation=args.class_mass
        ),
    )


def _run_sort(args: argparse.Namespace, reporter: Reporter) -> int:
    from ..results import result_format, write_results
    from ..sorting import sort_folder
    from ..sources import TableColumns
    from ..workflow import sort_into_workspace

    from ..workspace import default_workspace_path

    workspace = None if args.no_workspace else Path(args.workspace or default_workspace_path(args.path))
    if not (args.seeds or args.examples or args.label_column) and (workspace is None or not workspace.exists()):
        raise _UsageError("give seed labels with --seeds FILE, --examples DIR or --label-column NAME")
    result_format(args.out)  # fail before the work, not after it
    columns = TableColumns(
        text=tuple(args.text_column) if args.text_column else None,
        id=args.id_column,
        label=args.label_column,
    )
    with warnings.catch_warnings(record=True) as caught, reporter.progress() as on_progress:
        warnings.simplefilter("always", SeedsortWarning)
        options = dict(
            seeds_file=args.seeds, examples_folder=args.examples, columns=columns,
            settings=_settings(args), on_progress=on_progress,
        )
        if workspace is None:
            result, run = sort_folder(args.path, **options), None  # type: ignore[arg-type]
        else:
            run = sort_into_workspace(args.path, workspace=workspace, **options)  # type: ignore[arg-type]
            result = run.result
    written = write_results(result, args.out)
    _WRITTEN.append(written)
    own = [str(w.message) for w in caught if issubclass(w.category, SeedsortWarning)]
    reporter.sort_report(result, written=written, warnings=own, show=args.show, source=args.path)
    if run is not None:
        reporter.workspace_report(run, source=args.path)
    sys.stdout.flush()  # a closed pipe shows up here, inside the error boundary
    return EXIT_OK


def _require_workspace_target(args: argparse.Namespace) -> None:
    """review, suggest and export work on a workspace: named directly or by its collection."""
    if args.path is None and args.workspace is None:
        raise _UsageError("give the collection (as given to 'seedsort sort') or --workspace FILE")


def _open_session(args: argparse.Namespace, reporter: Reporter, *, order: str, category: str | None, limit: int):  # type: ignore[no-untyped-def]
    from ..workflow import open_review

    _require_workspace_target(args)
    with reporter.progress() as on_progress:
        return open_review(
            args.path, workspace=args.workspace, order=order, category=category, limit=limit, on_progress=on_progress
        )


def _run_review(args: argparse.Namespace, reporter: Reporter) -> int:
    from ._review import run_review

    order = "category" if args.category else args.order
    if order == "category" and not args.category:
        raise _UsageError("--order category needs --category NAME")
    with _open_session(args, reporter, order=order, category=args.category, limit=args.limit) as session:
        if not session.queue():
            reporter.out.print(f"Nothing to review in this order ({order}); workspace: {session.location}")
            return EXIT_OK
        outcome = run_review(session, console=reporter.out, refresh_every=args.refresh_every, stdin=sys.stdin)
        if outcome.pending_refresh:
            session.refresh()
        reporter.review_summary(outcome, session.location, args.path)
    return EXIT_OK


def _run_suggest(args: argparse.Namespace, reporter: Reporter) -> int:
    from ..workflow import write_suggestions

    with _open_session(args, reporter, order="suggested", category=None, limit=args.count) as session:
        items = session.queue()
        written = write_suggestions(items, args.out) if args.out else None
        reporter.suggestions(items, written=written, location=session.location, source=args.path)
    return EXIT_OK


def _run_export(args: argparse.Namespace, reporter: Reporter) -> int:
    from ..export import copy_into_category_folders, write_label_history
    from ..results import result_format, write_results
    from ..workflow import current_state

    if not (args.out or args.history or args.copy_to):
        raise _UsageError("say what to export: --out FILE, --history FILE and/or --copy-to DIR")
    if args.dry_run and not args.copy_to:
        raise _UsageError("--dry-run goes with --copy-to")
    _require_workspace_target(args)
    for target in (args.out, args.history):
        if target:
            result_format(target)  # fail before the work, not after it
    with reporter.progress() as on_progress:
        state = current_state(args.path, workspace=args.workspace, on_progress=on_progress)
        written = []
        if args.out:
            written.append(("results", write_results(state.result, args.out), len(state.result)))
            _WRITTEN.append(written[-1][1])
        if args.history:
            written.append(("label history", write_label_history(state.history, args.history), len(state.history)))
            _WRITTEN.append(written[-1][1])
        plan = None
        if args.copy_to:
            plan = copy_into_category_folders(
                state.result, state.root or None, args.copy_to, dry_run=args.dry_run, texts=state.texts,
                on_progress=on_progress,
            )
    reporter.export_report(written, plan)
    return EXIT_OK


_RUNNERS = {"sort": _run_sort, "review": _run_review, "suggest": _run_suggest, "export": _run_export}


class _UsageError(Exception):
    pass


#: Files this command has written in full so far: what an interrupt's message must not deny
#: (Ctrl-C can land while the report is drawn, after the results file is complete).
_WRITTEN: list[Path] = []


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``seedsort`` command; returns the exit code."""
    try:
        with _interrupt.recorded():
            return _main(argv)
    except KeyboardInterrupt:  # pressed before the command began (parsing, imports)
        print("seedsort: interrupted.", file=sys.stderr)
        return EXIT_INTERRUPTED


def _main(argv: Sequence[str] | None) -> int:
    _WRITTEN.clear()
    parser = build_parser()
    args = parser.parse_args(argv)
    if args.command is None:
        parser.print_help(sys.stderr)
        return EXIT_USAGE
    try:
        from ._report import Reporter

        reporter = Reporter(quiet=getattr(args, "quiet", False))
        return _RUNNERS[args.command](args, reporter)
    except _UsageError as exc:
        print(f"seedsort: usage error: {exc} (see 'seedsort {args.command} --help')", file=sys.stderr)
        return EXIT_USAGE
    except SeedsortError as exc:
        if args.debug:
            traceback.print_exc()
        print(f"seedsort: error: {exc}", file=sys.stderr)
        return EXIT_DATA
    except BrokenPipeError:
        # The reader of the report went away (`seedsort sort ... | head`): the results file
        # is already written, so stop quietly, as command-line filters do.
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return EXIT_OK
    except KeyboardInterrupt:
        return _interrupted()
    except OSError as exc:
        if _interrupt.pressed():  # Ctrl-C came out as another error (see _interrupt)
            return _interrupted()
        if args.debug:
            traceback.print_exc()
        where = f" ({exc.filename})" if getattr(exc, "filename", None) else ""
        print(f"seedsort: error: {exc.strerror or exc}{where}.", file=sys.stderr)
        return EXIT_DATA
    except Exception as exc:  # the one boundary: anything else is our bug
        if _interrupt.pressed():  # Ctrl-C came out as another error (see _interrupt)
            return _interrupted()
        if args.debug:
            traceback.print_exc()
        print(
            f"seedsort: internal error: {type(exc).__name__}: {exc} (run again with --debug "
            "for the traceback, and report it)",
            file=sys.stderr,
        )
        return EXIT_DATA


def _interrupted() -> int:
    done = (f"already written in full: {', '.join(str(path) for path in _WRITTEN)}" if _WRITTEN
            else "no results file was written")
    print(f"seedsort: interrupted; {done} (the workspace keeps every decision saved before).",
          file=sys.stderr)
    return EXIT_INTERRUPTED


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
