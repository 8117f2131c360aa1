"""Rendering with rich: progress bars on stderr, the run report on stdout.

Plain text (no colour, no styles, ASCII bars and boxes) when stdout is not a terminal or
NO_COLOR is set, so the report pipes cleanly into files and other tools.
"""

from __future__ import annotations

import math
import os
import sys
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

from rich import box
from rich.console import Console
from rich.filesize import decimal
from rich.progress import (
    BarColumn,
    MofNCompleteColumn,
    Progress,
    ProgressColumn,
    Task,
    TextColumn,
    TimeElapsedColumn,
    TimeRemainingColumn,
)
from rich.table import Table
from rich.text import Text

from .._progress import ProgressCallback
from ._interrupt import check as check_interrupt
from typing import TYPE_CHECKING

from ..review import ReviewItem
from ._review import ReviewOutcome

if TYPE_CHECKING:  # the report only reads these; importing them would load scikit-learn
    from ..export import CopyPlan
    from ..results import SortResult
    from ..workflow import WorkspaceRun

#: The statuses of seedsort.results.STATUSES, counted in the report's header.
STATUSES = ("seed", "assigned", "out_of_scope", "unreached", "empty", "no_category")

STAGE_NAMES = {
    "read": "reading files",
    "vectors": "building vectors",
    "embedding": "embedding texts",
    "graph": "neighbour graph",
    "spread": "spreading labels",
    "cross-check": "checking seeds",
    "nearest seeds": "nearest examples",
}
BAR_CELLS = 10
#: Stages whose progress counts bytes (shown as sizes), not items.
BYTE_STAGES = frozenset({"read"})


class _DoneOfTotal(ProgressColumn):
    """``done/total`` of a stage: items as numbers, bytes as sizes (``12.3/45.6 MB``)."""

    def __init__(self) -> None:
        super().__init__()
        self._items = MofNCompleteColumn()

    def render(self, task: Task) -> Text:
        if not task.fields.get("in_bytes"):
            return self._items.render(task)
        total = "?" if task.total is None else decimal(int(task.total))
        return Text(f"{decimal(int(task.completed))}/{total}", style="progress.download")


def _raise_broken_pipe() -> None:
    raise BrokenPipeError


class Reporter:
    """Turns library results and progress into terminal output."""

    def __init__(self, *, quiet: bool = False, out: Console | None = None, err: Console | None = None) -> None:
        plain = bool(os.environ.get("NO_COLOR")) or not sys.stdout.isatty()
        self.plain = plain
        self.out = out or Console(
            highlight=False, emoji=False, color_system=None if plain else "auto",
            no_color=plain, force_terminal=False if plain else None, soft_wrap=False,
        )
        self.err = err or Console(stderr=True, highlight=False, emoji=False)
        # rich exits with status 1 on a closed pipe; let the CLI's error boundary decide.
        self.out.on_broken_pipe = _raise_broken_pipe  # type: ignore[method-assign]
        self.quiet = quiet

    @contextmanager
    def progress(self) -> Iterator[ProgressCallback]:
        """A progress callback drawing one bar per stage (silent off a terminal or with --quiet)."""
        # Every report also checks for a Ctrl-C that a callback swallowed (see _interrupt).
        if self.quiet or not self.err.is_terminal:
            yield lambda stage, done, total: check_interrupt()
            return
        bars = Progress(
            TextColumn("{task.description:<18}"), BarColumn(), _DoneOfTotal(),
            TimeElapsedColumn(), TextColumn("eta"), TimeRemainingColumn(),
            console=self.err, transient=True,
        )
        tasks: dict[str, int] = {}

        def update(stage: str, done: int, total: int | None) -> None:
            check_interrupt()
            if stage not in tasks:
                tasks[stage] = bars.add_task(STAGE_NAMES.get(stage, stage), total=total, in_bytes=stage in BYTE_STAGES)
            bars.update(tasks[stage], completed=done, total=total)

        with bars:
            yield update

    # -- the report ---------------------------------------------------------------------

    def _bar(self, value: float) -> Text:
        filled = 0 if math.isnan(value) else round(value * BAR_CELLS)
        if self.plain:
            return Text("#" * filled + "-" * (BAR_CELLS - filled))
        colour = "green" if value >= 0.8 else "yellow" if value >= 0.5 else "red"
        return Text("█" * filled, style=colour) + Text("░" * (BAR_CELLS - filled), style="dim")

    def _table(self, *columns: str) -> Table:
        table = Table(box=box.ASCII if self.plain else box.SIMPLE_HEAD, pad_edge=False, show_edge=False)
        for i, name in enumerate(columns):
            if i == 0:  # long category names give way to the numbers, never the reverse
                others = sum(len(c) for c in columns[1:]) + 3 * (len(columns) - 1) + 1
                table.add_column(name, no_wrap=True, overflow="ellipsis", max_width=max(12, self.out.width - others))
            else:
                table.add_column(name, justify="right", no_wrap=True, min_width=len(name))
        return table

    def sort_report(
        self, result: SortResult, *, written: Path, warnings: list[str], show: int, source: str
    ) -> None:
        out = self.out
        n = len(result)
        counts = {s: int((result.status == s).sum()) for s in STATUSES}
        out.print(
            Text.assemble(
                ("seedsort", "bold"),
                f": {n} documents from {source}, {counts['seed']} seeds in "
                f"{len(result.categories)} categories",
            )
        )
        approximate = " (approximate search)" if result.settings.get("graph") == "approximate" else ""
        out.print(Text(f"method: {result.settings.get('vectors')}; {result.settings.get('neighbours')}-NN{approximate} "
                       f"graph; spreading alpha {result.settings.get('alpha')} blended with a seed "
                       f"classifier (graph weight {result.settings.get('graph_weight'):.1f}"
                       f"{', chosen from the seeds' if result.settings.get('graph_weight_tuned') else ''})",
                       style="dim"))
        threshold = result.settings.get("out_of_scope_threshold")
        if threshold is not None:
            quantile = result.settings.get("out_of_scope_quantile")
            out.print(Text(f"out of scope above score {threshold:.2f} (quantile {quantile:g} of the "
                           "held-out seeds' scores)", style="dim"))
        out.print()

        table = self._table("category", "docs", "share", "seeds", "conf.", "est.*")
        for row in result.summary():
            conf = "-" if math.isnan(row.mean_confidence) else f"{row.mean_confidence:.0%}"
            est = "-" if math.isnan(row.estimated_accuracy) else f"{row.estimated_accuracy:.0%}"
            table.add_row(row.category, str(row.documents), f"{row.share:.0%}", str(row.seeds), conf, est)
        unassigned = n - counts["seed"] - counts["assigned"]
        if unassigned:
            table.add_row("(unassigned)", str(unassigned), f"{unassigned / max(1, n):.0%}", "", "", "")
        out.print(table)
        if result.estimated_accuracy is not None:
            checked = int((result.cross_checked >= 0).sum())
            out.print(
                f"conf.: mean confidence of the categorised documents. est.*: estimated accuracy, "
                f"{result.estimated_accuracy:.0%} overall; an estimate from {checked} seeds, each "
                "predicted by a model that did not see it, not a measurement."
            )
        out.print()

        doubtful = result.doubtful()
        if doubtful.size and show > 0:
            shown = doubtful[:show]
            out.print(Text(f"Least confident first ({len(shown)} of {doubtful.size} categorised documents)", style="bold"))
            for row in shown:
                self._assignment(result, int(row))
            out.print()

        self._unassigned(result)
        self._mislabels(result)
        if result.skipped:
            out.print(Text(f"Skipped {len(result.skipped)} file(s):", style="bold"))
            for item in result.skipped[:20]:
                out.print(f"  {item.path}: {item.reason}")
            if len(result.skipped) > 20:
                out.print(f"  ... and {len(result.skipped) - 20} more")
        for note in [*result.notes, *warnings]:
            out.print(Text(f"note: {note}", style="dim"))
        out.print(f"Results: {written} ({n} rows)")

    def workspace_report(self, run: WorkspaceRun, *, source: str) -> None:
        """Where the run was remembered, what changed since the last one, and what to do next."""
        out = self.out
        parts = [f"run {run.run_id}"]
        if run.sync is not None:
            sync = run.sync
            parts.append(f"documents: {sync.new} new, {sync.changed} changed, {sync.unchanged} unchanged, {sync.gone} gone")
        parts.append(f"{run.labels_added} label(s) added")
        parts.append("vectors and graph reused" if run.graph_cached else "vectors and graph built and cached")
        out.print(Text(f"Workspace: {run.workspace} ({'; '.join(parts)})"), overflow="fold")
        if run.stale:
            out.print(Text(
                f"{len(run.stale)} labelled document(s) changed after they were labelled; their labels are kept, "
                "check them first in the review:", style="bold"))
            for doc in run.stale[:10]:
                out.print(f"  {doc}")
            if len(run.stale) > 10:
                out.print(f"  ... and {len(run.stale) - 10} more")
        out.print(Text(f"Next: seedsort review {source}   (check the doubtful ones; decisions are saved as you go)",
                       style="dim"), overflow="fold")

    def export_report(self, written: list[tuple[str, Path, int]], plan: CopyPlan | None) -> None:
        out = self.out
        for what, path, rows in written:
            out.print(f"Written: {path} ({what}, {rows} rows)")
        if plan is None:
            return
        verb = "Would copy" if plan.dry_run else "Copied"
        out.print(Text(f"{verb} {len(plan.copies)} document(s) into {plan.destination}:", style="bold"))
        counts: dict[str, int] = {}
        for item in plan.copies:
            counts[item.category] = counts.get(item.category, 0) + 1
        for category, folder in plan.folders:
            out.print(f"  {folder}/  {counts.get(category, 0)}")
        if plan.dry_run:
            for item in plan.copies[:10]:
                out.print(Text(f"  {item.source or '(text of ' + item.document + ')'} -> {item.target}", style="dim"),
                          overflow="ellipsis", no_wrap=True)
            if len(plan.copies) > 10:
                out.print(Text(f"  ... and {len(plan.copies) - 10} more", style="dim"))
        if plan.conflicts:
            out.print(Text(f"{len(plan.conflicts)} target(s) exist already; the copy would stop before writing "
                           "anything. First ones:", style="bold"))
            for item in plan.conflicts[:10]:
                out.print(f"  {item.target}")
        if plan.left_out:
            reasons: dict[str, int] = {}
            for item in plan.left_out:
                reasons[item.reason] = reasons.get(item.reason, 0) + 1
            out.print(f"Left out {len(plan.left_out)} document(s):")
            for reason, count in sorted(reasons.items(), key=lambda kv: -kv[1]):
                out.print(f"  {count} {reason}")

    def review_summary(self, outcome: ReviewOutcome, location: str, source: str | None) -> None:
        kept = outcome.decided - outcome.undone
        self.out.print(
            f"Reviewed: {kept} decision(s) kept ({outcome.undone} undone), {outcome.skipped} skipped; "
            f"labels re-spread {outcome.refreshes} time(s). Saved in {location}."
        )
        target = source or f"--workspace {location}"
        self.out.print(Text(f"Next: seedsort sort {target}   (writes the results file with your corrections)",
                            style="dim"), overflow="fold")

    def suggestions(self, items: list[ReviewItem], *, written: Path | None, location: str, source: str | None) -> None:
        out = self.out
        if not items:
            out.print("No documents to suggest: every document is a seed, empty or marked already.")
            return
        out.print(Text(f"Label these next ({len(items)}), most useful first:", style="bold"))
        for number, item in enumerate(items, 1):
            guess = item.category or "-"
            out.print(Text.assemble(f"{number:>3}. ", (item.id, "bold"), f"  guess {guess}", (f"  ({item.reason})", "dim")),
                      overflow="ellipsis", no_wrap=True)
            out.print(Text("     " + " ".join(item.text.split())[:200]), overflow="ellipsis", no_wrap=True)
        if written is not None:
            out.print(f"Written: {written} (fill in the category column, then: seedsort sort ... --seeds {written})")
        target = source or f"--workspace {location}"
        out.print(Text(f"Or label them one by one: seedsort review {target} --order suggested", style="dim"),
                  overflow="fold")

    def _assignment(self, result: SortResult, row: int) -> None:
        conf = float(result.confidence[row])
        runner = result.category_name(int(result.runner_up[row]))
        runner_p = float(result.probabilities[row, result.runner_up[row]]) if runner else 0.0
        head = Text.assemble(
            f"{conf:4.0%} ", self._bar(conf), " ",
            (result.categories[result.assigned[row]], "bold"),
            (f"  runner-up {runner} {runner_p:.0%}" if runner else "", "dim"),
        )
        self.out.print(head, overflow="ellipsis", no_wrap=True)
        self.out.print(Text(f"     {result.ids[row]}: {result.snippets[row]}"), overflow="ellipsis", no_wrap=True)
        for rank, (doc, cat, sim) in enumerate(result.nearest_seeds(row)):
            label = "nearest seeds" if rank == 0 else ""
            self.out.print(
                Text(f"     {label:<13} {sim:.2f} {cat}: {doc}", style="dim"), overflow="ellipsis", no_wrap=True
            )

    def _unassigned(self, result: SortResult) -> None:
        for status, title in (
            ("out_of_scope", "Unassigned: fits none of the seeded categories well"),
            ("unreached", "Unassigned: no seed reaches these documents through the graph"),
            ("empty", "Unassigned: empty documents"),
            ("no_category", "Unassigned: marked in a review as fitting no category"),
        ):
            rows = [i for i in range(len(result)) if result.status[i] == status]
            if status == "out_of_scope":
                rows.sort(key=lambda i: -float(result.out_of_scope[i]))
            if not rows:
                continue
            self.out.print(Text(f"{title} ({len(rows)}):", style="bold"))
            for i in rows[:20]:
                self.out.print(Text(f"  {result.ids[i]}: {result.snippets[i]}"), overflow="ellipsis", no_wrap=True)
            if len(rows) > 20:
                self.out.print(f"  ... and {len(rows) - 20} more (status '{status}' in the results file)")
            self.out.print()

    def _mislabels(self, result: SortResult) -> None:
        rows = [int(i) for i in result.possible_mislabel.nonzero()[0]]
        if not rows:
            return
        self.out.print(Text(f"Seeds that may be mislabelled ({len(rows)}):", style="bold"))
        for i in rows[:20]:
            given = result.categories[result.seed_label[i]]
            other = result.categories[result.cross_checked[i]]
            self.out.print(Text(f"  {result.ids[i]}: labelled {given}, looks like {other}"), overflow="ellipsis", no_wrap=True)
        self.out.print()
