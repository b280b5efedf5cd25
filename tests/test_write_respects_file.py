"""``peakproof format`` in place keeps what the file is: symlink, hard links, mode, owner, read-only.

Run through the real entry point on real files. The tests run as root, where permission
bits do not stop a write, so the read-only refusal is on the mode bits themselves.
"""

from __future__ import annotations

import os
import stat

import pytest

from peakproof.cli import EXIT_READ_ONLY, main

MESSY = "Ester 3a. 1H NMR (400 MHz, CDCl3) δ 1.25 (t, J=7.1Hz, 3H), 4.12 (q, J = 7.1 Hz, 2H).\n"
CLEAN = "Ester 3a. 1H NMR (400 MHz, CDCl3) δ 4.12 (q, J = 7.1 Hz, 2H), 1.25 (t, J = 7.1 Hz, 3H).\n"


@pytest.fixture
def target(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    path = tmp_path / "real" / "si.txt"
    path.parent.mkdir()
    path.write_text(MESSY, encoding="utf-8")
    return path


def test_a_symlink_is_written_through_and_stays_a_link(target, tmp_path):
    link = tmp_path / "link.txt"
    link.symlink_to(target)
    assert main(["format", str(link)]) == 0
    assert link.is_symlink() and os.readlink(link) == str(target)
    assert target.read_text(encoding="utf-8") == CLEAN
    assert not [p for p in os.listdir(target.parent) if p.startswith(".peakproof-")]
    assert not [p for p in os.listdir(tmp_path) if p.startswith(".peakproof-")]


def test_hard_links_keep_sharing_the_new_bytes(target, tmp_path):
    other = tmp_path / "other.txt"
    os.link(target, other)
    inode = os.stat(target).st_ino
    assert main(["format", str(target)]) == 0
    assert os.stat(target).st_ino == inode and os.stat(target).st_nlink == 2
    assert other.read_text(encoding="utf-8") == CLEAN == target.read_text(encoding="utf-8")
    assert not [p for p in os.listdir(target.parent) if p.startswith(".peakproof-")]


def test_mode_and_owner_are_kept(target):
    os.chmod(target, 0o640)
    uid, gid = (1234, 2345) if os.geteuid() == 0 else (os.getuid(), os.getgid())
    if os.geteuid() == 0:
        os.chown(target, uid, gid)
    assert main(["format", str(target)]) == 0
    st = os.stat(target)
    assert stat.S_IMODE(st.st_mode) == 0o640 and (st.st_uid, st.st_gid) == (uid, gid)
    assert target.read_text(encoding="utf-8") == CLEAN


def test_a_read_only_file_is_refused_with_its_own_exit_code(target, capsys):
    os.chmod(target, 0o444)
    assert EXIT_READ_ONLY not in (0, 1, 2, 3, 4)
    assert main(["format", str(target)]) == EXIT_READ_ONLY
    assert target.read_text(encoding="utf-8") == MESSY
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o444
    err = capsys.readouterr().err
    assert "read-only (mode 0444)" in err and "nothing was written" in err and "chmod u+w" in err
    assert not [p for p in os.listdir(target.parent) if p.startswith(".peakproof-")]


def test_a_read_only_markdown_file_is_refused_too(tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    path = tmp_path / "si.md"
    path.write_text("# Ester\n\n" + MESSY, encoding="utf-8")
    os.chmod(path, 0o444)
    assert main(["format", str(path)]) == EXIT_READ_ONLY
    assert path.read_text(encoding="utf-8") == "# Ester\n\n" + MESSY
    assert "read-only" in capsys.readouterr().err
