"""One check for every generated data file: its bytes are those the generator wrote and the tests pinned."""

from __future__ import annotations

import hashlib
from pathlib import Path


def assert_unchanged(path: Path, expected: str, generator: str, digests: str) -> None:
    """Fail, naming the file, the generator to rerun and the table of digests to update, if ``path`` changed."""
    digest = hashlib.sha256(path.read_bytes().replace(b"\r\n", b"\n")).hexdigest()
    assert digest == expected, (
        f"{path.parent.name}/{path.name} changed (sha256 {digest}). The data files are generated: regenerate "
        f"them with `python {generator}`, review the diff, then update {digests} deliberately."
    )
