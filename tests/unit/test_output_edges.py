"""`triage.output` at its edges: a device that refuses the bytes, a folder where nothing can be
made, a socket, a path through a file, a temporary name taken, an interrupted write, and
`write_new` where hard links fail or another program makes the file meanwhile."""

from __future__ import annotations

import errno
import os
import socket
from pathlib import Path

import pytest

import triage.output as output
from triage.errors import InputRefused, IOFailure
from triage.output import fsync_folder, output_target, write_new, write_output


def _parts(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".part"))


@pytest.mark.skipif(not Path("/dev/full").exists(), reason="needs /dev/full")
def test_a_device_that_refuses_the_bytes_is_one_line():
    with pytest.raises(IOFailure) as err:
        write_output("/dev/full", b"x" * 10)
    assert str(err.value) == "/dev/full: cannot be written (the disk is full)"


@pytest.mark.skipif(not Path("/proc/self").is_dir(), reason="needs /proc")
def test_a_folder_where_no_file_can_be_made_is_one_line():
    for write in (write_output, write_new):
        with pytest.raises(IOFailure) as err:
            write(Path("/proc/triage-test-output"), b"x")
        assert str(err.value).startswith("/proc/triage-test-output: cannot be written (")
        assert not Path("/proc/triage-test-output").exists()


def test_a_socket_and_a_path_through_a_file_are_refused(tmp_path: Path):
    sock_path = tmp_path / "s.sock"
    s = socket.socket(socket.AF_UNIX)
    try:
        s.bind(str(sock_path))
        with pytest.raises(InputRefused, match="is a socket, not a file to write"):
            write_output(sock_path, b"x")
    finally:
        s.close()
    plain = tmp_path / "plain.txt"
    plain.write_text("a file, not a folder")
    with pytest.raises(IOFailure) as err:
        output_target(plain / "inside.pdf")
    assert str(err.value) == (f"{plain / 'inside.pdf'}: cannot be written (a part of the path "
                              "is not a folder)")
    assert plain.read_text() == "a file, not a folder"


def test_a_temporary_name_taken_is_tried_again_then_given_up(tmp_path: Path, monkeypatch):
    names = iter(["aaaa", "bbbb"])
    monkeypatch.setattr(output.secrets, "token_hex", lambda n: next(names))
    (tmp_path / ".out.txt.aaaa.part").write_text("someone else's")
    write_output(tmp_path / "out.txt", "kept")
    assert (tmp_path / "out.txt").read_text() == "kept"
    assert _parts(tmp_path) == [".out.txt.aaaa.part"]   # the other file left alone
    monkeypatch.setattr(output.secrets, "token_hex", lambda n: "aaaa")
    with pytest.raises(IOFailure) as err:
        write_output(tmp_path / "out.txt", "never")
    assert str(err.value) == f"{tmp_path}: cannot make a temporary file there"
    assert (tmp_path / "out.txt").read_text() == "kept"


def test_an_interrupted_write_leaves_the_old_file_and_no_temporary(tmp_path: Path, monkeypatch):
    target = tmp_path / "out.txt"
    target.write_text("old")

    def stop(fd: int) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr(output.os, "fsync", stop)
    with pytest.raises(KeyboardInterrupt):
        write_output(target, "new")
    monkeypatch.undo()
    assert target.read_text() == "old" and _parts(tmp_path) == []


def test_fsync_of_a_folder_that_cannot_be_opened_does_nothing(tmp_path: Path):
    fsync_folder(tmp_path / "missing")   # no error: nothing to make durable
    fsync_folder(tmp_path)


def test_write_new_refuses_a_missing_folder(tmp_path: Path):
    with pytest.raises(InputRefused, match="its folder does not exist"):
        write_new(tmp_path / "no" / "k.key", "x")


def test_write_new_without_hard_links_renames_after_a_check(tmp_path: Path, monkeypatch):
    def no_links(src: object, dst: object) -> None:
        raise OSError(errno.EPERM, "Operation not permitted")

    monkeypatch.setattr(output.os, "link", no_links)
    out = write_new(tmp_path / "k.key", "secret", mode=0o600)
    assert out.read_text() == "secret" and (out.stat().st_mode & 0o777) == 0o600
    assert _parts(tmp_path) == []


def test_write_new_never_replaces_a_file_made_meanwhile(tmp_path: Path, monkeypatch):
    target = tmp_path / "k.key"
    real_link = os.link

    def made_meanwhile(src: object, dst: object) -> None:
        Path(str(dst)).write_text("theirs")
        real_link(src, dst)   # FileExistsError, as the link meets their file

    monkeypatch.setattr(output.os, "link", made_meanwhile)
    with pytest.raises(InputRefused, match="already exists; it is never overwritten"):
        write_new(target, "mine")
    assert target.read_text() == "theirs" and _parts(tmp_path) == []

    target.unlink()

    def made_meanwhile_no_links(src: object, dst: object) -> None:
        Path(str(dst)).write_text("theirs")
        raise OSError(errno.EPERM, "Operation not permitted")

    monkeypatch.setattr(output.os, "link", made_meanwhile_no_links)
    with pytest.raises(InputRefused, match="already exists; it is never overwritten"):
        write_new(target, "mine")
    assert target.read_text() == "theirs" and _parts(tmp_path) == []
