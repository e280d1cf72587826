"""A CSV upload of bills (:func:`read_bill_csv`), read as :mod:`server.services.bill_table` reads
pasted rows, one bounded line at a time."""

from __future__ import annotations

import io
from collections.abc import Iterator
from typing import BinaryIO

from server.errors import InputError
from server.services.bill_rows import BillsRead
from server.services.bill_table import MAX_LINE_CHARS, MAX_ROWS, read_bill_lines

#: Largest CSV upload [bytes].
MAX_CSV_BYTES = 2 * 1024 * 1024


def _csv_lines(stream: BinaryIO) -> Iterator[tuple[int, str]]:
    """Numbered text lines of an uploaded CSV, bounded in size, line length and count."""
    start = stream.tell()
    head = stream.read(4096)
    stream.seek(start)
    if not head:
        raise InputError("file", "the file is empty")
    if head[:2] in (b"PK", b"\x1f\x8b") or b"\x00" in head:
        raise InputError("file", "the file is not a text CSV (a spreadsheet file or an archive?)")
    text = io.TextIOWrapper(stream, encoding="utf-8-sig", errors="replace", newline=None)  # type: ignore[arg-type]
    try:
        read = filled = 0
        number = 0
        while True:
            line = text.readline(MAX_LINE_CHARS + 1)
            if not line:
                return
            number += 1
            read += len(line)
            if read > MAX_CSV_BYTES:
                raise InputError(
                    "file", f"the file is larger than {MAX_CSV_BYTES // 1024 // 1024} MB"
                )
            if not line.endswith("\n") and len(line) > MAX_LINE_CHARS:
                raise InputError(
                    "file",
                    f"line {number:,} is longer than {MAX_LINE_CHARS:,} characters: not a bill row",
                )
            line = line.rstrip("\n")
            if line.strip():
                filled += 1
                if filled > MAX_ROWS:
                    raise InputError(
                        "file",
                        f"the file has more than {MAX_ROWS:,} rows; bills for a few years are a "
                        "few dozen rows (a daily export about a thousand)",
                    )
                yield number, line
    finally:
        text.detach()


def read_bill_csv(data: bytes | BinaryIO, *, decimal_comma: bool = False) -> BillsRead:
    """A CSV upload of bills: the same reader as
    :func:`server.services.bill_table.read_bill_text`, bounded.

    ``data`` is the file's bytes or a seekable binary file (an upload's spooled file), read
    one bounded line at a time; refused (422, ``field="file"``) past ``bill_table.MAX_ROWS`` rows,
    :data:`MAX_CSV_BYTES` or a line longer than ``bill_table.MAX_LINE_CHARS``.
    """
    stream = io.BytesIO(data) if isinstance(data, bytes | bytearray) else data
    return read_bill_lines(list(_csv_lines(stream)), "csv", decimal_comma)
