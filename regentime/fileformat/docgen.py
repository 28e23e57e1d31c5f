"""Generate the key tables of docs/file-format.md from the schema.

``python -m regentime.fileformat.docgen docs/file-format.md`` rewrites the part between the
``BEGIN GENERATED`` and ``END GENERATED`` markers; a test checks that the file is in step.
"""

from __future__ import annotations

import sys

from regentime.fileformat.schema import ELEMENTS, TOP, FieldSpec, Section
from regentime.units import DIMENSIONS

BEGIN = "<!-- BEGIN GENERATED: key tables (python -m regentime.fileformat.docgen) -->"
END = "<!-- END GENERATED -->"

_KIND = {
    "choice": "choice", "text": "text", "name": "output name", "material": "material key",
    "gain_material": "gain-medium key", "retardance": "retardance", "dump": "rule or integer",
    "section": "list",
}


def _kind(spec: FieldSpec) -> str:
    if spec.dimension in DIMENSIONS:
        d = DIMENSIONS[spec.dimension]
        return f"{d.what.split(' ', 1)[1]} (`{d.example}`)"
    return _KIND.get(spec.dimension, spec.dimension)


def _cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def _table(title: str, section: Section, prefix: str) -> list[str]:
    lines = [f"### `{title}`", "", _cell(section.help[0].upper() + section.help[1:]) + ".", ""]
    if section.shorthand:
        lines += [f"Shorthand: a single value means `{{{section.shorthand}: value}}`.", ""]
    lines += ["| key | meaning | kind | default | plausible range |",
              "|---|---|---|---|---|"]
    for key, spec in section.fields.items():
        default = "**required**" if spec.required else (spec.default or "—")
        rng = spec.range_text() or (", ".join(spec.choices) if spec.choices else "—")
        lines.append(f"| `{prefix}{key}` | {_cell(spec.help)} | {_cell(_kind(spec))} | "
                     f"{_cell(default)} | {_cell(rng)} |")
    lines.append("")
    return lines


def render() -> str:
    """The generated Markdown (tables for the top level, each section and each element)."""
    lines = [BEGIN, ""]
    lines += _table("top level", TOP, "")
    for key, section in TOP.sections.items():
        if key == "cables":
            lines += ["### `cables`", "", _cell(section.help[0].upper() + section.help[1:])
                      + ". Keys: " + ", ".join(f"`{k}`" for k in section.sections)
                      + "; each is a cable (below).", ""]
            continue
        lines += _table(key, section, f"{key}.")
        for sub, subsection in section.sections.items():
            lines += _table(f"{key}.{sub}", subsection, f"{key}.{sub}.")
    lines += _table("cables.<drive> (a cable)", TOP.sections["cables"].sections["pump"], "")
    for kind, section in ELEMENTS.items():
        lines += _table(f"- {kind}:", section, "")
    lines.append(END)
    return "\n".join(lines)


def update(path: str) -> bool:
    """Rewrite the generated block of ``path``; True if the file changed."""
    with open(path, encoding="utf-8") as fh:
        text = fh.read()
    start, end = text.index(BEGIN), text.index(END) + len(END)
    new = text[:start] + render() + text[end:]
    if new != text:
        from regentime.atomic_write import write_atomic

        write_atomic(path, new)
    return new != text


if __name__ == "__main__":  # pragma: no cover
    print("updated" if update(sys.argv[1]) else "unchanged")
