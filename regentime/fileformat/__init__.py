"""The input layer: read, check and edit cavity files (YAML, format ``regentime/1``).

Public API (others code against these names):

- :func:`load_cavity` (path) and :func:`load_cavity_text` (text, source) -> ``Cavity``
- :func:`demo_cavity` and :data:`DEMO_PATH` (the packaged built-in demo)
- :class:`CavityDocument`: comment-preserving editor for the TUI
- :data:`SCHEMA` (the top-level :class:`~regentime.fileformat.schema.Section`),
  :data:`ELEMENTS`, :func:`field_spec`
"""

from regentime.fileformat.document import CavityDocument
from regentime.fileformat.loader import DEMO_PATH, demo_cavity, load_cavity, load_cavity_text
from regentime.fileformat.schema import ELEMENTS, TOP as SCHEMA, FieldSpec, Section, field_spec

__all__ = ["CavityDocument", "DEMO_PATH", "ELEMENTS", "FieldSpec", "SCHEMA", "Section",
           "demo_cavity", "field_spec", "load_cavity", "load_cavity_text"]
