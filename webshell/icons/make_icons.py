"""Draw Tidewell's app icons as PNG files (standard library only: zlib + struct).

Run ``python3 webshell/icons/make_icons.py`` after changing the drawing; the PNGs are committed and
build.py copies them as they are (this script itself is not shipped).

The drawing is our own: a cream ring (the well) holding a rising aqua tide with one bubble, on a deep
teal ground. ``icon-*`` have rounded corners and a transparent outside; ``maskable-*`` and the Apple
touch icon fill the whole square and keep the drawing inside the central safe circle (radius 40 %).
"""

from __future__ import annotations

import math
import struct
import zlib
from pathlib import Path

HERE = Path(__file__).resolve().parent

GROUND = (15, 76, 92)  # deep teal, also the manifest's theme colour #0f4c5c
RING = (244, 239, 225)  # cream #f4efe1
TIDE = (94, 196, 192)  # aqua #5ec4c0
TIDE_DARK = (54, 150, 156)
SUPERSAMPLE = 3


def _inside_rounded_square(x: float, y: float, radius: float) -> bool:
    cx = min(max(x, radius), 1 - radius)
    cy = min(max(y, radius), 1 - radius)
    return (x - cx) ** 2 + (y - cy) ** 2 <= radius**2


def _drawing(u: float, v: float):
    """Colour of the drawing at (u, v) in its own unit square, or None for the ground."""
    dx, dy = u - 0.5, v - 0.5
    r = math.hypot(dx, dy)
    if 0.30 <= r <= 0.37:
        return RING
    if r < 0.30:
        if math.hypot(u - 0.56, v - 0.33) <= 0.045:
            return RING
        crest = 0.52 + 0.035 * math.sin(2 * math.pi * (u * 1.7 + 0.1))
        if v >= crest:
            second = 0.66 + 0.03 * math.sin(2 * math.pi * (u * 1.7 + 0.6))
            return TIDE_DARK if v >= second else TIDE
    return None


def render(size: int, *, maskable: bool) -> list[list[tuple[int, int, int, int]]]:
    rows = []
    n = SUPERSAMPLE
    # maskable: the drawing fits the central 76 % so the ring stays inside the 40 % safe circle
    scale = 0.76 if maskable else 1.0
    for py in range(size):
        row = []
        for px in range(size):
            acc = [0.0, 0.0, 0.0, 0.0]
            for sy in range(n):
                for sx in range(n):
                    x = (px + (sx + 0.5) / n) / size
                    y = (py + (sy + 0.5) / n) / size
                    if not maskable and not _inside_rounded_square(x, y, 0.22):
                        continue
                    u = 0.5 + (x - 0.5) / scale
                    w = 0.5 + (y - 0.5) / scale
                    colour = _drawing(u, w) or GROUND
                    acc[0] += colour[0]
                    acc[1] += colour[1]
                    acc[2] += colour[2]
                    acc[3] += 255
            count = n * n
            alpha = acc[3] / count
            if alpha == 0:
                row.append((0, 0, 0, 0))
            else:
                k = 255 / acc[3]
                row.append((round(acc[0] * k), round(acc[1] * k), round(acc[2] * k), round(alpha)))
        rows.append(row)
    return rows


def png_bytes(rows) -> bytes:
    height, width = len(rows), len(rows[0])
    raw = b"".join(b"\x00" + bytes(c for px in row for c in px) for row in rows)

    def chunk(kind: bytes, data: bytes) -> bytes:
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data))

    header = struct.pack(">IIBBBBB", width, height, 8, 6, 0, 0, 0)  # 8-bit RGBA
    return (
        b"\x89PNG\r\n\x1a\n"
        + chunk(b"IHDR", header)
        + chunk(b"IDAT", zlib.compress(raw, 9))
        + chunk(b"IEND", b"")
    )


ICONS = {
    "icon-192.png": (192, False),
    "icon-512.png": (512, False),
    "maskable-192.png": (192, True),
    "maskable-512.png": (512, True),
    "apple-touch-icon.png": (180, True),
}


def main() -> None:
    for name, (size, maskable) in ICONS.items():
        (HERE / name).write_bytes(png_bytes(render(size, maskable=maskable)))
        print(f"wrote {name} ({size} px{', maskable' if maskable else ''})")


if __name__ == "__main__":
    main()
