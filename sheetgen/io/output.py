"""Writing outputs without ever losing a file the user owns.

Rules (the same for every command that writes):

* Everything is written into a staging folder (``.sheetgen-stage-*``) and moved
  into place only when complete; on any failure or interrupt the staging
  folder is removed and the target is left exactly as it was.
* A folder output carries a marker file, :data:`MARKER`, listing the files
  sheetgen wrote there. An absent or empty folder is created and filled; a
  folder with our marker has the files the marker lists replaced (files the
  user added beside them are left alone); any other non-empty folder is
  refused unless the caller passes ``into_existing=True`` (the ``--into-existing``
  option), which adds our files beside the user's and never replaces or deletes
  one of theirs.
* A file output must carry its kind's extension (``.dxf``); an existing file
  is replaced only when its content is that kind (a DXF for a DXF output);
  never a folder, a device, a link or a file of another kind.
* An input file, or a folder holding one, is never an output target. Inputs
  are the ``inputs=`` given, plus every existing file named by an argument or
  option of the running command (found from the click context, so every
  command gets the rule without listing its inputs).
* Every fault of the output path (a path through a regular file, no
  permission, a read-only disk, a name too long, no space left) is an
  :class:`~sheetgen.errors.OutputPathError`: one line naming the path and the
  reason, exit code 2.
"""

from __future__ import annotations

import errno
import json
import os
import shutil
import signal
import tempfile
import threading
from collections.abc import Iterable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path

from sheetgen.errors import Interrupted, OutputPathError

MARKER = ".sheetgen-output.json"
STAGING_PREFIX = ".sheetgen-stage-"
MARKER_FORMAT = 1
# how much of an existing file is read to tell whether it is a DXF drawing
SNIFF_BYTES = 4096
INTO_EXISTING_OPTION = "--into-existing"

_REASONS = {
    errno.EACCES: "permission denied",
    errno.EPERM: "not permitted",
    errno.EROFS: "the disk is read-only",
    errno.ENOSPC: "no space left on the disk",
    errno.EDQUOT: "disk quota exceeded",
    errno.ENAMETOOLONG: "a name in the path is too long",
    errno.ENOTDIR: "a part of the path is a file, not a folder",
    errno.EISDIR: "is a folder",
    errno.EEXIST: "already exists",
    errno.EXDEV: "the staging folder and the target are on different disks",
    errno.EFBIG: "file too large for the disk",
    errno.ELOOP: "too many symbolic links",
}


def os_reason(exc: OSError) -> str:
    """A short reason for an OS error, in words."""
    fallback = exc.strerror or exc.__class__.__name__
    return fallback if exc.errno is None else _REASONS.get(exc.errno, fallback)


# ---------------------------------------------------------------------------
# signals: no half-moved output


@contextmanager
def signals_deferred() -> Iterator[list[int]]:
    """Hold SIGINT and SIGTERM while the body runs (moving finished files into
    place, or removing a staging folder); a signal that came meanwhile is raised
    afterwards as :class:`Interrupted` (exit code 128 + the signal)."""
    if threading.current_thread() is not threading.main_thread():
        yield []
        return
    pending: list[int] = []

    def hold(signum, frame):
        pending.append(signum)

    previous = {s: signal.signal(s, hold) for s in (signal.SIGINT, signal.SIGTERM)}
    try:
        yield pending
    finally:
        for s, h in previous.items():
            signal.signal(s, h)
    if pending:
        raise Interrupted(pending[0], "the signal came while finished files were being moved into place; "
                                      "that step was completed, so the output is whole")


# ---------------------------------------------------------------------------
# inputs


def _command_inputs(target: Path) -> list[Path]:
    """Existing files named by the running click command's arguments and options
    (``FILE.dxf:QTY`` counts as FILE.dxf), the output target itself excepted."""
    try:
        import click
    except ImportError:  # pragma: no cover - click is a dependency
        return []
    ctx = click.get_current_context(silent=True)
    found: list[Path] = []
    while ctx is not None:
        for value in ctx.params.values():
            values = value if isinstance(value, (list, tuple)) else (value,)
            for v in values:
                if not isinstance(v, (str, os.PathLike)):
                    continue
                text = os.fspath(v)
                if text == os.fspath(target):
                    continue
                for cand in (text, text.rpartition(":")[0]):
                    if cand and os.path.isfile(cand):
                        found.append(Path(cand))
                        break
        ctx = ctx.parent
    return found


def _resolved(p: Path) -> Path:
    try:
        return p.resolve(strict=False)
    except (OSError, RuntimeError):
        return p.absolute()


def _refuse_inputs(target: Path, inputs: Iterable[str | os.PathLike], option: str, folder: bool) -> None:
    t = _resolved(target)
    for raw in list(inputs) + _command_inputs(target):
        p = _resolved(Path(raw))
        if p == t:
            raise OutputPathError(f"{option} {target}: is an input of this command; write the output "
                                  f"elsewhere")
        if folder and t in p.parents:
            raise OutputPathError(f"{option} {target}: holds the input {raw}; write the output into "
                                  f"another folder")


# ---------------------------------------------------------------------------
# path checks shared by files and folders


def _check_path(target: Path, option: str) -> Path:
    """Refuse names too long, paths through a file; return the nearest existing
    ancestor folder (where staging goes when the target does not exist)."""
    if not str(target):
        raise OutputPathError(f"{option}: the output path is empty")
    if "\x00" in str(target):
        raise OutputPathError(f"{option} {target!r}: the path holds a NUL character")
    absolute = target.absolute()
    parent = absolute.parent
    while not os.path.lexists(parent):
        parent = parent.parent
    if not parent.is_dir():
        raise OutputPathError(f"{option} {target}: {parent} is a file, not a folder")
    try:
        name_max = os.pathconf(parent, "PC_NAME_MAX")
        path_max = os.pathconf(parent, "PC_PATH_MAX")
    except (OSError, ValueError):
        name_max, path_max = 255, 4096
    for part in absolute.parts:
        if len(os.fsencode(part)) > name_max:
            raise OutputPathError(f"{option} {target}: a name in the path is too long "
                                  f"({len(os.fsencode(part))} bytes, at most {name_max})")
    if len(os.fsencode(str(absolute))) + 64 > path_max:
        raise OutputPathError(f"{option} {target}: the path is too long (at most {path_max - 64} bytes here)")
    return parent


def _mkstage(where: Path, option: str, target: Path) -> Path:
    try:
        return Path(tempfile.mkdtemp(prefix=STAGING_PREFIX, dir=where))
    except OSError as exc:
        raise OutputPathError(f"{option} {target}: cannot write in {where} ({os_reason(exc)})") from None


def _remove_stage(stage: Path, done: bool = False) -> None:
    """Remove a staging folder; a signal meanwhile waits until it is gone and is
    then raised (``done``: the output is already in place)."""
    try:
        with signals_deferred():
            shutil.rmtree(stage, ignore_errors=True)
    except Interrupted as exc:
        raise Interrupted(exc.signum, "the output was complete when the signal came" if done else "") from None


# ---------------------------------------------------------------------------
# folder outputs


@dataclass(frozen=True)
class FolderState:
    """What is at a folder target now."""

    exists: bool
    ours: tuple[str, ...]      # files our marker lists (relative, '/'-separated)
    marked: bool               # the folder carries our marker
    foreign: tuple[str, ...]   # a few of the top-level entries that are not ours (for the message)


def read_marker(folder: Path) -> tuple[str, ...] | None:
    """The files a marker lists, or None when the folder has no valid marker."""
    path = folder / MARKER
    if not path.is_file() or path.is_symlink():
        return None
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
        files = data["files"]
        if data.get("written_by") != "sheetgen" or not isinstance(files, list):
            return None
    except (OSError, ValueError, KeyError, TypeError, UnicodeError):
        return None
    out = []
    for f in files:
        if not isinstance(f, str) or not f or f.startswith("/") or ".." in f.split("/") or f == MARKER:
            return None
        out.append(f)
    return tuple(out)


def folder_state(target: Path) -> FolderState:
    if not target.exists():
        return FolderState(False, (), False, ())
    ours = read_marker(target)
    listed = set(ours or ())
    tops = {f.split("/")[0] for f in listed}
    foreign = []
    with os.scandir(target) as it:
        for entry in it:
            name = entry.name
            if name == MARKER and ours is not None:
                continue
            if name.startswith(STAGING_PREFIX):
                continue  # a staging folder of a run in progress (or killed with SIGKILL)
            if name in tops and entry.is_dir(follow_symlinks=False) and _only_ours(target, name, listed):
                continue
            if name in listed:
                continue
            foreign.append(name)
    return FolderState(True, tuple(sorted(listed)), ours is not None, tuple(sorted(foreign)))


def _only_ours(root: Path, top: str, listed: set[str]) -> bool:
    for dirpath, _dirs, files in os.walk(root / top):
        rel = Path(dirpath).relative_to(root).as_posix()
        if any(f"{rel}/{f}" not in listed for f in files):
            return False
    return True


def check_output_dir(target: str | Path, *, inputs: Iterable[str | os.PathLike] = (), into_existing: bool = False,
                     option: str = "-o") -> FolderState:
    """Raise :class:`OutputPathError` when ``target`` cannot or must not receive a
    folder output; return what is there. Cheap: commands call it before the
    long work so that a refused target fails at once."""
    target = Path(target)
    _check_path(target, option)
    if target.is_symlink():
        raise OutputPathError(f"{option} {target}: is a symbolic link; give the folder it points to")
    if target.exists() and not target.is_dir():
        raise OutputPathError(f"{option} {target}: is a file, not a folder; give a folder to write into")
    _refuse_inputs(target, inputs, option, folder=True)
    try:
        state = folder_state(target)
    except OSError as exc:
        raise OutputPathError(f"{option} {target}: cannot be read ({os_reason(exc)})") from None
    if state.foreign and not state.marked and not into_existing:
        shown = ", ".join(state.foreign[:3]) + (f" and {len(state.foreign) - 3} more" if len(state.foreign) > 3 else "")
        raise OutputPathError(f"{option} {target}: the folder holds files sheetgen did not write: {shown}; "
                              f"give a new or empty "
                              f"folder, or add {INTO_EXISTING_OPTION} to write beside them (nothing of "
                              f"yours is replaced or deleted)")
    if state.exists and not os.access(target, os.W_OK | os.X_OK):
        raise OutputPathError(f"{option} {target}: cannot write in it (permission denied)")
    return state


def _files_in(folder: Path) -> list[str]:
    out = []
    for dirpath, _dirs, files in os.walk(folder):
        rel = Path(dirpath).relative_to(folder)
        out += [(rel / f).as_posix() for f in files]
    return sorted(out)


def _collisions(target: Path, new: list[str], ours: set[str]) -> list[str]:
    """New files that would replace something at the target that is not ours."""
    bad = []
    for f in new:
        parts = f.split("/")
        for k in range(1, len(parts)):
            p = target.joinpath(*parts[:k])
            if os.path.lexists(p) and not p.is_dir():
                bad.append("/".join(parts[:k]))
        p = target / f
        if os.path.lexists(p) and (f not in ours or not p.is_file() or p.is_symlink()):
            bad.append(f)
    return sorted(set(bad))


@contextmanager
def staged_dir(target: str | Path, *, inputs: Iterable[str | os.PathLike] = (), into_existing: bool = False,
               option: str = "-o") -> Iterator[Path]:
    """Yield a staging folder; when the body finishes, its files are moved into
    ``target`` with the marker (see the module doc for the rules)."""
    target = Path(target)
    inputs = list(inputs)
    state = check_output_dir(target, inputs=inputs, into_existing=into_existing, option=option)
    where = target if state.exists else _check_path(target, option)
    stage = _mkstage(where, option, target)
    try:
        yield stage
        _commit_dir(stage, target, inputs, into_existing, option)
    except OSError as exc:
        _remove_stage(stage)
        name = exc.filename if isinstance(exc.filename, str) and not exc.filename.startswith(str(stage)) else target
        raise OutputPathError(f"{option} {name}: cannot be written ({os_reason(exc)})") from None
    except BaseException:
        _remove_stage(stage)
        raise
    _remove_stage(stage, done=True)


def _commit_dir(stage: Path, target: Path, inputs, into_existing: bool, option: str) -> None:
    new = [f for f in _files_in(stage) if f != MARKER]
    (stage / MARKER).write_text(json.dumps({"written_by": "sheetgen", "format": MARKER_FORMAT, "files": new},
                                           indent=1) + "\n", encoding="utf-8")
    state = check_output_dir(target, inputs=inputs, into_existing=into_existing, option=option)
    ours = set(state.ours)
    clash = _collisions(target, new, ours)
    if clash:
        shown = ", ".join(clash[:3]) + (f" and {len(clash) - 3} more" if len(clash) > 3 else "")
        raise OutputPathError(f"{option} {target}: would replace files sheetgen did not write: {shown}; "
                              f"nothing was written; move them or give another folder")
    with signals_deferred():
        if not state.exists:
            target.parent.mkdir(parents=True, exist_ok=True)
            os.replace(stage, target)
            return
        for f in sorted(ours - set(new)):
            (target / f).unlink(missing_ok=True)
        for f in new + [MARKER]:
            dest = target / f
            dest.parent.mkdir(parents=True, exist_ok=True)
            os.replace(stage / f, dest)
        # folders that held only our old files and are now empty
        for d in sorted({str(Path(f).parent) for f in ours - set(new)}, key=len, reverse=True):
            p = target / d
            while d not in ("", ".") and p != target:
                try:
                    p.rmdir()
                except OSError:
                    break
                p = p.parent


# ---------------------------------------------------------------------------
# file outputs


def looks_like_dxf(path: Path) -> bool:
    """Whether the file's first bytes are those of a DXF drawing (ASCII: an
    optional 999 comment, then group code 0 and SECTION; or the binary DXF
    sentinel). The DXF reference (Autodesk, DXF format, "ASCII DXF files" and
    "Binary DXF files") defines both beginnings."""
    try:
        with open(path, "rb") as fh:
            head = fh.read(SNIFF_BYTES)
    except OSError:
        return False
    if head.startswith(b"AutoCAD Binary DXF\r\n\x1a\x00"):
        return True
    if head.startswith(b"\xef\xbb\xbf"):
        head = head[3:]
    lines = [ln.strip() for ln in head.decode("latin-1").splitlines()]
    while len(lines) >= 2 and lines[0] == "999":
        lines = lines[2:]
    return len(lines) >= 2 and lines[0] == "0" and lines[1] == "SECTION"


KIND_CHECKS = {".dxf": ("a DXF drawing", looks_like_dxf)}


def check_output_file(target: str | Path, *, suffix: str = ".dxf", inputs: Iterable[str | os.PathLike] = (),
                      option: str = "-o") -> Path:
    """Raise :class:`OutputPathError` when ``target`` cannot or must not receive
    a file output of kind ``suffix``; return where staging goes."""
    target = Path(target)
    what, is_kind = KIND_CHECKS[suffix.lower()]
    if target.suffix.lower() != suffix.lower():
        raise OutputPathError(f"{option} {target}: the output is {what}, so the name must end in {suffix} "
                              f"(for example {option} {target.stem or 'out'}{suffix})")
    where = _check_path(target, option)
    _refuse_inputs(target, inputs, option, folder=False)
    if os.path.lexists(target):
        if target.is_symlink():
            raise OutputPathError(f"{option} {target}: is a symbolic link; give a plain file name")
        if target.is_dir():
            raise OutputPathError(f"{option} {target}: is a folder; give a file name ending in {suffix}")
        if not target.is_file():
            raise OutputPathError(f"{option} {target}: is a device or other special file, not a file to replace")
        if not is_kind(target):
            raise OutputPathError(f"{option} {target}: exists and is not {what}; sheetgen replaces only "
                                  f"{what}; give another name")
        where = target.parent
    return where


@contextmanager
def staged_file(target: str | Path, *, suffix: str = ".dxf", inputs: Iterable[str | os.PathLike] = (),
                option: str = "-o") -> Iterator[Path]:
    """Yield a temporary file path; when the body finishes it replaces ``target``
    (see the module doc for the rules)."""
    target = Path(target)
    inputs = list(inputs)
    where = check_output_file(target, suffix=suffix, inputs=inputs, option=option)
    stage = _mkstage(where, option, target)
    tmp = stage / ("out" + suffix)
    try:
        yield tmp
        check_output_file(target, suffix=suffix, inputs=inputs, option=option)
        with signals_deferred():
            target.parent.mkdir(parents=True, exist_ok=True)
            os.replace(tmp, target)
    except OSError as exc:
        _remove_stage(stage)
        raise OutputPathError(f"{option} {target}: cannot be written ({os_reason(exc)})") from None
    except BaseException:
        _remove_stage(stage)
        raise
    _remove_stage(stage, done=True)
