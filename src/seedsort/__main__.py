"""``python -m seedsort``: the same as the ``seedsort`` command."""

from seedsort.cli import main

raise SystemExit(main())
