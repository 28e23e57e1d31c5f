"""Load a cavity file (YAML), check every key against the schema and build the SI model.

Public: :func:`load_cavity`, :func:`load_cavity_text`, :func:`demo_cavity`, :func:`demo_text`,
:data:`DEMO_PATH`.  All problems of a file are collected in one pass and raised together as
:class:`~regentime.errors.InputErrors`; each names the source file, the line, the key path,
the value and what was expected.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Optional

from regentime import model as m
from regentime.errors import InputError
from regentime.fileformat.build import validate
from regentime.fileformat.reading import (
    DEMO_LABEL, DEMO_PATH, MAX_BYTES, Shown, content_hash, decode, demo_resource, read_bytes,
    read_yaml, stem)


def load_cavity_text(text: str, source: Optional[str] = None) -> m.Cavity:
    """Cavity from YAML text.  ``source`` names the file in messages and in ``Cavity.source``.

    ``Cavity.content_hash`` is the first 12 hex digits of sha256 of the UTF-8 text.
    Raises :class:`InputError` / :class:`InputErrors` (exit code 2) for any problem.
    """
    if not isinstance(text, str):
        raise InputError("", Shown(type(text).__name__), "YAML text", source=source)
    raw = text.encode("utf-8")
    if len(raw) > MAX_BYTES or "\x00" in text:
        decode(raw, source)  # raises the right message
    data = read_yaml(text, source)
    cavity = validate(data, source, stem(source))
    return replace(cavity, source=source, content_hash=content_hash(raw))


def load_cavity(path: str) -> m.Cavity:
    """Cavity from a file.  ``Cavity.source`` is ``path``; ``content_hash`` hashes its bytes.

    Raises :class:`InputError` / :class:`InputErrors` (exit code 2) for a missing or unreadable
    file, binary junk, a YAML syntax error (with its line), an empty file, and every key problem.
    """
    raw = read_bytes(path)
    text = decode(raw, path)
    data = read_yaml(text, path)
    cavity = validate(data, path, stem(path))
    return replace(cavity, source=path, content_hash=content_hash(raw))





def demo_text() -> str:
    """Text of the packaged demo cavity file."""
    return demo_resource().read_text(encoding="utf-8")


def demo_cavity() -> m.Cavity:
    """The built-in demo cavity (an invented scenario); ``source`` is None."""
    text = demo_text()
    data = read_yaml(text, DEMO_LABEL)
    cavity = validate(data, DEMO_LABEL, "built-in demo")
    return replace(cavity, source=None, content_hash=content_hash(text.encode("utf-8")))


__all__ = ["DEMO_PATH", "demo_cavity", "demo_text", "load_cavity", "load_cavity_text"]
