"""Keeping part labels apart: a greedy top-to-bottom shift of overlapping boxes (pixels)."""

from __future__ import annotations

Box = tuple[float, float, float, float]
"""(x0, y0, x1, y1) in screen pixels, y growing downwards."""

GAP_PX = 2.0


def declutter(boxes: list[Box]) -> list[float]:
    """Downward shifts (px) that leave no two boxes overlapping.

    Boxes are taken from the top down; each one that meets a box already placed moves
    down just below it (plus ``GAP_PX``), and is checked again, until it meets none.
    Boxes that do not touch keep their places, so a tidy layout is left as it is.
    """
    order = sorted(range(len(boxes)), key=lambda i: (boxes[i][1], boxes[i][0]))
    placed: list[Box] = []
    shifts = [0.0] * len(boxes)
    for i in order:
        x0, y0, x1, y1 = boxes[i]
        dy = 0.0
        moved = True
        while moved:
            moved = False
            for px0, py0, px1, py1 in placed:
                if x0 < px1 and px0 < x1 and y0 + dy < py1 and py0 < y1 + dy:
                    dy = py1 + GAP_PX - y0
                    moved = True
        shifts[i] = dy
        placed.append((x0, y0 + dy, x1, y1 + dy))
    return shifts
