"""A cavity file open for editing (the TUI's model of the file): change values, keep the rest.

The text of the file is the single source of truth.  Every edit is a splice of that text at
positions taken from the YAML node tree (``start_mark``/``end_mark`` of ruamel.yaml's
composer), so comments, blank lines, key order, quoting and flow/block style of everything
that is not edited stay byte for byte as the user wrote them.  After each edit the text is
parsed again; an edit that would break the YAML is undone and refused.

Paths: ``"pump.energy"``, ``"dump"``, ``"cables.pump.length"``,
``"cavity[2].pockels_cell.length"`` (or ``"cavity[2].length"``: the kind is looked up).
"""

from __future__ import annotations

import json
import math
import re
from typing import Any, Optional

from regentime.errors import InputError
from regentime.fileformat.loader import load_cavity_text
from regentime.fileformat.reading import (
    depth_check, yaml_parser, check_value, decode, read_bytes, read_yaml)
from regentime.fileformat.schema import ELEMENTS, FieldSpec, field_spec
from regentime.units import DIMENSIONS, format_quantity

_PART = re.compile(r"([^.\[\]]+)|\[(\d+)\]")


def _split(path: str) -> list:
    parts: list = []
    pos = 0
    for m in _PART.finditer(path):
        if m.start() != pos and path[pos:m.start()] != ".":
            raise InputError(path, path, "a key path like 'pump.energy' or "
                             "'cavity[2].pockels_cell.length'")
        parts.append(m.group(1) if m.group(1) is not None else int(m.group(2)))
        pos = m.end()
    if not parts or pos != len(path):
        raise InputError(path, path, "a key path like 'pump.energy'")
    return parts


class CavityDocument:
    """An editable cavity file.  ``dirty`` is True after an edit until the next save."""

    def __init__(self, text: str, source: Optional[str] = None) -> None:
        self.source = source
        self.dirty = False
        self._text = ""
        self._nl = "\r\n" if "\r\n" in text else "\n"
        self._reparse(text)

    # ---- opening, reading, saving -------------------------------------------------------
    @classmethod
    def load(cls, path: str) -> "CavityDocument":
        """Open a file (raises InputError for a missing file, binary junk or YAML syntax)."""
        return cls(decode(read_bytes(path), path), path)

    @classmethod
    def from_text(cls, text: str, source: Optional[str] = None) -> "CavityDocument":
        return cls(text, source)

    def text(self) -> str:
        """The current text of the file."""
        return self._text

    def to_cavity(self):
        """Check the whole document and build the Cavity (raises InputErrors)."""
        return cavity_of(*self.snapshot(), self.source)

    def snapshot(self) -> tuple[str, Any]:
        """(text, parsed data) as they are now.  Edits replace both, never change them, so the
        pair may be handed to another thread (the TUI plans in a worker) while editing goes on.
        """
        return self._text, self._data

    def save(self, path: Optional[str] = None) -> str:
        """Write atomically (temporary file + rename, symlinks followed, permissions kept).

        ``path`` None writes back to the file it came from.  Returns the path written.
        """
        from regentime.atomic_write import write_atomic

        target = path or self.source
        if not target:
            raise InputError("", None, "a file name to save to (this document has none)")
        write_atomic(target, self._text)
        self.source = target
        self.dirty = False
        return target

    def get(self, path: str, default: Any = None) -> Any:
        """The value as written in the file (``"250 mm"``, ``0.85``), or ``default``."""
        node = self._data
        for part in self._resolve(path):
            if isinstance(part, int):
                if not isinstance(node, list) or part >= len(node):
                    return default
                node = node[part]
            elif isinstance(node, dict) and part in node:
                node = node[part]
            elif part == "length" and isinstance(node, (str, int, float)):
                return node  # shorthand "space: 250 mm"
            else:
                return default
        return node

    def get_si(self, path: str) -> Any:
        """The value converted as the loader would (SI float, str ...); None if absent."""
        raw = self.get(path)
        if raw is None:
            return None
        return check_value(raw, self.spec(path), path)

    def spec(self, path: str) -> FieldSpec:
        """The schema entry for ``path`` (dimension, unit hint, range, help)."""
        try:
            return field_spec(self._schema_path(path))
        except KeyError:
            raise InputError(path, path, "a known key of the cavity file") from None

    # ---- editing -----------------------------------------------------------------------
    def set(self, path: str, value: Any) -> None:
        """Set one value; only that value's text changes (a missing key is added).

        ``value`` may be the file text (``"300 mm"``) or an SI number, which is written in
        engineering units (0.3 -> ``"300 mm"``).  A value that the schema refuses raises
        :class:`InputError` and leaves the document unchanged.
        """
        parts = self._resolve(path)
        spec = self.spec(path)
        if spec.dimension == "section":
            raise InputError(path, value, "a single key inside this section, e.g. "
                             f"'{path}.<key>'")
        scalar, python = self._scalar(value, spec, path, self.get(path))
        check_value(python, spec, path)
        self._edit(lambda: self._set_text(parts, scalar))

    def delete(self, path: str) -> bool:
        """Remove one key and its value, so that the file's default (or the library's value)
        applies again.  Returns False when the key is not in the file (nothing to do).

        Only that key's text goes: in a block mapping its line(s), a comment on the same line
        included; in a flow mapping ``key: value`` and one separating comma.  Comments on lines
        of their own and everything else stay byte for byte.  Refused with :class:`InputError`
        (the document unchanged): a required key, an element's kind or a list item (use
        :meth:`remove_element`), the length written as a shorthand (``- space: 250 mm``) and a
        key that shares its line with a list dash.  Removing the last key of a section leaves
        the section's key with no value, which the loader reads as an empty section.
        """
        from ruamel.yaml.nodes import MappingNode, ScalarNode, SequenceNode

        parts = self._resolve(path)
        if isinstance(parts[-1], int) or (len(parts) >= 2 and isinstance(parts[-2], int)):
            raise InputError(path, path, "a key inside an element (remove a whole element "
                             "with remove_element)")
        spec = self.spec(path)
        if self.get(path) is None:
            return False
        if spec.required:
            raise InputError(path, "", "a value: this key is required, so it cannot be removed")
        node, mapping, index = self._root, None, -1
        for i, part in enumerate(parts):
            if isinstance(part, int):
                if not isinstance(node, SequenceNode) or part >= len(node.value):
                    return False  # pragma: no cover - get() found it
                node = node.value[part]
                continue
            if isinstance(node, ScalarNode):  # "- space: 250 mm": the shorthand's length
                raise InputError(path, self.get(path), "a key written as 'key: value' (this "
                                 "value is the element's shorthand; edit it instead)")
            if not isinstance(node, MappingNode):  # pragma: no cover - get() found it
                return False
            index = next((j for j, (k, _) in enumerate(node.value) if k.value == part), -1)
            if index < 0:  # pragma: no cover - get() found it
                return False
            mapping, node = node, node.value[index][1]
        key, value = mapping.value[index]
        if mapping.flow_style:
            pairs = mapping.value
            if index + 1 < len(pairs):  # "a: 1, b: 2, c: 3" -> "a: 1, c: 3"
                start, end = key.start_mark.index, pairs[index + 1][0].start_mark.index
            elif index > 0:  # the last one: from the end of the value before it
                start, end = pairs[index - 1][1].end_mark.index, value.end_mark.index
            else:  # the only one: "{}"
                start, end = key.start_mark.index, value.end_mark.index
        else:
            start = self._line_start(key.start_mark.index)
            if self._text[start:key.start_mark.index].strip():
                raise InputError(path, path, "a key on a line of its own (this one shares its "
                                 "line with a list dash; edit the file)")
            last = _deepest_end(value)
            end = last if self._text[last - 1:last] == "\n" and last > key.end_mark.index \
                else self._line_end(last)
        self._edit(lambda: self._replace(start, end, ""))
        return True

    def insert_element(self, index: int, kind: str, fields: Optional[dict] = None) -> None:
        """Insert ``- kind: {fields}`` so that it becomes ``cavity[index]``."""
        if kind not in ELEMENTS:
            raise InputError(f"cavity[{index}]", kind, "one of " + ", ".join(ELEMENTS))
        fields = dict(fields or {})
        parts = []
        for key, value in fields.items():
            path = f"cavity[{index}].{kind}.{key}"
            try:
                spec = field_spec(f"cavity[].{kind}.{key}")
            except KeyError:
                raise InputError(path, key, "one of " + ", ".join(ELEMENTS[kind].fields)) \
                    from None
            scalar, python = self._scalar(value, spec, path, None)
            check_value(python, spec, path)
            parts.append((key, scalar))
        if kind == "space" and [k for k, _ in parts] == ["length"]:
            body = parts[0][1]
        else:
            body = "{" + ", ".join(f"{k}: {v}" for k, v in parts) + "}"
        seq, items = self._cavity_items()
        index = max(0, min(index, len(items)))
        self._edit(lambda: self._insert_item(seq, items, index, f"- {kind}: {body}"))

    def remove_element(self, index: int) -> None:
        """Delete ``cavity[index]`` (its lines, including a comment on the same line)."""
        seq, items = self._cavity_items()
        self._check_index(index, items)
        start, end = self._item_span(items[index])
        self._edit(lambda: self._replace(start, end, ""))

    def move_element(self, index: int, delta: int) -> None:
        """Move ``cavity[index]`` by ``delta`` places (clamped to the list)."""
        seq, items = self._cavity_items()
        self._check_index(index, items)
        target = max(0, min(len(items) - 1, index + delta))
        if target == index:
            return
        spans = [self._item_span(n) for n in items]
        start, end = spans[index]
        others = spans[:index] + spans[index + 1:]
        # final order: others[:target] + [moved] + others[target:]
        at = others[target][0] if target < len(others) else others[-1][1]

        def apply() -> str:
            text = self._text
            block = text[start:end]
            if not block.endswith("\n"):
                block += self._nl
            without = text[:start] + text[end:]
            pos = at - (end - start) if at >= end else at
            if pos == len(without) and without and not without.endswith("\n"):
                without += self._nl
                pos = len(without)
            return without[:pos] + block + without[pos:]

        self._edit(apply)

    # ---- internals: paths ----------------------------------------------------------------
    def _resolve(self, path: str) -> list:
        """Split a path; insert the element kind after ``cavity[i]`` when it is left out."""
        parts = _split(path)
        if len(parts) >= 2 and parts[0] == "cavity" and isinstance(parts[1], int) and \
                (len(parts) == 2 or parts[2] not in ELEMENTS):
            items = self._data.get("cavity") if isinstance(self._data, dict) else None
            if isinstance(items, list) and parts[1] < len(items) and \
                    isinstance(items[parts[1]], dict) and len(items[parts[1]]) == 1:
                parts.insert(2, next(iter(items[parts[1]])))
        elif len(parts) >= 3 and parts[0] == "cavity" and isinstance(parts[1], int):
            items = self._data.get("cavity") if isinstance(self._data, dict) else None
            if isinstance(items, list) and parts[1] < len(items) and \
                    isinstance(items[parts[1]], dict) and parts[2] not in items[parts[1]]:
                raise InputError(path, parts[2], f"the kind of cavity[{parts[1]}] "
                                 f"({', '.join(items[parts[1]])})")
        return parts

    def _schema_path(self, path: str) -> str:
        parts = self._resolve(path)
        return ".".join(f"[{p}]" if isinstance(p, int) else p for p in parts).replace(".[", "[")

    # ---- internals: values ---------------------------------------------------------------
    def _scalar(self, value: Any, spec: FieldSpec, path: str, current: Any) -> tuple[str, Any]:
        """(YAML text of the scalar, the Python value YAML will read from it)."""
        if isinstance(value, bool) or value is None or isinstance(value, (list, dict)):
            raise InputError(path, value, spec.expected())
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            if not math.isfinite(value):
                raise InputError(path, value, spec.expected())
            dim = spec.dimension
            if dim == "ratio" and isinstance(current, str) and current.strip().endswith("%"):
                value = format_quantity(value, "ratio")
            elif dim in DIMENSIONS and DIMENSIONS[dim].vector is not None:
                value = format_quantity(value, dim)
            elif dim == "count" or isinstance(value, int):
                return str(int(value)), int(value)
            else:
                return repr(float(value)), float(value)
        text = str(value).strip()
        try:
            loaded = yaml_parser().load(f"k: {text}\n")
        except Exception:  # noqa: BLE001 - not a plain scalar: it gets quoted below
            loaded = None
        if isinstance(loaded, dict) and isinstance(loaded.get("k"), (int, float)) and \
                not isinstance(loaded["k"], bool):
            return text, loaded["k"]  # "0.85" stays a YAML number
        return _yaml_scalar(text), text

    # ---- internals: text edits -----------------------------------------------------------
    def _reparse(self, text: str) -> None:
        """Parse once: compose the node tree (its marks locate every edit) and construct the
        data from it, as ruamel's ``load`` does (compose, then construct).  Any problem is
        reported by the loader's own :func:`read_yaml`, so messages match ``regentime plan``.
        """
        try:
            yaml = yaml_parser()
            root = yaml.compose(text)
            data = None if root is None else yaml.constructor.construct_document(root)
        except Exception:  # noqa: BLE001 - let the loader name the problem
            data = read_yaml(text, self.source)  # raises with the line and the reason
            root = yaml_parser().compose(text)
        else:
            depth_check(data, self.source)
        self._text, self._data, self._root = text, data, root

    def _edit(self, fn) -> None:
        old = self._text
        try:
            result = fn()
            new = result if isinstance(result, str) else self._text
            self._text = old
            self._reparse(new)
        except InputError:
            self._reparse(old)
            raise
        self.dirty = self.dirty or self._text != old

    def _replace(self, start: int, end: int, new: str) -> str:
        return self._text[:start] + new + self._text[end:]

    def _set_text(self, parts: list, scalar: str) -> str:
        from ruamel.yaml.nodes import MappingNode, ScalarNode, SequenceNode

        node = self._root
        if node is None:
            return self._text + self._nl.join(_block(parts, scalar, 0, self._nl)) + self._nl
        for i, part in enumerate(parts):
            if isinstance(part, int):
                if not isinstance(node, SequenceNode) or part >= len(node.value):
                    raise InputError(_join(parts[:i + 1]), None, "an existing list item")
                node = node.value[part]
                continue
            if isinstance(node, ScalarNode) and part == "length" and i == len(parts) - 1 \
                    and node.value not in ("", None) and not node.tag.endswith(":null"):
                return self._replace_scalar(node, scalar)
            if isinstance(node, ScalarNode):  # null or shorthand: becomes a flow mapping
                items = [] if node.tag.endswith(":null") else \
                    [("length", self._text[node.start_mark.index:node.end_mark.index])]
                items.append((part, _flow_nested(parts[i + 1:], scalar)))
                body = "{" + ", ".join(f"{k}: {v}" for k, v in items) + "}"
                start, end = node.start_mark.index, node.end_mark.index
                if start == end and not self._text[start - 1:start].isspace():
                    body = " " + body
                return self._replace(start, end, body)
            if not isinstance(node, MappingNode):
                raise InputError(_join(parts[:i + 1]), None, "a mapping")
            child = next((v for k, v in node.value if k.value == part), None)
            if child is None:
                return self._add_key(node, parts[i:], scalar)
            node = child
        if not isinstance(node, ScalarNode) or node.style in ("|", ">"):
            raise InputError(_join(parts), None, "a single value (this key holds a section)")
        return self._replace_scalar(node, scalar)

    def _replace_scalar(self, node, scalar: str) -> str:
        """Replace a scalar; a trailing comment keeps its column when there is room."""
        start, end = node.start_mark.index, node.end_mark.index
        m = re.match(r"( +)#", self._text[end:end + 200])
        if m and "\n" not in self._text[start:end]:
            pad = max(1, len(m.group(1)) - (len(scalar) - (end - start)))
            return self._replace(start, end + len(m.group(1)), scalar + " " * pad)
        return self._replace(start, end, scalar)

    def _add_key(self, mapping, parts: list, scalar: str) -> str:
        if mapping.flow_style:
            close = mapping.end_mark.index - 1
            assert self._text[close] == "}", "flow mapping must end with '}'"
            inner = self._text[mapping.start_mark.index + 1:close].strip()
            sep = ", " if inner else ""
            return self._replace(close, close, f"{sep}{parts[0]}: "
                                 f"{_flow_nested(parts[1:], scalar)}")
        indent = mapping.value[0][0].start_mark.column if mapping.value else 0
        end = self._line_end(_deepest_end(mapping))
        lines = _block(parts, scalar, indent, self._nl)
        if end == len(self._text) and not self._text.endswith(("\n", "\r")):
            return self._text + self._nl + self._nl.join(lines) + self._nl
        return self._replace(end, end, self._nl.join(lines) + self._nl)

    def _line_end(self, index: int) -> int:
        """Index just past the newline ending the line that holds ``index``."""
        nl = self._text.find("\n", index)
        return len(self._text) if nl < 0 else nl + 1

    def _line_start(self, index: int) -> int:
        return self._text.rfind("\n", 0, index) + 1

    def _cavity_items(self):
        from ruamel.yaml.nodes import MappingNode, SequenceNode

        root = self._root
        seq = None
        if isinstance(root, MappingNode):
            seq = next((v for k, v in root.value if k.value == "cavity"), None)
        if not isinstance(seq, SequenceNode) or seq.flow_style:
            raise InputError("cavity", None, "a block list of elements ('- mirror: …' lines) "
                             "to edit element by element")
        return seq, list(seq.value)

    def _check_index(self, index: int, items: list) -> None:
        if not 0 <= index < len(items):
            raise InputError(f"cavity[{index}]", index, f"an index 0 … {len(items) - 1}")

    def _item_span(self, node) -> tuple[int, int]:
        start = self._line_start(node.start_mark.index)
        return start, self._line_end(_deepest_end(node))

    def _insert_item(self, seq, items: list, index: int, line: str) -> str:
        if items:
            indent = " " * (self._text.rfind("-", 0, items[0].start_mark.index) -
                            self._line_start(items[0].start_mark.index))
        else:  # pragma: no cover - a block sequence has at least one item
            indent = "  "
        new = indent + line + self._nl
        if index < len(items):
            at = self._item_span(items[index])[0]
        else:
            at = self._item_span(items[-1])[1]
            if at == len(self._text) and not self._text.endswith("\n"):
                new = self._nl + new
        return self._replace(at, at, new)


def cavity_of(text: str, data: Any, source: Optional[str] = None):
    """The Cavity that ``load_cavity_text(text, source)`` builds, from ``data`` already parsed
    from ``text`` (a :meth:`CavityDocument.snapshot`): the same checks and the same content
    hash, without parsing the YAML again.  Raises InputError / InputErrors."""
    from dataclasses import replace

    from regentime.fileformat.build import validate
    from regentime.fileformat.reading import MAX_BYTES, content_hash, stem

    raw = text.encode("utf-8")
    if len(raw) > MAX_BYTES or "\x00" in text:
        return load_cavity_text(text, source)  # raises the loader's message
    cavity = validate(data, source, stem(source))
    return replace(cavity, source=source, content_hash=content_hash(raw))


def _join(parts: list) -> str:
    return ".".join(f"[{p}]" if isinstance(p, int) else str(p) for p in parts).replace(".[", "[")


def _deepest_end(node) -> int:
    """End index of the last piece of text that belongs to ``node`` (block collections' own
    end marks point at the next token, after any comments; their last child's does not)."""
    from ruamel.yaml.nodes import MappingNode, SequenceNode

    while isinstance(node, (MappingNode, SequenceNode)) and not node.flow_style and node.value:
        last = node.value[-1]
        node = last[1] if isinstance(node, MappingNode) else last
    return node.end_mark.index


def _block(parts: list, scalar: str, indent: int, nl: str) -> list[str]:
    lines = []
    for depth, key in enumerate(parts[:-1]):
        lines.append(" " * (indent + 2 * depth) + f"{key}:")
    lines.append(" " * (indent + 2 * (len(parts) - 1)) + f"{parts[-1]}: {scalar}")
    return lines


def _flow_nested(parts: list, scalar: str) -> str:
    out = scalar
    for key in reversed(parts):
        out = "{" + f"{key}: {out}" + "}"
    return out


def _yaml_scalar(text: str) -> str:
    """``text`` as a YAML scalar that reads back as the same string in block and flow
    context: plain when that is safe, else double-quoted."""
    if text and text == text.strip() and "\n" not in text:
        yaml = yaml_parser()
        try:
            ok = yaml.load(f"k: {text}\n") == {"k": text} and \
                yaml.load(f"{{k: {text}}}\n") == {"k": text}
        except Exception:  # noqa: BLE001 - any parse problem means: quote it
            ok = False
        if ok:
            return text
    return json.dumps(text, ensure_ascii=False)
