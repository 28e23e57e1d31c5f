"""Writing results: regular files atomically, devices and FIFOs in place, every failure exit 2.

Real processes (``python -m regentime``) so the exit code and stderr are what a user sees.
"""

from __future__ import annotations

import os
import shutil
import stat
import subprocess
import sys
import threading
from pathlib import Path

import pytest

from regentime.atomic_write import OutputError, shown_path, write_atomic

ROOT = Path(__file__).resolve().parents[1]
TI = str(ROOT / "cavities" / "ti_sapphire_1khz.yaml")


def _run(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "regentime", *args], capture_output=True,
                          text=True, timeout=120, cwd=ROOT)


def _one_error_line(proc: subprocess.CompletedProcess, path: str) -> str:
    assert proc.returncode == 2, proc.stderr
    lines = [ln for ln in proc.stderr.splitlines() if ln.strip()]
    assert len(lines) == 1, proc.stderr
    assert "Traceback" not in proc.stderr
    assert path in lines[0]
    return lines[0]


def test_character_device_is_written_into_not_replaced():
    before = os.stat("/dev/null")
    proc = _run("plan", TI, "--format", "json", "--output", "/dev/null")
    assert proc.returncode == 0, proc.stderr
    after = os.stat("/dev/null")
    assert stat.S_ISCHR(after.st_mode) and after.st_rdev == before.st_rdev


@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="no /dev/full on this system")
def test_full_device_is_exit_2_and_stays_a_device():
    proc = _run("plan", TI, "--format", "json", "--output", "/dev/full")
    line = _one_error_line(proc, "/dev/full")
    assert "no space" in line
    assert stat.S_ISCHR(os.stat("/dev/full").st_mode)


def test_fifo_without_reader_is_exit_2_at_once(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    proc = _run("plan", TI, "--format", "json", "--output", str(fifo))
    assert "no process is reading" in _one_error_line(proc, str(fifo))
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)


def test_fifo_with_reader_gets_the_whole_json(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    got: list[bytes] = []

    def read() -> None:
        with open(fifo, "rb") as fh:
            got.append(fh.read())

    reader = threading.Thread(target=read)
    reader.start()
    try:
        import time

        # the reader must have the FIFO open before the writer's non-blocking open
        for _ in range(200):
            time.sleep(0.01)
            if reader.is_alive():
                break
        time.sleep(0.2)
        proc = _run("plan", TI, "--format", "json", "--output", str(fifo))
    finally:
        reader.join(timeout=60)
    assert proc.returncode == 0, proc.stderr
    import json

    assert json.loads(got[0].decode())["round_trip_time_s"] > 0
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)


def test_output_naming_a_folder_is_exit_2_and_leaves_no_temporary(tmp_path):
    target = tmp_path / "out"
    target.mkdir()
    proc = _run("plan", TI, "--output", str(target))
    assert "folder" in _one_error_line(proc, str(target))
    assert list(tmp_path.iterdir()) == [target]
    assert list(target.iterdir()) == []


def test_missing_folder_and_dangling_symlink_are_exit_2(tmp_path):
    missing = tmp_path / "nope" / "plan.json"
    assert "does not exist" in _one_error_line(_run("plan", TI, "--output", str(missing)),
                                               str(missing))
    link = tmp_path / "link.json"
    link.symlink_to(tmp_path / "gone" / "x.json")
    _one_error_line(_run("plan", TI, "--output", str(link)), str(link))
    assert link.is_symlink() and not link.exists()


def test_plot_into_missing_folder_is_exit_2(tmp_path):
    pytest.importorskip("matplotlib")
    png = tmp_path / "missing" / "b.png"
    _one_error_line(_run("plan", TI, "--plot", str(png)), str(png))


def test_symlink_loop_is_exit_2(tmp_path):
    loop = tmp_path / "loop"
    loop.symlink_to(loop)
    _one_error_line(_run("plan", TI, "--output", str(loop)), str(loop))


def test_immutable_folder_is_exit_2(tmp_path):
    """As root a chmod-ed folder stays writable; an immutable one (chattr +i) does not."""
    folder = tmp_path / "frozen"
    folder.mkdir()
    if shutil.which("chattr") is None:
        pytest.skip("chattr is not installed")
    made = subprocess.run(["chattr", "+i", str(folder)], capture_output=True)
    if made.returncode != 0:
        pytest.skip("this file system does not support the immutable flag")
    try:
        target = folder / "plan.txt"
        _one_error_line(_run("plan", TI, "--output", str(target)), str(target))
        assert list(folder.iterdir()) == []
    finally:
        subprocess.run(["chattr", "-i", str(folder)], check=True)


def test_failed_write_keeps_the_old_file(tmp_path, monkeypatch):
    target = tmp_path / "card.txt"
    target.write_text("old\n")

    def boom(*_a, **_k):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(OutputError) as info:
        write_atomic(str(target), "new\n")
    assert "permission denied" in str(info.value)
    assert target.read_text() == "old\n"
    assert [p.name for p in tmp_path.iterdir()] == ["card.txt"]


def test_socket_is_refused(tmp_path):
    import socket

    path = tmp_path / "s"
    sock = socket.socket(socket.AF_UNIX)
    try:
        sock.bind(str(path))
        with pytest.raises(OutputError, match="special file"):
            write_atomic(str(path), "x")
        assert stat.S_ISSOCK(os.stat(path).st_mode)
    finally:
        sock.close()


def test_paths_are_shown_escaped_and_short():
    assert shown_path("a\x1b[2Jb") == "'a\\x1b[2Jb'"
    assert shown_path("x\u202ey") == "'x\\u202ey'"
    long = shown_path("p" * 5000)
    assert len(long) <= 82 and long.endswith("…'")
