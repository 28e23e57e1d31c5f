"""The library entry point for notebooks and scripts: ``regentime.plan(source, ...)``.

``source`` is a path, YAML text, a mapping (the parsed file) or a :class:`~regentime.model.Cavity`.
``overrides`` maps key paths to values written as in a file (``{"pump.energy": "10 mJ",
"cavity[7].length": "520 mm"}``; cavity indices are 0-based, as in error messages).  A bad key
or value raises :class:`~regentime.errors.InputError` naming the key path.

Nothing heavy is imported until a plan is asked for.
"""

from __future__ import annotations

import os
from typing import Any, Mapping, Optional, Union

from regentime.errors import InputError

Source = Union[str, "os.PathLike[str]", Mapping[str, Any], Any]


def _is_text(source: str) -> bool:
    """YAML text rather than a path: several lines, or one flow mapping ``{...}``."""
    return "\n" in source or source.lstrip().startswith("{")


def source_text(source: Source) -> tuple[str, Optional[str]]:
    """(YAML text, source name) for a path, a text or a mapping (for editing by key path)."""
    from regentime.fileformat.loader import decode, read_bytes

    if isinstance(source, os.PathLike) or (isinstance(source, str) and not _is_text(source)):
        path = os.fspath(source)
        return decode(read_bytes(path), path), path
    if isinstance(source, str):
        return source, None
    if isinstance(source, Mapping):
        import io

        from ruamel.yaml import YAML

        yaml = YAML(typ="safe", pure=True)
        yaml.default_flow_style = False
        buf = io.StringIO()
        yaml.dump(_plain(source), buf)
        return buf.getvalue(), None
    raise InputError("source", type(source).__name__,
                     "a path, YAML text, a mapping or a Cavity")


def _plain(x: Any) -> Any:
    if isinstance(x, Mapping):
        return {str(k): _plain(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_plain(v) for v in x]
    return x


def load(source: Source, overrides: Optional[Mapping[str, Any]] = None):
    """The :class:`~regentime.model.Cavity` for ``source`` with ``overrides`` applied."""
    from regentime.model import Cavity

    if isinstance(source, Cavity):
        if overrides:
            raise InputError("overrides", ", ".join(overrides),
                             "a path, YAML text or mapping as the source (a Cavity object has "
                             "no file keys to override)")
        return source
    if not overrides:
        from regentime import fileformat

        if isinstance(source, os.PathLike) or (isinstance(source, str) and not _is_text(source)):
            return fileformat.load_cavity(os.fspath(source))
        text, name = source_text(source)
        return fileformat.load_cavity_text(text, name)
    return edited_document(source, overrides).to_cavity()


def edited_document(source: Source, overrides: Mapping[str, Any]):
    """A :class:`~regentime.fileformat.CavityDocument` of ``source`` with each override set."""
    from regentime.fileformat import CavityDocument

    text, name = source_text(source)
    doc = CavityDocument.from_text(text, name)
    for key, value in overrides.items():
        if not isinstance(key, str):
            raise InputError(str(key), key, "a key path like 'pump.energy'")
        doc.set(key, value)
    return doc


def check_dump(dump: Union[str, int, None]) -> Union[str, int, None]:
    """``auto``, ``steady``, a round trip N ≥ 1, or None (the file's rule)."""
    if dump is None:
        return None
    if isinstance(dump, str) and dump.strip().lower() in ("auto", "steady"):
        return dump.strip().lower()
    try:
        n = int(dump) if not isinstance(dump, bool) else 0
        if isinstance(dump, float) and not dump.is_integer():
            n = 0
    except (TypeError, ValueError):
        n = 0
    if n < 1:
        raise InputError("dump", dump, "auto, steady or a round trip number ≥ 1")
    return n


def plan(source: Source, *, dump: Union[str, int, None] = None,
         overrides: Optional[Mapping[str, Any]] = None):
    """Plan a cavity: the same :class:`~regentime.planning.plan.Plan` as ``regentime plan``.

    >>> import regentime
    >>> p = regentime.plan("cavities/ti_sapphire_1khz.yaml")   # doctest: +SKIP
    >>> p.to_dict()["dump"]["round_trip"]                       # doctest: +SKIP
    """
    from regentime.planning.plan import make_plan

    return make_plan(load(source, overrides), dump=check_dump(dump))


__all__ = ["check_dump", "edited_document", "load", "plan", "source_text"]
