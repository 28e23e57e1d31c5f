"""A small braille-dot canvas for terminal plots (2 × 4 dots per character cell).

Pure Python, no Textual: layers of dots, each with a colour; a cell takes the colour of the
highest-priority layer that has a dot in it.  Unicode braille patterns start at U+2800; the
dot bits follow the Unicode chart (dots 1-8).
"""

from __future__ import annotations

import math
from typing import Iterable, Sequence

# bit of the dot at (column dx, row dy) inside a cell, Unicode braille pattern order
_BITS = ((0x01, 0x08), (0x02, 0x10), (0x04, 0x20), (0x40, 0x80))


class Canvas:
    """``width`` × ``height`` character cells = 2·width × 4·height dots; (0, 0) bottom left."""

    def __init__(self, width: int, height: int) -> None:
        self.width = max(1, int(width))
        self.height = max(1, int(height))
        self.layers: list[tuple[str, list[list[int]]]] = []  # (style, cells[row][col])

    @property
    def dots_x(self) -> int:
        return 2 * self.width

    @property
    def dots_y(self) -> int:
        return 4 * self.height

    def layer(self, style: str) -> int:
        """Add a layer drawn in ``style``; later layers win over earlier ones."""
        self.layers.append((style, [[0] * self.width for _ in range(self.height)]))
        return len(self.layers) - 1

    def dot(self, layer: int, x: int, y: int) -> None:
        if not (0 <= x < self.dots_x and 0 <= y < self.dots_y):
            return
        row = self.height - 1 - y // 4
        dy = 3 - y % 4
        self.layers[layer][1][row][x // 2] |= _BITS[dy][x % 2]

    def line(self, layer: int, x0: float, y0: float, x1: float, y1: float) -> None:
        """Straight line between two points in dot coordinates."""
        n = int(max(abs(x1 - x0), abs(y1 - y0))) + 1
        for i in range(n + 1):
            t = i / n
            self.dot(layer, round(x0 + (x1 - x0) * t), round(y0 + (y1 - y0) * t))

    def polyline(self, layer: int, points: Iterable[tuple[float, float]]) -> None:
        prev = None
        for p in points:
            if p is None or not all(math.isfinite(v) for v in p):
                prev = None
                continue
            if prev is None:
                self.dot(layer, round(p[0]), round(p[1]))
            else:
                self.line(layer, prev[0], prev[1], p[0], p[1])
            prev = p

    def vline(self, layer: int, x: int, dashed: bool = False) -> None:
        for y in range(self.dots_y):
            if not dashed or (y // 2) % 2 == 0:
                self.dot(layer, x, y)

    def cells(self) -> list[list[tuple[str, str]]]:
        """Rows (top first) of (character, style); empty cells are spaces with style ''."""
        out = []
        for r in range(self.height):
            row = []
            for c in range(self.width):
                bits, style = 0, ""
                for st, grid in self.layers:
                    if grid[r][c]:
                        bits |= grid[r][c]
                        style = st
                row.append((chr(0x2800 + bits) if bits else " ", style))
            out.append(row)
        return out


def nice_ticks(lo: float, hi: float, count: int = 5) -> list[float]:
    """Round tick values between lo and hi (1, 2, 5 × 10^k steps)."""
    if not (math.isfinite(lo) and math.isfinite(hi)) or hi <= lo:
        return [lo]
    raw = (hi - lo) / max(1, count)
    mag = 10 ** math.floor(math.log10(raw))
    step = next(m * mag for m in (1, 2, 5, 10) if m * mag >= raw)
    first = math.ceil(lo / step) * step
    ticks = []
    v = first
    while v <= hi + 1e-9 * step:
        ticks.append(round(v, 12))
        v += step
    return ticks


def scale(values: Sequence[float], lo: float, hi: float, dots: int) -> list[float]:
    """Map values in [lo, hi] to dot coordinates 0 … dots-1 (NaN stays NaN)."""
    span = hi - lo if hi > lo else 1.0
    return [((v - lo) / span) * (dots - 1) if math.isfinite(v) else math.nan for v in values]
