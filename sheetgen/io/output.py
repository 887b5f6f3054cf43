"""Writing outputs so that a failure leaves nothing behind.

Everything is written into a fresh temporary folder next to the target and
moved into place only when complete.
"""

from __future__ import annotations

import os
import shutil
import tempfile
from contextlib import contextmanager
from pathlib import Path

from sheetgen.errors import InputFileError


def _staging_parent(target: Path) -> Path:
    parent = target.parent
    while not parent.exists():
        parent = parent.parent
    return parent


@contextmanager
def staged_dir(target: str | Path):
    """Yield a temporary folder; on success it replaces ``target``."""
    target = Path(target)
    if target.exists() and not target.is_dir():
        raise InputFileError(f"{target}: exists and is not a folder")
    tmp = Path(tempfile.mkdtemp(prefix=".sheetgen-", dir=_staging_parent(target)))
    try:
        yield tmp
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    target.parent.mkdir(parents=True, exist_ok=True)
    if target.exists():
        old = Path(tempfile.mkdtemp(prefix=".sheetgen-old-", dir=target.parent))
        os.replace(target, old / "x")
        os.replace(tmp, target)
        shutil.rmtree(old, ignore_errors=True)
    else:
        os.replace(tmp, target)


@contextmanager
def staged_file(target: str | Path):
    """Yield a temporary file path; on success it replaces ``target``."""
    target = Path(target)
    if target.exists() and target.is_dir():
        raise InputFileError(f"{target}: is a folder, expected a file name")
    fd, name = tempfile.mkstemp(prefix=".sheetgen-", suffix=target.suffix, dir=_staging_parent(target))
    os.close(fd)
    tmp = Path(name)
    try:
        yield tmp
    except BaseException:
        tmp.unlink(missing_ok=True)
        raise
    target.parent.mkdir(parents=True, exist_ok=True)
    os.replace(tmp, target)
