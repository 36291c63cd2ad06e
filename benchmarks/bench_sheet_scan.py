"""Time of the input-sheet XML scan (xlcore.workbook.reader._scan) on one formula followed by
formatted blank cells, as a spreadsheet program writes a formatted table. Linear: the time per
row stays flat as the rows grow (issue 17 measured 27 s at 400 rows before the fix)."""

import time

from xlcore.workbook.reader import _scan


def sheet(rows: int) -> bytes:
    head = b'<worksheet><sheetData><row r="1"><c r="A1"><f>1+1</f><v>2</v></c></row>'
    body = b"".join(
        b'<row r="%d">' % r
        + b"".join(b'<c r="%s%d" s="5"/>' % (c.encode(), r) for c in "ABCDEFG")
        + b"</row>"
        for r in range(2, rows + 2)
    )
    return head + body + b"</sheetData></worksheet>"


if __name__ == "__main__":
    for n in (400, 2_000, 100_000):
        xml = sheet(n)
        t = time.perf_counter()
        _scan(xml)
        dt = time.perf_counter() - t
        print(f"{n:>7} rows, {len(xml) / 1e6:6.1f} MB: {dt:7.3f} s ({dt / n * 1e6:.2f} us/row)")
