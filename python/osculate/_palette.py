"""The colours of every figure the package draws: the only module with colour literals.

How the colours were chosen
---------------------------
Every colour is either a *neutral grey* of a stated CIELAB lightness L* (a* = b* = 0: greys look
the same to every kind of colour vision) or a *sample of one of matplotlib's own perceptually
uniform colour maps* (viridis, cividis, plasma, inferno, magma) at a stated point; :data:`SOURCES`
records the map and the point of every sampled colour, and the tests check each literal against
matplotlib.

The categorical sets (frame glyphs, reference lines, flag shadings) were picked from those maps,
sampled every 0.05, by a small search that maximises the smallest CIELAB colour difference ΔE*ab
between any two members (and white, the paper) as seen with normal vision, protanopia and
deuteranopia, using the dichromat simulation of this module (:func:`simulate`). Flag shadings are
judged as drawn, at :data:`FLAG_ALPHA` over white, and only light results (L* ≥ 75) were allowed
so that the curves stay readable on them; they also differ from the standard-error band. Light
tints cannot differ much, so each flag also has its own hatch (STRAIGHT: plain). The
smallest differences reached, which the tests assert, are in :data:`MIN_DELTA_E`. Flags are
further told apart by a hatch each (:data:`HATCHES`) and reference lines by a dash pattern each,
so colour is never the only cue. The element kinds of a curvature diagram (straight, arc, spiral)
were searched the same way, as shaded at :data:`ELEMENT_ALPHA` over white with L* ≥ 80 and apart
from the band; the fitted model drawn over them (:data:`MODEL`) is a sample with L* ≤ 60 far from
the estimated curve, the three tints and white (the farthest, inferno 0.60 and 0.65, lie next to
the tangent glyph's colour, so the next one down was taken). Element kinds are also told apart
by the model's shape (0, constant, linear) and, on a path, by a dash pattern each. Continuous
quantities use matplotlib's viridis (or the caller's colour map); tracks use viridis sampled
evenly between 0 and 0.82.

The dichromat simulation
------------------------
Colours are linearised (sRGB transfer function, IEC 61966-2-1), taken to XYZ (sRGB primaries,
D65) and to cone responses LMS (Hunt–Pointer–Estévez matrix). A protanope lacks the L cones and
a deuteranope the M cones: the missing response is replaced by the linear combination of the two
remaining ones that leaves white and the sRGB blue primary unchanged (the construction of
Viénot, Brettel & Mollon, *Color Research and Application* 24(4), 1999; the coefficients are
solved here, not copied). Tritanopia (rare, and not modelled well this way) is not checked.

Examples
--------
>>> from osculate import _palette as palette
>>> palette.SOURCES[palette.GLYPHS["T"]]
('inferno', 0.65)
>>> round(palette.delta_e(palette.GLYPHS["T"], palette.GLYPHS["N"], "deutan"), 1) > 20
True
"""

from __future__ import annotations

from typing import Any

import numpy as np
import numpy.typing as npt

__all__ = [
    "BAND",
    "BAND_ALPHA",
    "ELEMENTS",
    "ELEMENT_ALPHA",
    "FLAGS",
    "FLAG_ALPHA",
    "GLYPHS",
    "GREYS",
    "GRID",
    "HATCHES",
    "INK",
    "LINE",
    "MIN_DELTA_E",
    "MODEL",
    "MUTED",
    "NONE",
    "PANE",
    "PAPER",
    "REFERENCES",
    "SOURCES",
    "TRUTH",
    "UNDEFINED",
    "cielab",
    "delta_e",
    "simulate",
    "to_rgb",
]

# -- neutral greys, by CIELAB lightness L* --------------------------------------------------------
PAPER = "#ffffff"  # L* 100: figure background, fill of start markers
INK = "#262626"  # L* 15: text and axes
TRUTH = "#1b1b1b"  # L* 10: known ground truth, drawn dashed
MUTED = "#6a6a6a"  # L* 45: subtitles, tick marks, cautions (contrast 5.4 : 1 on white)
UNDEFINED = "#c1c1c1"  # L* 78: samples where the coloured quantity is undefined
GRID = "#e5e5e5"  # L* 91: grid lines
PANE = "#f8f8f8"  # L* 97.5: background panes of 3-D axes
NONE = "none"  # no colour at all (hollow markers, invisible legend patches)

#: Every grey above with its stated L*.
GREYS = {PAPER: 100.0, INK: 15.0, TRUTH: 10.0, MUTED: 45.0, UNDEFINED: 78.0, GRID: 91.0, PANE: 97.5}

# -- samples of matplotlib's colour maps ----------------------------------------------------------
LINE = "#083370"  # cividis 0.10: estimated curves
BAND = LINE  # the ±1.96 standard-error band: the curve's own colour, translucent (BAND_ALPHA)
BAND_ALPHA = 0.3
GLYPHS = {  # moving-frame arrows: tangent, normal (or U), binormal (or V)
    "T": "#ea632a",  # inferno 0.65
    "N": "#a82e5f",  # inferno 0.45
    "B": "#7e03a8",  # plasma 0.25
}
REFERENCES = [  # reference limit lines, in turn (each also with its own dash pattern)
    "#7f1e6c",  # inferno 0.35
    "#f37819",  # inferno 0.70
    "#5601a4",  # plasma 0.15
    "#de4968",  # magma 0.60
]
FLAG_ALPHA = 0.3  # flag shadings are drawn at this opacity over white
FLAGS = {  # by flag name
    "STOPPED": "#41049d",  # plasma 0.10
    "STRAIGHT": "#fcffa4",  # inferno 1.00 (the palest: it often covers long stretches)
    "GAP": "#f37819",  # inferno 0.70
    "INVALID": "#21918c",  # viridis 0.50
    "EDGE": "#dfe318",  # viridis 0.95
    "VAGUE": "#44bf70",  # viridis 0.70
}
HATCHES = {  # a second cue for each flag shading, independent of colour ("": plain)
    "STOPPED": "..",
    "STRAIGHT": "",
    "GAP": "xx",
    "INVALID": "\\\\",
    "EDGE": "//",
    "VAGUE": "||",
}
ELEMENT_ALPHA = 0.3  # element shadings of the curvature diagram are drawn at this opacity
ELEMENTS = {  # by element kind (osculate.elements.KINDS)
    "straight": "#7d7c78",  # cividis 0.50 (nearly neutral: a straight is "no turn")
    "arc": "#7ad151",  # viridis 0.80
    "spiral": "#f0f921",  # plasma 1.00
}
MODEL = "#cc4248"  # inferno 0.55: the fitted chain of elements, over the estimate

#: Where each sampled colour comes from: (matplotlib colour map, point in [0, 1]).
SOURCES: dict[str, tuple[str, float]] = {
    LINE: ("cividis", 0.10),
    GLYPHS["T"]: ("inferno", 0.65),
    GLYPHS["N"]: ("inferno", 0.45),
    GLYPHS["B"]: ("plasma", 0.25),
    REFERENCES[0]: ("inferno", 0.35),
    REFERENCES[1]: ("inferno", 0.70),
    REFERENCES[2]: ("plasma", 0.15),
    REFERENCES[3]: ("magma", 0.60),
    FLAGS["STOPPED"]: ("plasma", 0.10),
    FLAGS["STRAIGHT"]: ("inferno", 1.00),
    FLAGS["INVALID"]: ("viridis", 0.50),
    FLAGS["EDGE"]: ("viridis", 0.95),
    FLAGS["VAGUE"]: ("viridis", 0.70),
    ELEMENTS["straight"]: ("cividis", 0.50),
    ELEMENTS["arc"]: ("viridis", 0.80),
    ELEMENTS["spiral"]: ("plasma", 1.00),
    MODEL: ("inferno", 0.55),
}

#: Smallest ΔE*ab between members of each set (and white), under normal vision, protanopia and
#: deuteranopia (flags as shaded, at FLAG_ALPHA over white, together with the band; element
#: kinds at ELEMENT_ALPHA over white with the band; the model against the estimated curve, the
#: element tints and white).
MIN_DELTA_E = {"GLYPHS": 50.0, "REFERENCES": 40.0, "FLAGS": 8.5, "ELEMENTS": 13.5, "MODEL": 40.0}

# -- colour science: sRGB, CIELAB, dichromat simulation -------------------------------------------
_SRGB_TO_XYZ = np.array(  # sRGB primaries, D65 white (IEC 61966-2-1)
    [[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]]
)
_XYZ_TO_LMS = np.array(  # Hunt-Pointer-Estevez cone fundamentals
    [[0.4002, 0.7076, -0.0808], [-0.2263, 1.1653, 0.0457], [0.0, 0.0, 0.9182]]
)
_RGB_TO_LMS = _XYZ_TO_LMS @ _SRGB_TO_XYZ
_WHITE_XYZ = _SRGB_TO_XYZ.sum(axis=1)
_MISSING_CONE = {"protan": 0, "deutan": 1}


def to_rgb(colour: Any) -> npt.NDArray[np.float64]:
    """Return sRGB components in [0, 1] of a ``#rrggbb`` string or of an RGB triple.

    Parameters
    ----------
    colour : str or array_like
        ``"#rrggbb"``, or components in [0, 1] with shape (..., 3).

    Returns
    -------
    ndarray, shape (..., 3)

    Examples
    --------
    >>> to_rgb("#ff8000").round(3).tolist()
    [1.0, 0.502, 0.0]
    """
    if isinstance(colour, str):
        h = colour.lstrip("#")
        if len(h) != 6:
            raise ValueError(f"expected #rrggbb, got {colour!r}")
        return np.array([int(h[i : i + 2], 16) / 255.0 for i in (0, 2, 4)])
    return np.asarray(colour, dtype=float)


def _linear(c: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
    return np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)


def _encoded(c: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
    c = np.clip(c, 0.0, 1.0)
    return np.where(c <= 0.0031308, 12.92 * c, 1.055 * c ** (1.0 / 2.4) - 0.055)


def _dichromat_matrix(kind: str) -> npt.NDArray[np.float64]:
    """Linear-RGB matrix of a dichromat's view: the missing cone from the other two."""
    missing = _MISSING_CONE[kind]
    keep = [i for i in range(3) if i != missing]
    white = _RGB_TO_LMS @ np.ones(3)
    blue = _RGB_TO_LMS @ np.array([0.0, 0.0, 1.0])
    coef = np.linalg.solve(np.array([white[keep], blue[keep]]), [white[missing], blue[missing]])
    project = np.eye(3)
    project[missing] = 0.0
    project[missing, keep] = coef
    return np.linalg.inv(_RGB_TO_LMS) @ project @ _RGB_TO_LMS


def simulate(colour: Any, kind: str) -> npt.NDArray[np.float64]:
    """Return a colour as seen with normal vision, protanopia or deuteranopia (sRGB, [0, 1]).

    Parameters
    ----------
    colour : str or array_like
        ``"#rrggbb"`` or sRGB components, shape (..., 3).
    kind : {"normal", "protan", "deutan"}
        The colour vision.

    Returns
    -------
    ndarray, shape (..., 3)

    Examples
    --------
    White and blue are unchanged; pure red and green both turn yellowish for a deuteranope:

    >>> simulate("#ffffff", "deutan").round(6).tolist()
    [1.0, 1.0, 1.0]
    >>> r, g = simulate("#ff0000", "deutan"), simulate("#00ff00", "deutan")
    >>> bool(abs(r[0] - r[1]) < 1e-9 and abs(g[0] - g[1]) < 1e-9)
    True
    """
    rgb = to_rgb(colour)
    if kind == "normal":
        return rgb
    if kind not in _MISSING_CONE:
        raise ValueError(f"kind: expected 'normal', 'protan' or 'deutan', got {kind!r}")
    return _encoded(_linear(rgb) @ _dichromat_matrix(kind).T)


def cielab(colour: Any) -> npt.NDArray[np.float64]:
    """Return CIELAB (L*, a*, b*) of an sRGB colour, D65 white.

    Examples
    --------
    >>> cielab("#6a6a6a").round(1).tolist()
    [44.8, 0.0, 0.0]
    """
    xyz = _linear(to_rgb(colour)) @ _SRGB_TO_XYZ.T / _WHITE_XYZ
    e = 6.0 / 29.0
    f = np.where(xyz > e**3, np.cbrt(xyz), xyz / (3 * e**2) + 4.0 / 29.0)
    lab = [116 * f[..., 1] - 16, 500 * (f[..., 0] - f[..., 1]), 200 * (f[..., 1] - f[..., 2])]
    return np.stack(lab, axis=-1)


def delta_e(a: Any, b: Any, kind: str = "normal") -> float:
    """Return the CIELAB difference ΔE*ab (CIE 1976) of two colours as seen by ``kind``.

    Examples
    --------
    >>> round(delta_e("#000000", "#ffffff"), 1)
    100.0
    """
    return float(np.linalg.norm(cielab(simulate(a, kind)) - cielab(simulate(b, kind))))
