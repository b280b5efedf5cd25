"""Bad and oversized files: one clear ReaderError, in bounded time and memory."""

from __future__ import annotations

import io
import struct
import zipfile

import pytest

from peakproof.readers import Limits, ReaderError, read_document

MiB = 1024 * 1024

pytest.importorskip("docx")


def small_docx() -> bytes:
    import docx

    document = docx.Document()
    document.add_paragraph("1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H).")
    buffer = io.BytesIO()
    document.save(buffer)
    return buffer.getvalue()


def docx_with_document_xml(write_document) -> bytes:
    """A real .docx whose word/document.xml is replaced by what ``write_document`` writes."""
    original = zipfile.ZipFile(io.BytesIO(small_docx()))
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zf:
        for info in original.infolist():
            if info.filename == "word/document.xml":
                with zf.open("word/document.xml", "w", force_zip64=True) as member:
                    write_document(member)
            else:
                zf.writestr(info, original.read(info.filename))
    return out.getvalue()


def test_sparse_200_mb_file_is_refused_from_its_size(tmp_path, fails_quickly):
    path = tmp_path / "huge.txt"
    with open(path, "wb") as handle:
        handle.truncate(200 * MiB)  # sparse: nothing is written
    error = fails_quickly(lambda: read_document(path), seconds=1, peak_bytes=1 * MiB)
    assert "200.0 MiB" in error.message and "50.0 MiB" in error.message
    assert "max_bytes" in error.hint


def test_truncated_docx(tmp_path, fails_quickly):
    path = tmp_path / "cut.docx"
    data = small_docx()
    path.write_bytes(data[: len(data) // 2])
    error = fails_quickly(lambda: read_document(path))
    assert "damaged" in error.message


def test_zip_bomb_by_compression_ratio(tmp_path, fails_quickly):
    def bomb(member):
        chunk = b"<w:p/>" * (MiB // 6)
        for _ in range(40):  # ~40 MiB of one repeated tag
            member.write(chunk)

    path = tmp_path / "bomb.docx"
    path.write_bytes(docx_with_document_xml(bomb))
    assert path.stat().st_size < 1 * MiB
    error = fails_quickly(lambda: read_document(path), seconds=2, peak_bytes=8 * MiB)
    assert "zip bombs" in error.message and "word/document.xml" in error.message


def test_unpacked_size_limit(tmp_path, fails_quickly):
    def big(member):
        member.write(bytes(range(256)) * (12 * MiB // 256))  # 12 MiB, compresses poorly-ish

    path = tmp_path / "big.docx"
    path.write_bytes(docx_with_document_xml(big))
    limits = Limits(max_uncompressed_bytes=8 * MiB, max_compression_ratio=10_000)
    error = fails_quickly(lambda: read_document(path, limits=limits), seconds=2,
                          peak_bytes=8 * MiB)  # fmt: skip
    assert "unpack to" in error.message and "8.0 MiB limit" in error.message


def test_zip_that_lies_about_its_sizes(tmp_path, fails_quickly):
    """document.xml claims 2 KiB but inflates to 64 MiB: zipfile stops at the claimed size
    and the CRC check fails, so the reader must report damage without inflating it all."""

    def lying(member):
        member.write(b"<w:p/>" * (64 * MiB // 6))

    data = bytearray(docx_with_document_xml(lying))
    claimed = 2048
    for signature, size_offset in ((b"PK\x03\x04", 22), (b"PK\x01\x02", 24)):
        start = 0
        while (start := data.find(signature, start)) != -1:
            name_len_at = 26 if signature == b"PK\x03\x04" else 28
            name_len = struct.unpack_from("<H", data, start + name_len_at)[0]
            header = 30 if signature == b"PK\x03\x04" else 46
            if data[start + header : start + header + name_len] == b"word/document.xml":
                struct.pack_into("<I", data, start + size_offset, claimed)
            start += 4
    path = tmp_path / "liar.docx"
    path.write_bytes(bytes(data))
    error = fails_quickly(lambda: read_document(path), seconds=3, peak_bytes=16 * MiB)
    assert "more than the 2048 bytes its entry claims" in error.message


def test_password_protected_zip_entry(tmp_path, fails_quickly):
    data = bytearray(small_docx())
    # Set the "encrypted" flag (bit 0 of general purpose flags, APPNOTE 4.4.4) on every entry.
    for signature, flag_offset in ((b"PK\x03\x04", 6), (b"PK\x01\x02", 8)):
        start = 0
        while (start := data.find(signature, start)) != -1:
            data[start + flag_offset] |= 0x01
            start += 4
    path = tmp_path / "locked.docx"
    path.write_bytes(bytes(data))
    error = fails_quickly(lambda: read_document(path))
    assert "password" in error.message


def test_slow_reads_stop_at_the_deadline(tmp_path):
    from reportlab.pdfgen import canvas

    path = tmp_path / "pages.pdf"
    c = canvas.Canvas(str(path), invariant=1)
    for number in range(3):
        c.drawString(72, 700, f"page {number}")
        c.showPage()
    c.save()
    with pytest.raises(ReaderError, match="longer than 0 s"):
        read_document(path, limits=Limits(max_seconds=0))


def test_reader_error_is_a_value_error_with_a_readable_message():
    error = ReaderError("the PDF is encrypted", "Remove the password and try again.", "si.pdf")
    assert isinstance(error, ValueError)
    assert str(error) == "si.pdf: the PDF is encrypted. Remove the password and try again."


def test_limits_from_the_environment(tmp_path):
    """PEAKPROOF_MAX_FILE_MB and friends raise or lower a limit for every command."""
    from peakproof.cli import main
    from peakproof.readers.limits import Limits, MiB

    limits = Limits.from_environment({"PEAKPROOF_MAX_FILE_MB": "1", "PEAKPROOF_MAX_PAGES": "3"})
    assert (1 * MiB, 3) == (limits.max_bytes, limits.max_pages)
    assert Limits() == Limits.from_environment({})
    with pytest.raises(ReaderError):
        Limits.from_environment({"PEAKPROOF_MAX_SECONDS": "soon"})
    big = tmp_path / "big.txt"
    big.write_bytes(b"1H NMR (400 MHz, CDCl3) \xce\xb4 7.26 (s, 1H).\n" + b" " * (2 * MiB))
    import os

    old = os.environ.get("PEAKPROOF_MAX_FILE_MB")
    os.environ["PEAKPROOF_MAX_FILE_MB"] = "1"
    try:
        assert 2 == main(["parse", str(big)])
    finally:
        if old is None:
            del os.environ["PEAKPROOF_MAX_FILE_MB"]
        else:
            os.environ["PEAKPROOF_MAX_FILE_MB"] = old
    assert 0 == main(["parse", str(big)])
