"""Run the review screen on an in-memory session of BANKING77 items, as a user would see it.

The pseudo-terminal tests start this script (it needs no workspace): it builds the items
of ``_memory_session.banking77_items``, calls ``run_review`` on this process's own stdin and
stdout, and prints ``OUTCOME {json}`` when the review ends.

    python tests/cli/review_driver.py --log calls.jsonl [--refresh-every N] [--long]
        [--reverse-on-refresh]
"""

from __future__ import annotations

import argparse
import json
import sys
from dataclasses import asdict
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path[:0] = [str(HERE), str(HERE.parents[1] / "src")]  # runs from a checkout, installed or not

from _memory_session import CATEGORIES, MemoryReviewSession, banking77_items  # noqa: E402

from seedsort.cli import _interrupt  # noqa: E402
from seedsort.cli._review import run_review  # noqa: E402


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--log", required=True, type=Path, help="JSON Lines file of session calls")
    parser.add_argument("--refresh-every", type=int, default=5)
    parser.add_argument("--long", action="store_true", help="put a 40-line document first")
    parser.add_argument("--reverse-on-refresh", action="store_true")
    args = parser.parse_args()
    session = MemoryReviewSession(
        banking77_items(long_document=args.long), CATEGORIES, args.log, reverse_on_refresh=args.reverse_on_refresh
    )
    with _interrupt.recorded():  # as the seedsort command runs it (seedsort.cli.main)
        outcome = run_review(session, refresh_every=args.refresh_every)
    print("OUTCOME " + json.dumps(asdict(outcome)), flush=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
