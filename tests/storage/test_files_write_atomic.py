"""The one atomic writer, as any caller uses it: refuse or replace, backup or not, modes."""

from __future__ import annotations

import errno
import os
import stat
from pathlib import Path

import pytest

from model.storage.files import SaveError, TargetExists, backup_path, write_atomic


def _names(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir())


def test_new_file_without_replace(tmp_path: Path) -> None:
    p = tmp_path / "doc.txt"
    write_atomic(p, b"one", replace=False, backup=True)
    assert p.read_bytes() == b"one"
    assert _names(tmp_path) == ["doc.txt"]


def test_existing_file_refused_without_replace(tmp_path: Path) -> None:
    p = tmp_path / "doc.txt"
    p.write_bytes(b"keep me")
    with pytest.raises(TargetExists) as err:
        write_atomic(p, b"two", replace=False, backup=False)
    assert isinstance(err.value, FileExistsError)
    assert p.read_bytes() == b"keep me"
    assert _names(tmp_path) == ["doc.txt"]


def test_replace_with_and_without_backup(tmp_path: Path) -> None:
    p = tmp_path / "doc.txt"
    p.write_bytes(b"first")
    write_atomic(p, b"second", replace=True, backup=False)
    assert p.read_bytes() == b"second" and _names(tmp_path) == ["doc.txt"]
    write_atomic(p, b"third", replace=True, backup=True)
    assert p.read_bytes() == b"third" and backup_path(p).read_bytes() == b"second"


def test_mode_given_or_kept(tmp_path: Path) -> None:
    p = tmp_path / "doc.txt"
    write_atomic(p, b"a", replace=False, backup=False, mode=0o600)
    assert stat.S_IMODE(p.stat().st_mode) == 0o600
    write_atomic(p, b"b", replace=True, backup=False)  # replacing keeps the file's mode
    assert stat.S_IMODE(p.stat().st_mode) == 0o600


def test_no_hard_links_still_refuses_and_cleans_up(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """A disk without hard links: the name is claimed first; a failure leaves nothing behind."""

    def no_links(*_a: object, **_k: object) -> None:
        raise OSError(errno.EPERM, os.strerror(errno.EPERM))

    monkeypatch.setattr(os, "link", no_links)
    p = tmp_path / "doc.txt"
    write_atomic(p, b"one", replace=False, backup=False)
    assert p.read_bytes() == b"one"
    with pytest.raises(TargetExists):
        write_atomic(p, b"two", replace=False, backup=False)
    assert p.read_bytes() == b"one"

    def failing_replace(*_a: object, **_k: object) -> None:
        raise OSError(errno.EIO, os.strerror(errno.EIO))

    monkeypatch.setattr(os, "replace", failing_replace)
    q = tmp_path / "other.txt"
    with pytest.raises(SaveError) as err:
        write_atomic(q, b"x", replace=False, backup=False)
    assert isinstance(err.value.os_error, OSError) and err.value.os_error.errno == errno.EIO
    assert "input/output error" in str(err.value) and str(q) in str(err.value)
    assert _names(tmp_path) == ["doc.txt"]  # neither the claimed name nor a temporary file
