"""Bad files through ``peakproof parse FILE``: one clear error line, exit 2, no traceback, in
bounded time and memory.

Each case runs the real command (``peakproof.cli.main``) in a fresh interpreter, so the
peak resident memory measured is the command's own, C libraries included, and a hang is
cut off by the timeout instead of stalling the test run.  The address space is also capped,
so a reader that tried to inflate a bomb would fail loudly here rather than swap.
"""

from __future__ import annotations

import io
import random
import subprocess
import sys
import time
import zipfile
from pathlib import Path

import pytest

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
MiB = 1024 * 1024
SECONDS = 15.0  # interpreter start-up included
PEAK_RSS = 100 * MiB  # parsing the good 5-page demo PDF peaks near 60 MiB (measured)
ADDRESS_SPACE = 1024 * MiB

RUNNER = f"""
import resource, sys
resource.setrlimit(resource.RLIMIT_AS, ({ADDRESS_SPACE}, {ADDRESS_SPACE}))
from peakproof.cli import main
status = main(["parse", sys.argv[1]])
sys.stdout.flush()
# VmHWM is this program's own peak; ru_maxrss would include the parent's size at fork time
peak = next(line.split()[1] for line in open("/proc/self/status") if line.startswith("VmHWM:"))
print("PEAK_RSS_KIB", peak)
sys.exit(status)
"""

pytestmark = pytest.mark.skipif(sys.platform != "linux", reason="RLIMIT_AS and /proc/self/status")


def run_parse(path: Path) -> tuple[int, str, str, float, int]:
    started = time.monotonic()
    done = subprocess.run([sys.executable, "-c", RUNNER, str(path)], capture_output=True,
                          text=True, timeout=SECONDS * 2)  # fmt: skip
    elapsed = time.monotonic() - started
    out_lines = done.stdout.splitlines()
    assert out_lines and out_lines[-1].startswith("PEAK_RSS_KIB "), (done.stdout, done.stderr)
    peak = int(out_lines[-1].split()[1]) * 1024  # /proc reports kB (KiB)
    return done.returncode, "\n".join(out_lines[:-1]), done.stderr, elapsed, peak


def assert_one_clear_error(path: Path, *words: str) -> str:
    status, out, err, elapsed, peak = run_parse(path)
    assert "Traceback" not in err, err
    lines = err.splitlines()
    assert len(lines) == 1, err
    assert status == 2, (status, err)
    assert out == ""
    line = lines[0]
    assert line.startswith((f"peakproof: {path}: ", f"peakproof: {path.name}: ")), line
    for word in words:
        assert word in line, line
    assert elapsed < SECONDS, f"took {elapsed:.1f} s"
    assert peak < PEAK_RSS, f"peak RSS {peak / MiB:.0f} MiB"
    return line


def test_truncated_docx(tmp_path):
    data = (EXAMPLES / "demo_si.docx").read_bytes()
    path = tmp_path / "cut.docx"
    path.write_bytes(data[: len(data) // 2])
    assert_one_clear_error(path, "damaged")


def test_truncated_pdf(tmp_path):
    data = (EXAMPLES / "demo_si.pdf").read_bytes()
    path = tmp_path / "cut.pdf"
    path.write_bytes(data[: len(data) // 3])
    line = assert_one_clear_error(path)
    assert "PDF" in line or "pdf" in line


def test_zip_bomb(tmp_path):
    """A real .docx whose document part is 400 MiB of spaces, deflated to well under 1 MiB."""
    original = zipfile.ZipFile(EXAMPLES / "demo_si.docx")
    path = tmp_path / "bomb.docx"
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as zf:
        for info in original.infolist():
            if info.filename != "word/document.xml":
                zf.writestr(info.filename, original.read(info.filename))
                continue
            with zf.open("word/document.xml", "w", force_zip64=True) as member:
                chunk = b" " * MiB
                for _ in range(400):
                    member.write(chunk)
    assert path.stat().st_size < 2 * MiB
    assert_one_clear_error(path, "zip bomb")


def test_encrypted_pdf(tmp_path):
    from reportlab.lib.pdfencrypt import StandardEncryption
    from reportlab.pdfgen import canvas

    path = tmp_path / "locked.pdf"
    pdf = canvas.Canvas(str(path), encrypt=StandardEncryption("secret", ownerPassword="owner"))
    pdf.drawString(72, 720, "1H NMR (400 MHz, CDCl3) δ 7.26 (s, 1H).")
    pdf.save()
    assert_one_clear_error(path, "encrypted")


@pytest.mark.parametrize("suffix", [".pdf", ".docx", ".txt", ".md", ".tex", ".bin"])
def test_binary_garbage(tmp_path, suffix):
    path = tmp_path / f"garbage{suffix}"
    path.write_bytes(random.Random(20240101).randbytes(256 * 1024))
    assert_one_clear_error(path)


@pytest.mark.parametrize("suffix", [".txt", ".pdf", ".docx"])
def test_sparse_200_mb_file(tmp_path, suffix):
    path = tmp_path / f"huge{suffix}"
    with open(path, "wb") as handle:
        handle.truncate(200 * MiB)  # sparse: no data blocks are written
    assert_one_clear_error(path, "200.0 MiB", "limit")


def test_good_file_passes_the_same_harness():
    """The harness itself can tell success: a good file exits 0 and writes no error line."""
    status, out, err, elapsed, peak = run_parse(EXAMPLES / "demo_si.pdf")
    assert status == 0 and err == "" and "14 data block(s)" in out
    assert elapsed < SECONDS and peak < PEAK_RSS


def test_docx_with_one_bad_run_of_bytes_in_a_part(tmp_path):
    """A zip whose central directory is fine but whose document part is corrupted."""
    data = bytearray((EXAMPLES / "demo_si.docx").read_bytes())
    with zipfile.ZipFile(io.BytesIO(bytes(data))) as zf:
        info = zf.getinfo("word/document.xml")
    start = info.header_offset + 30 + len(info.filename.encode()) + len(info.extra)
    data[start + 10 : start + 200] = random.Random(7).randbytes(190)
    path = tmp_path / "corrupt.docx"
    path.write_bytes(bytes(data))
    assert_one_clear_error(path, "damaged")
