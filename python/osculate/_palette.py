"""The colours of every figure the package draws, in one place (our own palette)."""

from __future__ import annotations

__all__ = [
    "BAND",
    "CAUTION_EDGE",
    "CAUTION_FILL",
    "CAUTION_TEXT",
    "FLAGS",
    "GLYPHS",
    "GRID",
    "INK",
    "LINE",
    "MUTED",
    "PANE",
    "REFERENCES",
    "TRUTH",
    "UNDEFINED",
]

INK = "#1d2330"  # text and axes
MUTED = "#6b7280"  # subtitles, ticks
GRID = "#e3e5e8"
PANE = "#f7f8fa"  # background panes of 3-D axes
LINE = "#2f4b7c"  # estimated curves
BAND = "#8fa6c9"  # ±1.96 standard-error bands around them
UNDEFINED = "#b8bcc4"  # samples where the coloured quantity is undefined
TRUTH = "#111827"  # known ground truth, dashed
GLYPHS = {"T": "#c2410c", "N": "#0f766e", "B": "#7e22ce"}  # tangent, normal, binormal
FLAGS = {  # by flag name
    "STOPPED": "#9ca3af",
    "STRAIGHT": "#93c5fd",
    "GAP": "#f87171",
    "INVALID": "#374151",
    "EDGE": "#fcd34d",
    "VAGUE": "#d8b4fe",
}
REFERENCES = ["#b91c1c", "#1d4ed8", "#4d7c0f", "#6d28d9"]  # reference limit lines, in turn
CAUTION_TEXT = "#7f1d1d"
CAUTION_FILL = "#fef2f2"
CAUTION_EDGE = "#fca5a5"
