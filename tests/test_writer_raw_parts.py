"""A large part of the engineer's package that xlcore does not touch is written back as the
deflated bytes it was stored with (no inflate and deflate again), under a valid local header and
central directory entry: the zip format's own checks (CRC-32 over the inflated bytes, sizes) pass
and the part reads back byte for byte. Workbook mechanics, no engineering values (PKWARE
APPNOTE 4.3.7 local file header, 4.3.12 central directory)."""

import os
import zipfile
import zlib

from xlcore import pipeline
from xlcore.workbook.writer import write_results

BIG_PART = "customXml/big-note.xml"


def test_a_large_untouched_part_keeps_its_deflated_bytes_and_reads_back(demo_book):
    payload = b"<note>" + os.urandom(3 << 19).hex().encode() + b"</note>"  # 3 MiB, over BIG
    with zipfile.ZipFile(demo_book, "a", zipfile.ZIP_DEFLATED) as z:
        z.writestr(BIG_PART, payload, compresslevel=9)  # level 9: the writer's own would be 3
    with zipfile.ZipFile(demo_book) as z:
        info = z.getinfo(BIG_PART)
        stored = _deflated(z, info)
    b, f = pipeline.load(demo_book)
    write_results(demo_book, demo_book, pipeline.compute(b, f).sheets)
    with zipfile.ZipFile(demo_book) as z:
        assert z.testzip() is None  # every part's CRC and size check out
        info = z.getinfo(BIG_PART)
        assert info.compress_type == zipfile.ZIP_DEFLATED
        assert _deflated(z, info) == stored  # the same deflated bytes: not deflated again
        assert z.read(BIG_PART) == payload
        assert info.CRC == zlib.crc32(payload)
        assert any(n.startswith("xl/worksheets/") for n in z.namelist())


def _deflated(z: zipfile.ZipFile, info: zipfile.ZipInfo) -> bytes:
    z.fp.seek(info.header_offset)
    head = z.fp.read(30)
    name_len, extra_len = int.from_bytes(head[26:28], "little"), int.from_bytes(head[28:30], "little")
    z.fp.seek(info.header_offset + 30 + name_len + extra_len)
    return z.fp.read(info.compress_size)
