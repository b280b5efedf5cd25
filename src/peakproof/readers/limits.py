"""Resource limits for reading untrusted documents, checked before the expensive work starts."""

from __future__ import annotations

import io
import os
import stat
import time
from typing import NamedTuple

from ..records import compared_by_class
from .base import ReaderError

MiB = 1024 * 1024
# Below this size a member's compression ratio says nothing (tiny XML parts compress well).
_RATIO_FLOOR = 1 * MiB


def _mb(size: float) -> str:
    return f"{size / MiB:.1f} MiB"


@compared_by_class
class Limits(NamedTuple):
    """How much a reader may take on; every field can be raised for trusted input."""

    max_bytes: int = 50 * MiB
    max_uncompressed_bytes: int = 200 * MiB
    max_compression_ratio: float = 100.0
    max_pages: int = 2000
    max_seconds: float = 60.0

    @classmethod
    def from_environment(cls, environ=None) -> Limits:
        """Defaults, overridden by ``PEAKPROOF_MAX_FILE_MB``, ``PEAKPROOF_MAX_UNCOMPRESSED_MB``,
        ``PEAKPROOF_MAX_COMPRESSION_RATIO``, ``PEAKPROOF_MAX_PAGES`` and ``PEAKPROOF_MAX_SECONDS``
        (so every command and the web page share one way of raising a limit)."""
        environ = os.environ if environ is None else environ
        changes = {}
        for var, field, scale, kind in _ENVIRONMENT:
            raw = environ.get(var)
            if raw is None or not raw.strip():
                continue
            try:
                value = kind(float(raw) * scale) if kind is int else float(raw) * scale
            except ValueError:
                raise ReaderError(f"{var}={raw!r} is not a number", f"Set {var} to a number, e.g. {var}=100.") from None
            if value <= 0:
                raise ReaderError(f"{var}={raw!r} must be positive", f"Set {var} to a positive number.")
            changes[field] = value
        return cls(**changes)

    def check_size(self, size: int, name: str = "") -> None:
        if size > self.max_bytes:
            raise ReaderError(
                f"the file is {_mb(size)}, more than the {_mb(self.max_bytes)} limit",
                "Split the document, or raise the limit if you trust it "
                "(environment PEAKPROOF_MAX_FILE_MB, or Limits(max_bytes=...) from Python).",
                name,
            )

    def deadline(self, name: str = "") -> Deadline:
        return Deadline(self.max_seconds, name)


_ENVIRONMENT = (
    ("PEAKPROOF_MAX_FILE_MB", "max_bytes", MiB, int),
    ("PEAKPROOF_MAX_UNCOMPRESSED_MB", "max_uncompressed_bytes", MiB, int),
    ("PEAKPROOF_MAX_COMPRESSION_RATIO", "max_compression_ratio", 1, float),
    ("PEAKPROOF_MAX_PAGES", "max_pages", 1, int),
    ("PEAKPROOF_MAX_SECONDS", "max_seconds", 1, float),
)


class Deadline:
    """Raises :class:`ReaderError` once a reader has run longer than allowed."""

    __slots__ = ("_seconds", "_stop", "_name")

    def __init__(self, seconds: float, name: str = ""):
        self._seconds = seconds
        self._stop = time.monotonic() + seconds
        self._name = name

    def check(self, doing: str) -> None:
        if time.monotonic() > self._stop:
            raise ReaderError(
                f"reading took longer than {self._seconds:g} s ({doing})",
                "The file may be unusually large or complex; raise the limit if you trust it "
                "(environment PEAKPROOF_MAX_SECONDS, or Limits(max_seconds=...)).",
                self._name,
            )


def file_size(path: str | os.PathLike, name: str = "") -> int:
    try:
        info = os.stat(path)
    except FileNotFoundError:
        raise ReaderError("the file does not exist", "Check the path.", name) from None
    except IsADirectoryError:
        raise ReaderError("this is a folder, not a file", "Give the path of a file.", name) from None
    except OSError as exc:
        raise ReaderError(f"the file cannot be opened ({exc.strerror})", "", name) from None
    if stat.S_ISDIR(info.st_mode):
        raise ReaderError("this is a folder, not a file", "Give the path of a file.", name)
    return info.st_size


def check_zip(source: str | os.PathLike | bytes, limits: Limits, name: str = "") -> list[str]:
    """Inspect a zip's central directory (sizes, ratios, encryption) without inflating it;
    returns the member names."""
    import zipfile
    damaged = "Open it in Word and save it again, or export a fresh copy."
    try:
        with zipfile.ZipFile(io.BytesIO(source) if isinstance(source, bytes) else source) as zf:
            members = zf.infolist()
    except (zipfile.BadZipFile, EOFError, ValueError, NotImplementedError):
        raise ReaderError("the .docx file is damaged (truncated or not a zip archive)", damaged,
                          name) from None
    total = 0
    for info in members:
        if info.flag_bits & 0x1:
            raise ReaderError("the document is password-protected",
                              "Remove the password in Word and try again.", name)
        total += info.file_size
        ratio = info.file_size / max(info.compress_size, 1)
        if info.file_size > _RATIO_FLOOR and ratio > limits.max_compression_ratio:
            raise ReaderError(
                f"part {info.filename!r} expands {ratio:.0f}-fold "
                f"(limit {limits.max_compression_ratio:g}), which is how zip bombs look",
                "If the document is genuine, raise Limits(max_compression_ratio=...).",
                name,
            )
    if total > limits.max_uncompressed_bytes:
        raise ReaderError(
            f"the document would unpack to {_mb(total)}, more than the "
            f"{_mb(limits.max_uncompressed_bytes)} limit",
            "If the document is genuine, raise Limits(max_uncompressed_bytes=...).",
            name,
        )
    _inflate_within_claims(source, members, limits, name)
    return [info.filename for info in members]


def _inflate_within_claims(source, members, limits: Limits, name: str) -> None:
    """Inflate every member in bounded chunks and stop if it yields more than its entry
    claims: zipfile would inflate a lying member whole before noticing."""
    import struct
    import zipfile
    handle = io.BytesIO(source) if isinstance(source, bytes) else open(source, "rb")
    chunk = 256 * 1024
    total = 0
    try:
        for info in members:
            handle.seek(info.header_offset)
            local = handle.read(30)
            if len(local) < 30 or local[:4] != b"PK\x03\x04":
                raise ReaderError("the .docx file is damaged (a part's header is missing)",
                                  "Open it in Word and save it again.", name)  # fmt: skip
            name_len, extra_len = struct.unpack("<HH", local[26:30])
            handle.seek(info.header_offset + 30 + name_len + extra_len)
            if info.compress_type == zipfile.ZIP_STORED:
                produced = info.compress_size
            elif info.compress_type == zipfile.ZIP_DEFLATED:
                produced = _inflated_size(handle, info, chunk, name)
            else:
                raise ReaderError(f"part {info.filename!r} uses an unusual compression method",
                                  "Save the document again from Word.", name)  # fmt: skip
            total += produced
            if total > limits.max_uncompressed_bytes:
                raise ReaderError(
                    f"the document unpacks to more than the "
                    f"{_mb(limits.max_uncompressed_bytes)} limit",
                    "If the document is genuine, raise Limits(max_uncompressed_bytes=...).",
                    name,
                )
    finally:
        if handle is not source:
            handle.close()


def _inflated_size(handle, info, chunk: int, name: str) -> int:
    """Bytes a deflated member (a ``zipfile.ZipInfo``) really inflates to, read in chunks."""
    import zlib

    inflater = zlib.decompressobj(-15)
    left, produced = info.compress_size, 0
    while left > 0:
        data = handle.read(min(chunk, left))
        if not data:
            break
        left -= len(data)
        while data:
            try:
                produced += len(inflater.decompress(data, chunk))
            except zlib.error:
                raise ReaderError(f"the .docx file is damaged (part {info.filename!r})",
                                  "Open it in Word and save it again.", name) from None  # fmt: skip
            data = inflater.unconsumed_tail
            if produced > info.file_size:
                raise ReaderError(
                    f"part {info.filename!r} unpacks to more than the "
                    f"{info.file_size} bytes its entry claims, which is how zip bombs look",
                    "Do not open this file; ask for a fresh copy.",
                    name,
                )
    return produced
