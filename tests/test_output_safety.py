"""Output safety: no command deletes or replaces a file it did not write; every
output-path fault is one line and exit code 2; an interrupt leaves the target
as it was.

The rules checked here are the project's contract (README, "Output folders");
the exit codes 130 and 143 follow the shell convention 128 + signal number
(common practice; POSIX shells report a child killed by signal N as 128 + N).
The DXF sniffing follows the DXF reference's description of how an ASCII file
begins (group code 0, then SECTION) and of the binary sentinel (from memory:
"AutoCAD Binary DXF" CR LF SUB NUL).
"""

from __future__ import annotations

import errno
import hashlib
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from click.testing import CliRunner

from sheetgen.cli import main
from sheetgen.errors import OutputPathError
from sheetgen.io.output import (
    MARKER,
    STAGING_PREFIX,
    looks_like_dxf,
    read_marker,
    staged_dir,
    staged_file,
)
from tests.conftest import DEMO, ROOT

FOLDER_COMMANDS = ("parts",)  # fast enough to run many times; build/nest/assemble share the helper


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


def snapshot(folder: Path) -> dict[str, str]:
    """Every file under ``folder`` (staging folders included) with its content hash."""
    out = {}
    for dirpath, _dirs, files in os.walk(folder):
        for f in files:
            p = Path(dirpath) / f
            out[p.relative_to(folder).as_posix()] = hashlib.sha256(p.read_bytes()).hexdigest()
    return out


def staging_left(*roots: Path) -> list[Path]:
    found = []
    for root in roots:
        for dirpath, dirs, _files in os.walk(root):
            found += [Path(dirpath) / d for d in dirs if d.startswith(STAGING_PREFIX)]
    return found


def one_line_exit_2(res):
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    errors = [ln for ln in res.output.splitlines() if ln.startswith("error:")]
    assert len(errors) == 1, res.output
    return errors[0]


# ---------------------------------------------------------------------------
# folder outputs


def test_user_files_in_a_foreign_folder_are_refused_and_kept(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    (out / "mine.txt").write_text("my notes\n")
    line = one_line_exit_2(run("parts", DEMO, "-o", out))
    assert "mine.txt" in line and "--into-existing" in line
    assert snapshot(out) == {"mine.txt": hashlib.sha256(b"my notes\n").hexdigest()}
    assert not staging_left(tmp_path)


def test_into_existing_adds_beside_user_files_and_a_rerun_replaces_only_ours(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    (out / "mine.txt").write_text("my notes\n")
    (out / "keep").mkdir()
    (out / "keep" / "drawing.dxf").write_text("0\nSECTION\n0\nEOF\n")
    before = snapshot(out)
    res = run("parts", DEMO, "-o", out, "--into-existing")
    assert res.exit_code == 0, res.output
    after = snapshot(out)
    assert {k: after[k] for k in before} == before  # content compared
    ours = read_marker(out)
    assert ours and "manifest.json" in ours and "mine.txt" not in ours
    # a second run without the option: the folder is ours now, the user's files stay
    res = run("parts", DEMO, "-o", out, "--set", "sheet.thickness=4")
    assert res.exit_code == 0, res.output
    again = snapshot(out)
    assert {k: again[k] for k in before} == before
    assert not staging_left(tmp_path)


def test_into_existing_never_replaces_a_user_file_of_the_same_name(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    (out / "manifest.json").write_text('{"mine": true}\n')
    before = snapshot(out)
    line = one_line_exit_2(run("parts", DEMO, "-o", out, "--into-existing"))
    assert "manifest.json" in line
    assert snapshot(out) == before
    assert not staging_left(tmp_path)


def test_our_own_folder_is_replaced_and_stale_files_of_ours_removed(tmp_path):
    out = tmp_path / "out"
    assert run("parts", DEMO, "-o", out).exit_code == 0
    (out / "notes.txt").write_text("added by the user\n")
    # a file we wrote last time and will not write this time goes; the user's stays
    (out / "old-part.dxf").write_text("0\nSECTION\n0\nEOF\n")
    marker = out / MARKER
    import json

    data = json.loads(marker.read_text())
    data["files"].append("old-part.dxf")
    marker.write_text(json.dumps(data))
    res = run("parts", DEMO, "-o", out)
    assert res.exit_code == 0, res.output
    assert not (out / "old-part.dxf").exists()
    assert (out / "notes.txt").read_text() == "added by the user\n"
    assert "notes.txt" not in read_marker(out)


def test_an_empty_folder_is_filled(tmp_path):
    out = tmp_path / "empty"
    out.mkdir()
    assert run("parts", DEMO, "-o", out).exit_code == 0
    assert (out / "manifest.json").is_file() and (out / MARKER).is_file()


def test_the_current_folder_with_user_files_is_refused(tmp_path, monkeypatch):
    (tmp_path / "thesis.tex").write_text("chapter 1\n")
    monkeypatch.chdir(tmp_path)
    before = snapshot(tmp_path)
    one_line_exit_2(run("parts", DEMO, "-o", "."))
    one_line_exit_2(run("parts", DEMO, "-o", str(tmp_path)))
    assert snapshot(tmp_path) == before


def test_the_input_folder_is_never_an_output(tmp_path, monkeypatch):
    params = tmp_path / "params"
    params.mkdir()
    mine = params / "my.toml"
    mine.write_bytes(DEMO.read_bytes())
    monkeypatch.chdir(tmp_path)
    for target in ("params", "params/my.toml", "."):
        res = run("parts", "params/my.toml", "-o", target)
        assert res.exit_code == 2, res.output
        assert "Traceback" not in res.output
    # even with --into-existing, and even when the folder is one of ours
    line = one_line_exit_2(run("parts", "params/my.toml", "-o", "params", "--into-existing"))
    assert "input" in line
    assert mine.read_bytes() == DEMO.read_bytes()
    assert sorted(p.name for p in params.iterdir()) == ["my.toml"]


def test_nest_gets_the_same_protection_without_changes(tmp_path):
    # nest calls staged_dir(out) with no keyword: the marker rule and the input rule still apply
    out = tmp_path / "out"
    out.mkdir()
    (out / "mine.txt").write_text("x")
    one_line_exit_2(run("nest", DEMO, "--time-limit", "0", "-o", out))
    assert snapshot(out) == {"mine.txt": hashlib.sha256(b"x").hexdigest()}
    params = tmp_path / "p"
    params.mkdir()
    (params / "kit.toml").write_bytes(DEMO.read_bytes())
    one_line_exit_2(run("nest", params / "kit.toml", "--time-limit", "0", "-o", params))
    assert sorted(p.name for p in params.iterdir()) == ["kit.toml"]
    assert not staging_left(tmp_path)


# ---------------------------------------------------------------------------
# file outputs


def test_file_output_needs_the_extension_and_never_replaces_another_kind(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    toml = tmp_path / "my.toml"
    toml.write_bytes(DEMO.read_bytes())
    one_line_exit_2(run("coupon", "--thickness", "3", "-o", "my.toml"))
    assert toml.read_bytes() == DEMO.read_bytes()
    fake = tmp_path / "notes.dxf"  # the right name, the wrong content
    fake.write_text("shopping list\n")
    line = one_line_exit_2(run("coupon", "--thickness", "3", "-o", "notes.dxf"))
    assert "not a DXF" in line
    assert fake.read_text() == "shopping list\n"
    (tmp_path / "folder.dxf").mkdir()
    one_line_exit_2(run("gear", "--module", "2", "--teeth", "20", "-o", "folder.dxf"))
    assert list((tmp_path / "folder.dxf").iterdir()) == []
    assert not staging_left(tmp_path)


def test_a_dxf_we_wrote_is_replaced(tmp_path):
    target = tmp_path / "c.dxf"
    assert run("coupon", "--thickness", "3", "-o", target).exit_code == 0
    first = target.read_bytes()
    assert looks_like_dxf(target)
    assert run("coupon", "--thickness", "4", "-o", target).exit_code == 0
    assert target.read_bytes() != first
    assert not staging_left(tmp_path)


@pytest.mark.skipif(not os.path.exists("/dev/null"), reason="needs /dev/null (a POSIX device)")
def test_a_device_is_never_an_output(tmp_path):
    one_line_exit_2(run("coupon", "--thickness", "3", "-o", "/dev/null"))
    assert staged_refuses(Path("/dev/null"))


def staged_refuses(path: Path) -> bool:
    try:
        with staged_file(path, suffix=".dxf"):
            pass
    except OutputPathError:
        return True
    return False


def test_dxf_sniffing(tmp_path):
    # ASCII DXF begins with group code 0 and SECTION, optionally after 999 comments (DXF reference)
    cases = {
        "plain.dxf": (b"  0\nSECTION\n  2\nHEADER\n", True),
        "comment.dxf": (b"999\nmade by hand\n0\r\nSECTION\r\n", True),
        "binary.dxf": (b"AutoCAD Binary DXF\r\n\x1a\x00rest", True),
        "bom.dxf": (b"\xef\xbb\xbf0\nSECTION\n", True),
        "toml.dxf": (b"[panel]\nwidth = 100\n", False),
        "empty.dxf": (b"", False),
    }
    for name, (data, expected) in cases.items():
        (tmp_path / name).write_bytes(data)
        assert looks_like_dxf(tmp_path / name) is expected, name


# ---------------------------------------------------------------------------
# output-path faults: one line, exit 2, no staging folder


def test_a_path_through_a_regular_file(tmp_path):
    f = tmp_path / "afile"
    f.write_text("x")
    line = one_line_exit_2(run("parts", DEMO, "-o", f / "sub"))
    assert "afile" in line
    one_line_exit_2(run("coupon", "--thickness", "3", "-o", f / "c.dxf"))
    assert f.read_text() == "x"
    assert not staging_left(tmp_path)


def test_a_name_too_long(tmp_path):
    line = one_line_exit_2(run("parts", DEMO, "-o", tmp_path / ("a" * 300)))
    assert "too long" in line
    one_line_exit_2(run("coupon", "--thickness", "3", "-o", tmp_path / ("b" * 300 + ".dxf")))
    assert not staging_left(tmp_path)


@pytest.mark.skipif(not os.path.isdir("/proc/self"), reason="needs Linux /proc (a folder where nothing can be made)")
def test_an_unwritable_place():
    # /proc refuses new entries for every user, root included (Linux procfs)
    line = one_line_exit_2(run("parts", DEMO, "-o", "/proc/sheetgen-out"))
    assert "/proc" in line
    one_line_exit_2(run("coupon", "--thickness", "3", "-o", "/proc/sheetgen.dxf"))


@pytest.mark.skipif(hasattr(os, "geteuid") and os.geteuid() == 0, reason="root ignores folder permissions")
def test_a_read_only_folder(tmp_path):
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o555)
    try:
        line = one_line_exit_2(run("parts", DEMO, "-o", ro / "out"))
        assert "permission" in line
    finally:
        ro.chmod(0o755)


def test_no_space_left_while_writing(tmp_path, monkeypatch):
    # the disk fills while the files are written: simulated where the writer opens its file
    from sheetgen.io import partfiles

    def full(*args, **kwargs):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    monkeypatch.setattr(partfiles, "write_part_files", full)
    out = tmp_path / "out"
    line = one_line_exit_2(run("parts", DEMO, "-o", out))
    assert "no space" in line and str(out) in line
    assert not out.exists()
    assert not staging_left(tmp_path)


def test_the_helper_keeps_its_call_shape(tmp_path):
    # staged_dir(target) and staged_file(target), as the nest command calls them
    with staged_dir(tmp_path / "o") as stage:
        (stage / "a.txt").write_text("a")
    assert (tmp_path / "o" / "a.txt").read_text() == "a"
    assert read_marker(tmp_path / "o") == ("a.txt",)
    with staged_file(tmp_path / "f.dxf") as tmp:
        tmp.write_text("0\nSECTION\n0\nENDSEC\n0\nEOF\n")
    assert looks_like_dxf(tmp_path / "f.dxf")
    # an error inside the body: nothing written, no staging left
    with pytest.raises(RuntimeError), staged_dir(tmp_path / "p") as stage:
        (stage / "half.txt").write_text("half")
        raise RuntimeError("boom")
    assert not (tmp_path / "p").exists()
    assert not staging_left(tmp_path)


# ---------------------------------------------------------------------------
# interrupts: a real subprocess, a real signal

ENV = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))


# The launcher loads the tiny entry module (what the console script does first),
# says "up", then runs it: everything after that, the loading of the CLI, click
# and the command included, is sheetgen's to handle. A signal before the
# interpreter has loaded the entry module is the interpreter's business.
LAUNCH = ("import sys; from sheetgen.__main__ import run; sys.stdout.write('up\\n'); sys.stdout.flush(); "
          "sys.argv = ['sheetgen'] + sys.argv[1:]; run()")


def _spawn(args, cwd):
    proc = subprocess.Popen([sys.executable, "-c", LAUNCH, *map(str, args)], cwd=cwd, env=ENV,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    assert proc.stdout.readline() == b"up\n"
    return proc


def _wait_for_staging(where: Path, proc, timeout_s: float) -> bool:
    end = time.monotonic() + timeout_s
    while time.monotonic() < end and proc.poll() is None:
        if staging_left(where):
            return True
        time.sleep(0.02)
    return False


@pytest.fixture(scope="module")
def previous_build(tmp_path_factory):
    root = tmp_path_factory.mktemp("interrupt")
    out = root / "out"
    res = run("build", DEMO, "--no-model", "--allow-failing", "-o", out)
    assert res.exit_code == 0, res.output
    return root, out


@pytest.mark.parametrize("signum, code", [(signal.SIGINT, 130), (signal.SIGTERM, 143)])
def test_interrupt_while_writing_leaves_the_previous_output(previous_build, signum, code):
    root, out = previous_build
    before = snapshot(out)
    proc = _spawn(["build", DEMO, "--no-model", "--allow-failing", "--kits", "2", "-o", out], root)
    seen = _wait_for_staging(root, proc, timeout_s=120)
    proc.send_signal(signum)
    _, err = proc.communicate(timeout=120)
    err = err.decode()
    if proc.returncode == 0:
        pytest.fail(f"the run finished before the signal (staging seen: {seen})")
    assert proc.returncode == code, err
    assert "Traceback" not in err
    assert len([ln for ln in err.splitlines() if ln.strip()]) == 1, err
    assert snapshot(out) == before
    assert not staging_left(root)


@pytest.mark.parametrize("signum, code", [(signal.SIGINT, 130), (signal.SIGTERM, 143)])
def test_interrupt_during_imports_is_one_line(tmp_path, signum, code):
    # the interpreter is up (it says so), then the signal comes at once, while sheetgen loads
    proc = _spawn(["parts", DEMO, "-o", "o"], tmp_path)
    time.sleep(0.03)  # past the launcher's last line; loading the CLI and click takes longer than this
    proc.send_signal(signum)
    _, err = proc.communicate(timeout=60)
    err = err.decode()
    if proc.returncode == 0:
        pytest.skip("the command finished before the signal arrived")
    assert proc.returncode == code, err
    assert "Traceback" not in err
    assert len([ln for ln in err.splitlines() if ln.strip()]) == 1, err
    assert not (tmp_path / "o").exists()
    assert not staging_left(tmp_path)


def test_interrupt_at_many_moments_never_leaves_half_an_output(tmp_path):
    # a signal at a spread of moments through a short command: either it finished
    # (exit 0, whole output) or it stopped (130, nothing at the target, no staging;
    # or, when the signal came while finished files were moved, the whole output)
    for delay in (0.03, 0.1, 0.3, 0.6, 1.0, 1.5):
        out = tmp_path / f"o{delay}"
        proc = _spawn(["parts", DEMO, "-o", out], tmp_path)
        time.sleep(delay)
        proc.send_signal(signal.SIGINT)
        _, err = proc.communicate(timeout=60)
        assert "Traceback" not in err.decode()
        assert proc.returncode in (0, 130), err
        if proc.returncode == 0 or out.exists():
            assert (out / MARKER).is_file() and (out / "manifest.json").is_file()
            assert set(read_marker(out)) == set(snapshot(out)) - {MARKER}
        assert not staging_left(tmp_path)


# ---------------------------------------------------------------------------
# error types: user errors are not ValueError; no bare ValueError reaches the user as a traceback


def test_user_errors_are_not_value_errors():
    from sheetgen.errors import GeometryBug, InputFileError, ParameterError, SheetgenError

    for cls in (SheetgenError, ParameterError, InputFileError, OutputPathError):
        assert not issubclass(cls, ValueError), cls
    assert not issubclass(GeometryBug, (ValueError, SheetgenError))


def test_core_geometry_raises_typed_errors():
    from shapely.geometry import box

    from sheetgen.errors import GeometryBug, ParameterError
    from sheetgen.geometry.joints import TabMissesSlot, fit_clearance_mm, slot_footprint
    from sheetgen.geometry.kerf import cut_outline
    from sheetgen.geometry.placement import Placement

    with pytest.raises(ParameterError, match="fit 'loose'"):
        fit_clearance_mm("loose")
    with pytest.raises(ParameterError, match="kerf"):
        cut_outline(box(0, 0, 10, 10), -0.1)
    # two parts side by side, never crossing: the tab misses the slot part (an internal signal)
    eye = ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0))
    apart = Placement(eye, (0.0, 0.0, 0.0))
    far = Placement(eye, (0.0, 0.0, 500.0))  # the slot part lies 500 mm above the tab
    with pytest.raises(TabMissesSlot):
        slot_footprint(box(0, 0, 5, 3), 3.0, apart, far, 3.0)
    assert issubclass(TabMissesSlot, GeometryBug)


def test_a_stray_value_error_is_one_line_and_exit_3(tmp_path, monkeypatch):
    import sheetgen.design.kit as kit

    def broken(spec, **options):
        raise ValueError("an invariant of ours failed")

    monkeypatch.setattr(kit, "build_kit", broken)
    res = run("parts", DEMO, "-o", tmp_path / "o")
    assert res.exit_code == 3, res.output
    assert "Traceback" not in res.output and "internal error: ValueError" in res.output
    assert not (tmp_path / "o").exists() and not staging_left(tmp_path)


# ---------------------------------------------------------------------------
# a fresh clone: the README's test command collects with nothing beside the repository


def test_the_suite_collects_in_a_fresh_copy_with_nothing_beside_it(tmp_path):
    import shutil as sh

    listed = subprocess.run(["git", "ls-files", "-z"], cwd=ROOT, capture_output=True, check=False)
    if listed.returncode != 0:
        pytest.skip("git is not installed or this is not a git checkout (git ls-files lists the repository)")
    copy = tmp_path / "alone" / "sheetgen-clone"
    for rel in listed.stdout.decode().split("\0"):
        if rel and (ROOT / rel).is_file():
            (copy / rel).parent.mkdir(parents=True, exist_ok=True)
            sh.copy2(ROOT / rel, copy / rel)
    assert not (copy.parent / "shared").exists()
    env = dict(os.environ, PYTHONPATH=str(copy))
    res = subprocess.run([sys.executable, "-m", "pytest", "--collect-only", "-q", "-p", "no:cacheprovider"],
                         cwd=copy, env=env, capture_output=True, text=True, timeout=600)
    assert res.returncode == 0, res.stdout[-3000:] + res.stderr[-3000:]
    # the benchmark-instance tests are collected from the copy's own tests/data
    assert "test_nfp_esicup.py" in res.stdout and "test_output_safety.py" in res.stdout, res.stdout[-2000:]
    # and no test reaches outside the repository for its data
    for path in sorted((copy / "tests").glob("*.py")):
        if path.name == Path(__file__).name:
            continue  # this file names the folder only to check it is absent
        text = path.read_text(encoding="utf-8")
        outside = "/".join(("..", "shared"))  # the folder beside a checkout, spelled so this file does not name it
        assert '"shared"' not in text and outside not in text, path.name
