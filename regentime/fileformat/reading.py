"""Reading a cavity file: bytes, text, YAML (round-trip, with lines) and the value checker.

Used by :mod:`regentime.fileformat.build` (the schema walk that builds the model),
:mod:`regentime.fileformat.loader` (the entry points) and
:mod:`regentime.fileformat.document` (the editor's document).

All problems of a file are collected in one pass and raised together as
:class:`~regentime.errors.InputErrors`; each names the source file, the line, the key path,
the value and what was expected.  A YAML syntax error, an empty or binary file stops early
(nothing else can be checked).
"""

from __future__ import annotations

import hashlib
import math
import os
from typing import Any, Optional

from regentime.errors import MISSING, InputError, InputErrors
from regentime.fileformat.schema import FORMAT_VERSION, FieldSpec, Section, known_keys
from regentime.units import DIMENSIONS, parse_quantity

MAX_DEPTH = 12  # deepest legitimate nesting is 4 (cleaner.cable.length; cavity[i].kind.key)
DEMO_NAME = "demo.yaml"
DEMO_LABEL = "<built-in demo>"
DEFAULT_CELL_CONTRAST = 1000.0  # common practice for a good cell between crossed polarizers
DEFAULT_VELOCITY_FACTOR = 0.66  # solid-polyethylene coax (RG-58/RG-213), handbook tables


class Shown:
    """A value shown verbatim in an error message (``got unknown key 'enrgy'``)."""

    def __init__(self, text: str) -> None:
        self.text = text

    def __repr__(self) -> str:
        return self.text


BAD = object()


def demo_resource():
    from importlib.resources import files

    return files("regentime").joinpath("data", DEMO_NAME)


DEMO_PATH = str(demo_resource())


# ---- reading ---------------------------------------------------------------------------------

def yaml_parser():
    from ruamel.yaml import YAML

    yaml = YAML()  # round trip, YAML 1.2: 1e-3 is a float, `no` stays a string
    yaml.version = None
    return yaml


def _syntax_error(exc, source: Optional[str], text: str) -> InputError:
    mark = getattr(exc, "problem_mark", None) or getattr(exc, "context_mark", None)
    line = mark.line + 1 if mark is not None else None
    problem = getattr(exc, "problem", None) or str(exc).splitlines()[0]
    context = getattr(exc, "context", None)
    if "found duplicate key" in str(exc):
        problem = "a key given twice in the same mapping"
    hint = ""
    if "\t" in str(problem) or "'\\t'" in str(problem):
        hint = "; indent with spaces, not tabs"
        problem = "a tab character"
    shown = text.splitlines()[line - 1].strip() if line and line <= len(text.splitlines()) else ""
    what = f"valid YAML (found {problem}" if problem.startswith(("a ", "an ")) else \
        f"valid YAML ({problem}"
    if context and "duplicate" not in problem:
        what += f" {context}"
    return InputError("", Shown(repr(shown[:50])) if shown else Shown("this"),
                      f"{what}{hint})", line=line, source=source)


def _check_nodes(root, source: Optional[str]) -> list[InputError]:
    """Walk the composed node tree (iteratively): duplicate keys and absurd nesting."""
    from ruamel.yaml.nodes import MappingNode, SequenceNode

    errors: list[InputError] = []
    seen: set[int] = set()
    stack = [(root, "", 0)]
    while stack:
        node, path, depth = stack.pop()
        if id(node) in seen:
            continue
        seen.add(id(node))
        if depth > MAX_DEPTH:
            errors.append(InputError(path, Shown("a value nested deeper than "
                                                  f"{MAX_DEPTH} levels"),
                                     "a cavity file (at most 4 levels deep)",
                                     line=node.start_mark.line + 1, source=source))
            continue
        if isinstance(node, MappingNode):
            keys: dict[Any, int] = {}
            for knode, vnode in node.value:
                key = knode.value if not isinstance(knode.value, list) else "?"
                sub = f"{path}.{key}" if path else str(key)
                if key in keys:
                    errors.append(InputError(sub, Shown("a second value"),
                                             f"each key once (first given at line {keys[key]})",
                                             line=knode.start_mark.line + 1, source=source))
                else:
                    keys[key] = knode.start_mark.line + 1
                stack.append((vnode, sub, depth + 1))
        elif isinstance(node, SequenceNode):
            for i, vnode in enumerate(node.value):
                stack.append((vnode, f"{path}[{i}]", depth + 1))
    return errors


def decode(raw: bytes, source: Optional[str]) -> str:
    """File bytes -> text, refusing binary junk and huge files with an :class:`InputError`."""
    if len(raw) > MAX_BYTES:
        raise InputError("", Shown(f"a file of {len(raw)} bytes"),
                         f"a cavity file (at most {MAX_BYTES} bytes)", source=source)
    if b"\x00" in raw:
        raise InputError("", Shown("binary data"), "a YAML text file", source=source)
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise InputError("", Shown("bytes that are not UTF-8 text"),
                         "a YAML text file in UTF-8", line=line, source=source) from None


MAX_BYTES = 256 * 1024  # a real cavity file is a few kB
MAX_NESTING = 16  # flow brackets; the format is at most 4 levels deep
MAX_ITEMS = 5000  # list items and flow entries in one file


def prescan(text: str, source: Optional[str] = None) -> None:
    """Refuse, before the full parse, what no real cavity file holds: more than
    :data:`MAX_BYTES`, flow nesting deeper than :data:`MAX_NESTING`, more than
    :data:`MAX_ITEMS` list entries, or a ``%YAML`` directive other than 1.2 (the format is
    YAML 1.2; a 1.1 reader would read ``yes``/``no``/``on``/``off`` and octal numbers
    differently).  One pass over the characters, well under a second for any refused size."""
    import re

    size = len(text.encode("utf-8", "surrogatepass"))
    if size > MAX_BYTES:
        raise InputError("", Shown(f"{size} bytes"), f"a cavity file of at most {MAX_BYTES // 1024} kB",
                         source=source)
    directive = re.search(r"(?m)^%YAML[ \t]+(\S+)", text)
    if directive and directive.group(1) != "1.2":
        line = text.count("\n", 0, directive.start()) + 1
        raise InputError("%YAML", directive.group(1),
                         "YAML 1.2, the format's version (remove the directive)", line=line,
                         source=source)
    depth = deepest = items = 0
    quote = ""
    for line_no, line in enumerate(text.splitlines(), 1):
        stripped = line.lstrip()
        if stripped.startswith("- ") or stripped == "-":
            items += 1
        for ch in line:
            if quote:
                if ch == quote:
                    quote = ""
                continue
            if ch in "\"'" and depth:
                quote = ch
            elif ch == "#":
                break
            elif ch in "[{":
                depth += 1
                if depth > deepest:
                    deepest = depth
                    if deepest > MAX_NESTING:
                        raise InputError("", Shown("brackets nested too deep"),
                                         f"a cavity file (flow nesting at most {MAX_NESTING})",
                                         line=line_no, source=source)
            elif ch in "]}":
                depth = max(depth - 1, 0)
            elif ch == "," and depth:
                items += 1
        if items > MAX_ITEMS:
            raise InputError("", Shown(f"more than {MAX_ITEMS} list entries"),
                             "a cavity file (a real cavity has a few dozen elements)",
                             line=line_no, source=source)


def read_yaml(text: str, source: Optional[str] = None):
    """YAML text -> round-trip data (ruamel CommentedMap ...).  Raises InputError(s).

    One parse in the normal case; a duplicate key or a YAML error is parsed again node by
    node (compose) to name the key path of every duplicate.
    """
    from ruamel.yaml.constructor import DuplicateKeyError
    from ruamel.yaml.error import YAMLError

    prescan(text, source)
    try:
        data = yaml_parser().load(text)
    except DuplicateKeyError:
        data = None
        _compose_check(text, source)
        raise  # pragma: no cover - _compose_check raises for every duplicate
    except YAMLError as exc:
        raise _syntax_error(exc, source, text) from None
    except RecursionError:
        raise InputError("", Shown("nesting too deep to read"),
                         "a cavity file (at most 4 levels deep)", source=source) from None
    depth_check(data, source)
    return data


def _compose_check(text: str, source: Optional[str]) -> None:
    from ruamel.yaml.error import YAMLError

    try:
        root = yaml_parser().compose(text)
    except YAMLError as exc:
        raise _syntax_error(exc, source, text) from None
    problems = _check_nodes(root, source) if root is not None else []
    if problems:
        raise InputErrors(problems)


def depth_check(data: Any, source: Optional[str]) -> None:
    """Refuse values nested deeper than MAX_DEPTH (iteratively: no recursion limit)."""
    seen: set[int] = set()
    stack = [(data, "", 0, None)]
    while stack:
        node, path, depth, parent_line = stack.pop()
        if not isinstance(node, (dict, list)) or id(node) in seen:
            continue
        seen.add(id(node))
        line = line_of(node) or parent_line
        if depth > MAX_DEPTH:
            raise InputErrors([InputError(
                path, Shown(f"a value nested deeper than {MAX_DEPTH} levels"),
                "a cavity file (at most 4 levels deep)", line=line, source=source)])
        items = node.items() if isinstance(node, dict) else enumerate(node)
        for key, value in items:
            sub = f"{path}[{key}]" if isinstance(node, list) else \
                (f"{path}.{key}" if path else str(key))
            stack.append((value, sub, depth + 1, line))


# ---- checking --------------------------------------------------------------------------------

def line_of(container, key=None) -> Optional[int]:
    """1-based line of ``container[key]`` (or of the container itself)."""
    lc = getattr(container, "lc", None)
    if lc is None:
        return None
    try:
        if key is None:
            return lc.line + 1
        if isinstance(key, int):
            return lc.item(key)[0] + 1
        return lc.value(key)[0] + 1
    except (KeyError, IndexError, TypeError, AttributeError):
        try:
            return lc.key(key)[0] + 1
        except Exception:  # noqa: BLE001 - positions are a nicety, never fatal
            return lc.line + 1


def _join(path: str, key: Any) -> str:
    return f"{path}.{key}" if path else str(key)


def suggest(word: str, options) -> str:
    import difflib  # only when a suggestion is needed (start-up time)

    close = difflib.get_close_matches(str(word), [str(o) for o in options], n=1, cutoff=0.6)
    if not close:
        close = [o for o in options if str(o).lower() == str(word).lower().replace("-", "_")]
    return f"; did you mean '{close[0]}'?" if close else ""


def _material_keys() -> Optional[tuple[str, ...]]:
    try:
        from regentime.materials.dispersion import MATERIALS
    except ImportError:
        return None
    return tuple(MATERIALS)


def gain_media_table():
    try:
        from regentime.materials.gain_media import GAIN_MEDIA
    except ImportError:
        return None
    return GAIN_MEDIA


def _is_map(x) -> bool:
    return isinstance(x, dict)


class Checker:
    """Collects every problem of one file; ``source`` is named in each message."""

    def __init__(self, source: Optional[str]) -> None:
        self.source = source
        self.errors: list[InputError] = []
        self.suggested: set[str] = {"format"}  # paths already covered by another message

    def err(self, path: str, value: Any, expected: str, line: Optional[int]) -> None:
        if value is MISSING and path in self.suggested:
            return  # "pump.enrgy: ... did you mean 'energy'?" already says it
        self.errors.append(InputError(path, value, expected, line=line, source=self.source))

    # -- one value -----------------------------------------------------------------------
    def value(self, raw: Any, spec: FieldSpec, path: str, line: Optional[int]) -> Any:
        """Parse and range-check one file value; record a problem and return BAD if wrong."""
        try:
            return check_value(raw, spec, path)
        except InputError as exc:
            self.err(exc.path, exc.value, exc.expected, line)
            return BAD

    # -- one mapping -----------------------------------------------------------------------
    def section(self, data: Any, section: Section, path: str, line: Optional[int]) -> Any:
        """Check a mapping against ``section``; return {key: parsed} (subsections nested)."""
        if data is None:
            data = {}
        if not _is_map(data) and section.shorthand is not None and not isinstance(data, list):
            data = {section.shorthand: data}
            shorthand = True
        else:
            shorthand = False
        if not _is_map(data):
            keys = ", ".join(known_keys(section)) or "…"
            self.err(path, data, f"a mapping with keys such as {keys}", line)
            return BAD
        out: dict[str, Any] = {}
        for key in data:
            kpath = _join(path, key)
            kline = line if shorthand else line_of(data, key)
            if key in section.fields:
                spec = section.fields[key]
                if spec.dimension == "section":
                    continue  # handled by the caller (the cavity list)
                value = self.value(data[key], spec, kpath, kline)
                if value is not BAD:
                    out[key] = value
            elif isinstance(key, str) and key in section.sections:
                sub = self.section(data[key], section.sections[key], kpath, kline)
                if sub is not BAD:
                    out[key] = sub
            else:
                choices = known_keys(section)
                hint = suggest(key, choices)
                if hint:
                    self.suggested.add(_join(path, hint.split("'")[1]))
                self.err(kpath, Shown(f"unknown key '{key}'"),
                         f"one of {', '.join(choices)}{hint}", key_line(data, key) or kline)
        for key, spec in section.fields.items():
            if spec.required and key not in data and spec.dimension != "section":
                self.err(_join(path, key), MISSING, spec.expected(), line)
        for key, sub in section.sections.items():
            if sub.required and key not in data:
                need = [k for k, s in sub.fields.items() if s.required]
                self.err(_join(path, key), MISSING,
                         f"a '{key}:' section with {', '.join(need)}", line)
        return out


def key_line(data, key) -> Optional[int]:
    lc = getattr(data, "lc", None)
    try:
        return lc.key(key)[0] + 1 if lc is not None else None
    except Exception:  # noqa: BLE001 - positions are a nicety
        return None


_FLAT_KEYS = {"radius_of_curvature": "radius", "focal_length": "focal length"}


def check_value(raw: Any, spec: FieldSpec, path: str) -> Any:
    """One file value -> its model value (SI float, int, str); raises :class:`InputError`.

    Used by the loader for every key and by :class:`CavityDocument.set` to refuse a bad value
    before it reaches the file.
    """
    dim = spec.dimension
    if spec.key in _FLAT_KEYS and isinstance(raw, str) and raw.strip().lower() == "flat":
        return math.inf
    if dim in DIMENSIONS:
        value = parse_quantity(raw, dim, path)
        if spec.key in _FLAT_KEYS and abs(value) < 1e-3:
            raise InputError(path, raw, f"'flat' or a {_FLAT_KEYS[spec.key]} of at least 1 mm in "
                             "magnitude")
        if not spec.in_range(value):
            raise InputError(path, raw, spec.expected())
        return value
    if dim == "retardance":
        if isinstance(raw, str) and raw.strip().lower() in ("quarter", "half"):
            return 0.25 if raw.strip().lower() == "quarter" else 0.5
        try:
            waves = parse_quantity(raw, "number", path)
        except InputError:
            try:
                waves = parse_quantity(raw, "angle", path) / (2 * math.pi)
            except InputError:
                raise InputError(path, raw, "quarter, half, a number of waves like 0.25, or an "
                                 "angle like '90 deg'") from None
        if not spec.in_range(waves):
            raise InputError(path, raw, f"a retardance {spec.range_text()} "
                             "(give it modulo one wave)")
        return waves
    if dim == "dump":
        if isinstance(raw, str) and raw.strip() in ("auto", "steady"):
            return raw.strip()
        if isinstance(raw, int) and not isinstance(raw, bool) and 1 <= raw <= 100_000:
            return raw
        hint = suggest(raw, ("auto", "steady")) if isinstance(raw, str) else ""
        raise InputError(path, raw, f"auto, steady or a round-trip number ≥ 1{hint}")
    if dim == "choice":
        if isinstance(raw, str) and raw in spec.choices:
            return raw
        hint = suggest(raw, spec.choices) if isinstance(raw, str) else ""
        if path == "format":
            raise InputError(path, raw, f"'{FORMAT_VERSION}' (this version of regentime reads "
                             f"format {FORMAT_VERSION} only)")
        raise InputError(path, raw, f"one of {', '.join(spec.choices)}{hint}")
    if dim == "flag":
        if isinstance(raw, bool):
            return raw
        raise InputError(path, raw, "true or false")
    if dim == "text":
        if isinstance(raw, bool) or not isinstance(raw, (str, int, float)):
            raise InputError(path, raw, "a line of text")
        return str(raw)
    if dim == "name":
        if not isinstance(raw, str) or not raw.strip() or len(raw) > 40 or \
                any(ord(c) < 32 for c in raw):
            raise InputError(path, raw, "a generator output name (text, 1-40 characters)")
        return raw.strip()
    if dim in ("material", "gain_material"):
        keys = _material_keys() if dim == "material" else _gain_keys()
        if dim == "gain_material" and keys is None:
            raise InputError(path, raw, "a gain-medium library key (the library "
                             "regentime.materials.gain_media is not installed)")
        if not isinstance(raw, str) or not raw:
            raise InputError(path, raw, "a library key such as "
                             + ("ti_sapphire" if dim == "gain_material" else "fused_silica"))
        if keys is not None and raw not in keys:
            raise InputError(path, raw, f"one of {', '.join(keys)}{suggest(raw, keys)}")
        return raw
    raise AssertionError(f"no checker for dimension {dim!r}")  # pragma: no cover


def _gain_keys() -> Optional[tuple[str, ...]]:
    media = gain_media_table()
    return None if media is None else tuple(media)


def content_hash(raw: bytes) -> str:
    return hashlib.sha256(raw).hexdigest()[:12]


def stem(source: Optional[str]) -> str:
    if not source:
        return "unnamed cavity"
    return os.path.splitext(os.path.basename(source))[0]


def read_bytes(path: str) -> bytes:
    """The file's bytes, or an :class:`InputError` saying why they cannot be read."""
    path = os.fspath(path)
    if not os.path.exists(path):
        raise InputError("", path, "an existing cavity file (no such file)", source=path)
    if os.path.isdir(path):
        raise InputError("", path, "a cavity file, not a folder", source=path)
    try:
        size = os.path.getsize(path)
        if size > MAX_BYTES:
            raise InputError("", Shown(f"a file of {size} bytes"),
                             f"a cavity file (at most {MAX_BYTES} bytes)", source=path)
        with open(path, "rb") as fh:
            return fh.read(MAX_BYTES + 1)
    except OSError as exc:
        raise InputError("", path, f"a readable file ({exc.strerror or exc})",
                         source=path) from None
