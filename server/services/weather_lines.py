"""An uploaded weather file's text lines, one bounded line at a time, and the readers' helpers.

The file (bytes, or a seekable binary file such as an upload's spooled temporary file) is read
through a text wrapper one line at a time; no line longer than :data:`MAX_LINE_CHARS` is read
whole, and the read stops with an error as soon as the file has more than
:data:`MAX_DATA_LINES` non-blank lines, however large the file is. Each reader keeps only the
fields used of each row (its date and time texts, shared between rows that repeat them, and its
temperature as a float in an ``array('d')``), so a file's whole footprint is a few MB at most.
An empty, compressed or binary file is refused before any line is read.
"""

from __future__ import annotations

import codecs
import io
import math
import re
from collections.abc import Iterator
from datetime import date
from typing import BinaryIO

from server.errors import InputError

#: Rows in the longest weather year [rows]: 366 days x 24 hours (a leap year of hourly
#: values; a daily year is at most 366 rows).
MAX_YEAR_ROWS = 8784
#: Most non-blank lines read [lines]: a leap year of hourly rows plus a margin for header
#: lines (EPW has 8; a CSV's header row is looked for in its first 40 lines) and a few extra
#: rows (a repeated hour at a clock change, the next year's first hour) (common practice).
#: A longer file is refused as soon as its next line is read, before the rest is.
MAX_DATA_LINES = MAX_YEAR_ROWS + 64
#: Longest line read [characters]: an EPW row is about 150, a TMY3 row about 200 (common
#: practice); a longer "line" is not a weather row and is not read whole.
MAX_LINE_CHARS = 4096
#: Blank lines are not kept but take time to read: at most this many in all.
MAX_BLANK_LINES = 4 * MAX_DATA_LINES
#: Longest date or time text kept for a row [characters]; a longer cell is no date.
MAX_KEY_CHARS = 64
#: Bytes looked at to tell a text file from an archive or a binary file.
SNIFF_BYTES = 8192
TOO_MANY_LINES = (
    f"the file has more than {MAX_DATA_LINES:,} lines: a weather year is at most "
    f"{MAX_YEAR_ROWS:,} hourly rows (366 days of 24 hours) or 366 daily rows; upload one "
    "year of hourly or daily data"
)
_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]")


def input_error(message: str, field_name: str = "file") -> InputError:
    return InputError(field=field_name, message=message)


def _latin1_fallback(error: UnicodeError) -> tuple[str, int]:
    """Codec error handler: bytes that are not UTF-8 are read as Latin-1 (one char a byte)."""
    if not isinstance(error, UnicodeDecodeError):
        raise error
    return error.object[error.start : error.end].decode("latin-1"), error.end


codecs.register_error("warmstead-latin1", _latin1_fallback)


class UploadLines:
    """The text lines of an uploaded file (newline removed), read one at a time, bounded.

    UTF-16 when the file starts with its byte-order mark, else UTF-8 (a leading BOM
    dropped) with any byte that is not UTF-8 read as Latin-1; ``\\r\\n``, ``\\r`` and ``\\n``
    all end a line. Raises :class:`InputError` for an empty, compressed or binary file, a line
    longer than :data:`MAX_LINE_CHARS`, or more than :data:`MAX_DATA_LINES` non-blank lines.
    """

    def __init__(self, stream: BinaryIO) -> None:
        start = stream.tell()
        head = stream.read(SNIFF_BYTES)
        stream.seek(start)
        if not head:
            raise input_error("the file is empty")
        if head[:2] == b"PK":
            raise input_error(
                "the file is a ZIP archive: unzip it and upload the .epw or .csv inside"
            )
        if head[:2] == b"\x1f\x8b":
            raise input_error("the file is gzip-compressed: decompress it and upload the text file")
        if head[:2] in (b"\xff\xfe", b"\xfe\xff"):
            encoding, errors = "utf-16", "replace"
        elif b"\x00" in head:
            raise input_error("the file is binary, not a text weather file")
        else:
            encoding, errors = "utf-8-sig", "warmstead-latin1"
        text = head.decode(encoding, errors="replace" if encoding == "utf-16" else errors)
        if len(_CONTROL.findall(text)) > len(text) // 100:
            raise input_error("the file is binary, not a text weather file")
        self._text = io.TextIOWrapper(stream, encoding=encoding, errors=errors, newline=None)  # type: ignore[arg-type]
        self.filled = 0  # non-blank lines read so far
        self._blank = 0

    def __iter__(self) -> Iterator[str]:
        return self

    def __next__(self) -> str:
        line = self._text.readline(MAX_LINE_CHARS + 1)
        if not line:
            raise StopIteration
        if line.endswith("\n"):
            line = line[:-1]
        elif len(line) > MAX_LINE_CHARS:
            raise input_error(
                f"line {self.filled + self._blank + 1:,} is longer than {MAX_LINE_CHARS:,} "
                "characters; a weather file's rows are a few hundred characters at most"
            )
        if line and not line.isspace():
            self.filled += 1
            if self.filled > MAX_DATA_LINES:
                raise input_error(TOO_MANY_LINES)
        else:
            self._blank += 1
            if self._blank > MAX_BLANK_LINES:
                raise input_error(f"the file has more than {MAX_BLANK_LINES:,} blank lines")
        return line

    def close(self) -> None:
        """Let go of the binary file without closing it (its owner closes it)."""
        self._text.detach()


def number(text: str) -> float:
    """A cell's number; NaN where it is blank or not a number."""
    try:
        return float(text)
    except ValueError:
        return math.nan


def day_number(year: str | int, month: str | int, day: str | int) -> int | None:
    try:
        return date(int(year), int(month), int(day)).toordinal()
    except ValueError:
        return None
