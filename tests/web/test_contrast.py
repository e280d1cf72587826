"""Colour contrast of the palette in static/app.css (WCAG 2.1 §1.4.3: 4.5:1 for body text).

Relative luminance and contrast ratio per WCAG 2.1, "relative luminance" definition:
L = 0.2126 R + 0.7152 G + 0.0722 B with each channel linearised; ratio = (L1 + 0.05)/(L2 + 0.05).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

CSS = (Path(__file__).resolve().parents[2] / "static" / "app.css").read_text()
VARS = dict(re.findall(r"--([a-z-]+):\s*(#[0-9a-fA-F]{6})", CSS))


def _luminance(hex_colour: str) -> float:
    channels = [int(hex_colour[i : i + 2], 16) / 255 for i in (1, 3, 5)]
    lin = [c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4 for c in channels]
    return 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2]


def contrast(a: str, b: str) -> float:
    la, lb = sorted((_luminance(a), _luminance(b)), reverse=True)
    return (la + 0.05) / (lb + 0.05)


def test_contrast_formula_against_published_extremes() -> None:
    # WCAG 2.1: black on white is 21:1; a colour on itself is 1:1
    assert contrast("#000000", "#ffffff") == pytest.approx(21.0)
    assert contrast("#777777", "#777777") == pytest.approx(1.0)


@pytest.mark.parametrize(
    ("fg", "bg"),
    [
        ("ink", "paper"), ("muted", "paper"), ("ink", "card"), ("muted", "card"),
        ("accent", "card"), ("accent", "paper"), ("accent-ink", "accent"), ("err", "card"),
        ("err", "err-bg"), ("warn-ink", "warn-bg"), ("ok", "card"),
    ],
)  # fmt: skip
def test_text_pairs_meet_4_5_to_1(fg: str, bg: str) -> None:
    assert contrast(VARS[fg], VARS[bg]) >= 4.5, (
        f"{fg} on {bg}: {contrast(VARS[fg], VARS[bg]):.2f}:1"
    )
