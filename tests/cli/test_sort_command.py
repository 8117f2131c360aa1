"""The ``seedsort sort`` command as a user runs it: exit codes, stderr, files, report.

Exit-code convention (0 ok, 1 bad data, 2 usage, 130 interrupted) is common practice for
command-line tools (the BSD sysexits tradition and argparse's own exit 2 for usage errors).
"""

from __future__ import annotations

import csv
import json
import re
from pathlib import Path

import pytest

from seedsort.cli import main

ANSI = re.compile(r"\x1b\[")

TEXTS = {
    "billing": [
        "I was charged twice for my order, please refund the extra payment",
        "refund the duplicate charge on my card statement",
        "my invoice shows the wrong amount, I was overcharged",
        "payment taken two times, need money back",
    ],
    "shipping": [
        "my parcel has not arrived yet, where is the delivery",
        "the courier lost my package, tracking shows nothing",
        "delivery is late by a week, parcel still not here",
        "where is my parcel, the tracking number does not work",
    ],
}


@pytest.fixture()
def pile(tmp_path: Path) -> Path:
    docs = tmp_path / "docs"
    docs.mkdir()
    seeds = ["document,category"]
    for category, texts in TEXTS.items():
        for i, text in enumerate(texts):
            name = f"{category}-{i}.txt"
            (docs / name).write_text(text, encoding="utf-8")
            if i < 2:
                seeds.append(f"{name},{category}")
    (docs / "blank.txt").write_text("", encoding="utf-8")
    (tmp_path / "seeds.csv").write_text("\n".join(seeds) + "\n", encoding="utf-8")
    return tmp_path


def run(args: list[str], capsys: pytest.CaptureFixture[str]) -> tuple[int, str, str]:
    code = main(args)
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_sort_writes_csv_and_plain_report(pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = pile / "results.csv"
    code, stdout, stderr = run(
        ["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--out", str(out)], capsys
    )
    assert code == 0, stderr
    assert not ANSI.search(stdout), "report must be plain text when stdout is not a terminal"
    assert "Least confident first" in stdout
    assert "Unassigned: empty documents (1)" in stdout
    with out.open(encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert len(rows) == 9
    by_id = {r["document"]: r for r in rows}
    assert by_id["blank.txt"]["status"] == "empty" and by_id["blank.txt"]["category"] == ""
    assert by_id["billing-3.txt"]["category"] == "billing"
    assert by_id["shipping-3.txt"]["category"] == "shipping"
    assert by_id["billing-0.txt"]["is_seed"] == "True"


def test_report_fits_80_columns(pile: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("COLUMNS", "80")
    code, stdout, _ = run(
        ["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--out", str(pile / "r.csv")], capsys
    )
    assert code == 0
    assert max(len(line) for line in stdout.splitlines()) <= 80


def test_sort_jsonl_has_probabilities(pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = pile / "results.jsonl"
    code, _, stderr = run(
        ["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--out", str(out)], capsys
    )
    assert code == 0, stderr
    records = [json.loads(line) for line in out.read_text(encoding="utf-8").splitlines()]
    assert len(records) == 9
    for rec in records:
        assert abs(sum(rec["probabilities"].values()) - 1.0) < 1e-3


def test_unknown_seed_is_data_error(pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (pile / "bad.csv").write_text("document,category\nnope.txt,billing\nbilling-0.txt,billing\nshipping-0.txt,shipping\n")
    code, _, stderr = run(["sort", str(pile / "docs"), "--seeds", str(pile / "bad.csv"), "--out", str(pile / "r.csv")], capsys)
    assert code == 1
    assert stderr.startswith("seedsort: error: 1 seed label(s) match no document: nope.txt")
    assert len(stderr.strip().splitlines()) == 1
    assert not (pile / "r.csv").exists()


def test_one_category_is_data_error(pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (pile / "one.csv").write_text("document,category\nbilling-0.txt,billing\n")
    code, _, stderr = run(["sort", str(pile / "docs"), "--seeds", str(pile / "one.csv"), "--out", str(pile / "r.csv")], capsys)
    assert code == 1
    assert "at least two categories" in stderr


def test_missing_folder_is_data_error(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (tmp_path / "s.csv").write_text("document,category\n")
    code, _, stderr = run(["sort", str(tmp_path / "absent"), "--seeds", str(tmp_path / "s.csv")], capsys)
    assert code == 1
    assert stderr.startswith("seedsort: error:") and len(stderr.strip().splitlines()) == 1


def test_no_seeds_is_usage_error(pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code, _, stderr = run(["sort", str(pile / "docs")], capsys)
    assert code == 2
    assert stderr.startswith("seedsort: usage error: give seed labels")


def test_bad_option_value_is_usage_error(pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as exc:
        main(["sort", str(pile / "docs"), "--seeds", "s.csv", "--alpha", "1.5"])
    assert exc.value.code == 2
    err = capsys.readouterr().err
    assert err.startswith("seedsort: usage error: argument --alpha: must be at least 0 and below 1")
    assert len(err.strip().splitlines()) == 1


def test_bad_output_extension_fails_before_work(pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code, _, stderr = run(
        ["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--out", str(pile / "r.xlsx")], capsys
    )
    assert code == 1
    assert "end the name in .csv or .jsonl" in stderr


def test_interrupt_exits_130(pile: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch) -> None:
    def interrupted(*args: object, **kwargs: object) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr("seedsort.workflow.sort_into_workspace", interrupted)
    code, _, stderr = run(["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--out", str(pile / "r.csv")], capsys)
    assert code == 130
    assert "interrupted" in stderr
    assert not (pile / "r.csv").exists()


def test_interrupt_while_reporting_says_the_results_file_is_complete(
    pile: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    """Ctrl-C after the results file is written (while the report is drawn) must not claim
    that nothing was written: exit 130, and the message names the complete file."""
    def interrupted(*args: object, **kwargs: object) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr("seedsort.cli._report.Reporter.sort_report", interrupted)
    out = pile / "r.csv"
    code, _, stderr = run(["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--out", str(out)], capsys)
    assert code == 130
    assert f"already written in full: {out}" in stderr and "no results file" not in stderr
    with out.open(newline="", encoding="utf-8") as handle:
        assert len(list(csv.DictReader(handle))) == len(list((pile / "docs").iterdir()))


def test_ctrl_c_that_surfaces_as_an_import_error_still_exits_130(
    pile: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    """Ctrl-C landing inside a compiled module's initialisation comes out of the import as
    "ImportError: initialization failed" (seen in tests/cli/test_interrupt.py on a loaded
    machine). The press was recorded, so the run must end as interrupted (130), not as an
    internal error; the same error without a press stays an internal error (exit 1)."""
    from seedsort.cli import _interrupt

    def interrupted_import(*args: object, **kwargs: object) -> None:
        _interrupt._pressed.set()  # what the SIGINT handler records before its raise
        raise ImportError("initialization failed")

    monkeypatch.setattr("seedsort.workflow.sort_into_workspace", interrupted_import)
    argv = ["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--out", str(pile / "r.csv")]
    code, _, stderr = run(argv, capsys)
    assert code == 130
    assert "interrupted; no results file was written" in stderr and "internal error" not in stderr

    def failed_import(*args: object, **kwargs: object) -> None:
        raise ImportError("initialization failed")

    monkeypatch.setattr("seedsort.workflow.sort_into_workspace", failed_import)
    code, _, stderr = run(argv, capsys)
    assert code == 1
    assert "internal error: ImportError" in stderr


def test_no_command_prints_help_and_exits_2(capsys: pytest.CaptureFixture[str]) -> None:
    code, _, stderr = run([], capsys)
    assert code == 2
    assert "sort" in stderr


def test_help_has_examples(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as exc:
        main(["sort", "--help"])
    assert exc.value.code == 0
    assert "examples:" in capsys.readouterr().out


def test_embed_mode_without_the_extra_says_what_to_install(
    pile: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    import seedsort.embeddings as embeddings
    from seedsort.errors import InputError

    def missing() -> None:
        raise InputError('The embedding mode needs the optional extra: pip install "seedsort[embed]"')

    monkeypatch.setattr(embeddings, "require_embeddings", missing)
    code, _, stderr = run(
        ["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--vectors", "embed", "--out", str(pile / "r.csv")],
        capsys,
    )
    assert code == 1
    assert stderr.strip() == 'seedsort: error: The embedding mode needs the optional extra: pip install "seedsort[embed]"'


def test_embed_mode_sorts_and_caches_beside_the_workspace(pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    pytest.importorskip("onnxruntime", reason='the embedding extra is not installed (pip install "seedsort[embed]")')
    out = pile / "results.csv"
    args = ["sort", str(pile / "docs"), "--seeds", str(pile / "seeds.csv"), "--vectors", "embed", "--out", str(out)]
    code, stdout, stderr = run(args, capsys)
    assert code == 0, stderr
    assert "sentence embeddings" in stdout
    cache = pile / "docs.seedsort.sqlite.embeddings.npz"  # one per collection, beside its workspace
    assert cache.exists()
    with out.open(encoding="utf-8", newline="") as handle:
        rows = {r["document"]: r for r in csv.DictReader(handle)}
    assert rows["billing-3.txt"]["category"] == "billing"
    assert rows["shipping-3.txt"]["category"] == "shipping"
    first = cache.read_bytes()
    assert run(args, capsys)[0] == 0
    assert cache.read_bytes() == first  # nothing new to embed: the cache is not rewritten


def test_long_category_names_keep_the_table_within_80_columns(
    pile: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("COLUMNS", "80")
    long_names = {"billing": "billing_" + "x" * 50, "shipping": "shipping_" + "y" * 50}
    lines = ["document,category"]
    for category, texts in TEXTS.items():
        lines += [f"{category}-{i}.txt,{long_names[category]}" for i in range(2)]
    (pile / "long.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")
    code, stdout, stderr = run(
        ["sort", str(pile / "docs"), "--seeds", str(pile / "long.csv"), "--out", str(pile / "r.csv")], capsys
    )
    assert code == 0, stderr
    assert max(len(line) for line in stdout.splitlines()) <= 80
    header = next(line for line in stdout.splitlines() if line.startswith("category"))
    assert header.rstrip().endswith("est.*")  # the numbers are never pushed off the screen


def test_closed_pipe_ends_quietly_with_results_written(pile: Path) -> None:
    """A reader that stops early (`seedsort sort ... | head -1`) is not an error: exit 0,
    nothing on stderr, the results file complete (common practice for command-line filters).
    The report is made longer than a pipe's buffer (64 KiB on Linux) so the write must fail."""
    import subprocess
    import sys

    docs = pile / "docs"
    for i in range(400):
        category = "billing" if i % 2 else "shipping"
        (docs / f"extra-{i:03d}.txt").write_text(f"{TEXTS[category][i % 4]} (case {i})", encoding="utf-8")
    out = pile / "results.csv"
    command = [sys.executable, "-m", "seedsort", "sort", str(docs), "--seeds", str(pile / "seeds.csv"),
               "--out", str(out), "--show", "1000"]  # fmt: skip
    with subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE) as proc:
        assert proc.stdout is not None and proc.stderr is not None
        proc.stdout.readline()
        proc.stdout.close()  # the reader goes away after one line
        stderr = proc.stderr.read().decode()
        assert proc.wait(timeout=120) == 0, stderr
    assert stderr == ""
    with out.open(encoding="utf-8", newline="") as handle:
        assert len(list(csv.DictReader(handle))) == 409


def test_progress_bars_show_reading_in_sizes_and_other_stages_in_counts() -> None:
    """On a terminal the read stage counts bytes, shown as sizes; reference: rich's own
    ``rich.filesize.decimal`` (powers of 1000, as file managers show sizes) for the sizes."""
    import io

    from rich.console import Console
    from rich.filesize import decimal

    from seedsort.cli._report import Reporter

    screen = io.StringIO()
    reporter = Reporter(err=Console(file=screen, force_terminal=True, width=120, color_system=None))
    with reporter.progress() as update:
        update("read", 5_000_000, 12_000_000)
        update("graph", 3, 10)
    shown = screen.getvalue()
    assert f"{decimal(5_000_000)}/{decimal(12_000_000)}" in shown  # "5.0 MB/12.0 MB"
    assert "3/10" in shown and "reading files" in shown and "neighbour graph" in shown


def test_a_folder_whose_only_file_cannot_be_decoded_says_which_file_and_why(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    """0x81 is one of the five bytes cp1252 leaves undefined (the codec's own table), so the
    export decodes in no accepted encoding: one line naming the file and the reason, exit 1,
    the file left as it was."""
    folder = tmp_path / "pile"
    folder.mkdir()
    export = folder / "export.csv"
    data = b"id,text,label\n1,ok,a\n2,\xff\x81,b\n"
    export.write_bytes(data)
    code, _, stderr = run(["sort", str(folder), "--label-column", "label", "--out", str(tmp_path / "r.csv")], capsys)
    assert code == 1
    assert stderr.count("\n") == 1
    assert "skipped export.csv: could not decode as UTF-8, UTF-16 or cp1252" in stderr
    assert export.read_bytes() == data and not (tmp_path / "r.csv").exists()
