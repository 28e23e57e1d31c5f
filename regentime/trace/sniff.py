"""Sniffing a scope file's layout: delimiter, header lines, column names, decimal comma.

Used by :mod:`regentime.trace.reader`; reads only the first bytes of the file.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Optional, Sequence

from regentime.errors import InputError

SNIFF_BYTES = 1 << 16  # enough for any preamble a scope writes, and a few hundred data lines
NUM = r"[+-]?(?:(?:\d+(?:[.]\d*)?|[.]\d+)(?:[eE][+-]?\d+)?|nan|NaN|NAN|inf|Inf|INF|infinity|Infinity)"
NUM_RE = re.compile(rf"^{NUM}$")
NUM_COMMA_RE = re.compile(r"^[+-]?(?:\d+(?:,\d*)?|,\d+)(?:[eE][+-]?\d+)?$")
UNIT_META = re.compile(
    r"(?:time|x|horizontal|h)[ _-]*units?\s*[:=,;\t ]\s*\(?(?P<u>[a-zA-Z\u00b5\u03bc]+)\)?",
    re.IGNORECASE,
)


@dataclass
class Sniff:
    delimiter: Optional[str]  # None: whitespace
    decimal_comma: bool
    ncols: int
    data_line: int  # 0-based index of the first data line
    data_offset: int  # byte offset of the first data line
    names: list
    units: dict  # "time_meta" -> unit from metadata, "row" -> list of units row
    preamble: int  # number of lines before the data


def split_fields(line: str, delim: Optional[str]) -> list:
    if delim is None:
        return line.split()
    return [f.strip() for f in line.split(delim)]


def numeric_fields(fields: Sequence[str], comma: bool) -> bool:
    pat = NUM_COMMA_RE if comma else NUM_RE
    return all(f and (pat.match(f) or NUM_RE.match(f)) for f in fields)


def line_layout(line: str) -> Optional[tuple]:
    """(delimiter, decimal_comma, nfields) if the line is all numbers, else None."""
    text = line.strip()
    if not text:
        return None
    if text[-1] in ",;" and len(text) > 1:  # a trailing delimiter (some exporters end rows so)
        text = text[:-1].rstrip()
    for delim in ("\t", ";"):
        if delim in text:
            f = split_fields(text, delim)
            if len(f) >= 2 and numeric_fields(f, comma=False):
                return delim, False, len(f)
            if len(f) >= 2 and numeric_fields(f, comma=True):
                return delim, any("," in x for x in f), len(f)
            return None
    if "," in text:
        f = split_fields(text, ",")
        if len(f) >= 2 and numeric_fields(f, comma=False):
            return ",", False, len(f)
        f = text.split()
        if len(f) >= 2 and numeric_fields(f, comma=True):
            return None, True, len(f)
        return None
    f = text.split()
    if len(f) >= 2 and numeric_fields(f, comma=False):
        return None, False, len(f)
    return None


def sniff(path: str, head: bytes) -> Sniff:
    text = head.decode("utf-8", errors="replace")
    if text.startswith("\ufeff"):
        text = text[1:]
    lines = text.split("\n")
    if len(head) >= SNIFF_BYTES and len(lines) > 1:
        lines = lines[:-1]  # the last one may be cut
    if not any(l.strip() for l in lines):
        raise InputError("", "(empty)", "a trace: a time column and at least one signal column",
                         source=path)
    layouts = [line_layout(l) for l in lines]
    start = None
    for i, lay in enumerate(layouts):
        if lay is None:
            continue
        nxt = [layouts[j] for j in range(i, min(len(lines), i + 6)) if lines[j].strip()]
        if all(x == lay for x in nxt):
            start = i
            break
    if start is None:
        bad = next((i for i, l in enumerate(lines) if l.strip()), 0)
        raise InputError("", lines[bad].strip()[:40] if lines else "",
                         "numbers: a time column and at least one signal column, separated by "
                         "commas, semicolons, tabs or spaces (no numeric rows found in the first "
                         f"{len(lines)} lines)", line=bad + 1, source=path)
    delim, comma, ncols = layouts[start]
    names: list = []
    units: dict = {}
    for l in lines[:start]:
        m = UNIT_META.search(l)
        if m:
            units["time_meta"] = m.group("u")
    pre = [l.strip() for l in lines[:start] if l.strip()]
    hdr = [split_fields(l, delim) for l in pre]
    hdr = [[x.strip().strip('"').strip("'") for x in h] for h in hdr]
    hdr = [h[:-1] if len(h) > 1 and h[-1] == "" else h for h in hdr]  # trailing delimiter
    matching = [h for h in hdr if len(h) == ncols]
    if matching:
        last = matching[-1]
        if all(re.fullmatch(r"[\(\[]?\s*[a-zA-Z\u00b5\u03bc/%]*\s*[\)\]]?", x) for x in last) and len(matching) > 1:
            units["row"] = [x.strip("()[] ") for x in last]
            names = matching[-2]
        else:
            names = last
    if not names or len(set(names)) != len(names) or any(not n for n in names):
        names = ["time"] + [f"column {k}" for k in range(2, ncols + 1)]
    offset = byte_offset_of_line(head, start)
    return Sniff(delim, comma, ncols, start, offset, names, units, start)


def byte_offset_of_line(head: bytes, line: int) -> int:
    pos = 3 if head.startswith(b"\xef\xbb\xbf") else 0  # skip a UTF-8 byte-order mark
    for _ in range(line):
        pos = head.index(b"\n", pos) + 1
    return pos
