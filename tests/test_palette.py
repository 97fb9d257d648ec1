"""The palette: documented colours, told apart with common colour-vision deficiencies, and the
only module of the package with colour literals."""

import ast
import itertools
import pathlib
import re

import numpy as np
import pytest
from osculate import _palette as palette

PACKAGE = pathlib.Path(__file__).resolve().parents[1] / "python" / "osculate"
VISIONS = ("normal", "protan", "deutan")

# -- the grep: no colour literal outside _palette.py --------------------------------------------

HEX_WHOLE = re.compile(r"#(?:[0-9a-fA-F]{3,4}|[0-9a-fA-F]{6}|[0-9a-fA-F]{8})")
HEX_INSIDE = re.compile(r"#[0-9a-fA-F]{6}(?:[0-9a-fA-F]{2})?\b")
PLOT_FORMAT = re.compile(r"^[-.:o^v<>sp*hHd+xX|_1-4,]*[bgrcmykw][-.:o^v<>sp*hHd+xX|_1-4,]*$")
COLOUR_NAMES = {"c", "fc", "ec", "mfc", "mec", "bad", "under", "over"}


def is_colour_name(name):
    name = name.lower()
    return name in COLOUR_NAMES or "color" in name or "colour" in name


def colour_spec(node):
    """Whether an expression holds a literal colour: a colour string or an RGB(A) tuple."""
    from matplotlib.colors import is_color_like

    for sub in ast.walk(node):
        if isinstance(sub, ast.Constant) and isinstance(sub.value, str):
            if is_color_like(sub.value):
                return repr(sub.value)
        if isinstance(sub, (ast.Tuple, ast.List)) and len(sub.elts) in (3, 4):
            if all(
                isinstance(e, ast.Constant) and isinstance(e.value, (int, float)) for e in sub.elts
            ):
                return ast.unparse(sub)
    return None


def colour_literals(source):
    """(line, literal) of every colour literal in Python source.

    Hex colours in any string; and colour strings (named colours, grey levels such as "0.2",
    "tab:blue", "C0", "none"), RGB(A) tuples and plot format strings ("r--") where a colour
    goes: colour keywords (color=, facecolor=, ec=, ...), colour keys of dict literals, names
    assigned a colour, the arguments of set_*color* methods and plot's format string.
    """
    found = []
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, ast.Constant) and isinstance(node.value, str):
            if HEX_WHOLE.fullmatch(node.value.strip()) or HEX_INSIDE.search(node.value):
                found.append((node.lineno, node.value))
        elif isinstance(node, ast.keyword) and node.arg and is_colour_name(node.arg):
            spec = colour_spec(node.value)
            if spec:
                found.append((node.value.lineno, f"{node.arg}={spec}"))
        elif isinstance(node, ast.Dict):
            for key, value in zip(node.keys, node.values):
                if isinstance(key, ast.Constant) and isinstance(key.value, str):
                    if is_colour_name(key.value) and (spec := colour_spec(value)):
                        found.append((value.lineno, f"{key.value!r}: {spec}"))
        elif isinstance(node, (ast.Assign, ast.AnnAssign)):
            targets = node.targets if isinstance(node, ast.Assign) else [node.target]
            names = [t.id for t in targets if isinstance(t, ast.Name)]
            if node.value is not None and any(is_colour_name(n) for n in names):
                if spec := colour_spec(node.value):
                    found.append((node.lineno, f"{names[0]} = {spec}"))
        elif isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute):
            attr = node.func.attr
            if attr.startswith("set_") and is_colour_name(attr):
                for arg in node.args:
                    if spec := colour_spec(arg):
                        found.append((node.lineno, f"{attr}({spec})"))
            if attr == "plot":
                for arg in node.args:
                    if isinstance(arg, ast.Constant) and isinstance(arg.value, str):
                        if PLOT_FORMAT.match(arg.value):
                            found.append((node.lineno, f"plot(..., {arg.value!r})"))
    return found


@pytest.mark.parametrize(
    "snippet",
    [
        'INK = "#1d2330"',
        'x = f"{a}"; y = "#abc"',
        '"""Docs: draw it in #c2410c."""',
        'ax.plot(x, y, color="red")',
        'ax.scatter(x, y, facecolors="0.2")',
        "Circle((0, 0), 1, edgecolor=(0.1, 0.2, 0.3))",
        "ax.text(0, 0, 's', bbox={'facecolor': 'white', 'edgecolor': 'none'})",
        'colour = "tab:blue"',
        'line_color: str = "C1"',
        'ax.plot(x, y, "r--")',
        'line.set_color("k")',
        "cmap.with_extremes(bad=(0.5, 0.5, 0.5, 1.0))",
        'ax.scatter(x, y, c="xkcd:sky blue")',
        'ax.scatter(x, y, ec="none")',
    ],
)
def test_the_grep_finds_colour_literals(snippet):
    assert colour_literals(snippet), snippet


@pytest.mark.parametrize(
    "snippet",
    [
        'ax.plot(x, y, linestyle="none")',
        'plot.path(k, color="speed")',
        'open(p, "w")',
        "ax.plot(x, y, color=palette.INK)",
        'ax.scatter(x, y, c=values, cmap="viridis")',
        'Line2D([], [], marker="o", linestyle="none", markerfacecolor=palette.NONE)',
        'ax.plot(x, y, "--")',
        'text = "see issue #123 and commit 3ce06f0"',
    ],
)
def test_the_grep_passes_what_is_no_colour(snippet):
    assert not colour_literals(snippet), snippet


def test_no_colour_literals_outside_the_palette():
    # Every module, subpackages included (plot/, report/, ...).
    files = sorted(p for p in PACKAGE.rglob("*.py") if p.name != "_palette.py")
    # The modules that draw are checked: every plot's module and the shared layers.
    drawing = {p.name for p in files if p.parent.name == "plot"}
    assert {"_path.py", "_profile.py", "_gg.py", "_layers.py"} <= drawing
    offenders = [
        f"{p.relative_to(PACKAGE)}:{line}: {text}"
        for p in files
        for line, text in colour_literals(p.read_text(encoding="utf-8"))
    ]
    assert not offenders, "colour literals belong in _palette.py:\n" + "\n".join(offenders)


def test_the_palette_itself_is_seen_by_the_grep():
    # The same grep finds the palette's own literals: the test above is not vacuous.
    found = colour_literals((PACKAGE / "_palette.py").read_text(encoding="utf-8"))
    assert {text for _, text in found} >= {palette.INK, palette.LINE, *palette.REFERENCES}


# -- where each colour comes from --------------------------------------------------------------


def palette_hexes():
    """Every #rrggbb literal of the palette module."""
    source = (PACKAGE / "_palette.py").read_text(encoding="utf-8")
    return {
        node.value
        for node in ast.walk(ast.parse(source))
        if isinstance(node, ast.Constant)
        and isinstance(node.value, str)
        and re.fullmatch(r"#[0-9a-f]{6}", node.value)
    }


def test_every_colour_is_a_stated_grey_or_a_stated_colour_map_sample():
    from matplotlib import colormaps
    from matplotlib.colors import to_hex

    hexes = palette_hexes()
    assert len(hexes) >= 15
    for h in hexes:
        if h in palette.GREYS:
            lab = palette.cielab(h)
            assert abs(lab[1]) < 1e-6 and abs(lab[2]) < 1e-6, h  # neutral
            assert abs(lab[0] - palette.GREYS[h]) < 0.5, (h, lab[0])  # at the stated L*
        else:
            name, point = palette.SOURCES[h]
            assert name in {"viridis", "cividis", "plasma", "inferno", "magma"}
            assert to_hex(colormaps[name](point)) == h, (h, name, point)


def test_text_greys_are_readable_on_white():
    def luminance(colour):
        c = palette.to_rgb(colour)
        lin = np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)
        return float(lin @ [0.2126, 0.7152, 0.0722])

    def contrast(a, b):  # WCAG 2 contrast ratio
        hi, lo = sorted([luminance(a), luminance(b)], reverse=True)
        return (hi + 0.05) / (lo + 0.05)

    assert contrast(palette.MUTED, palette.PAPER) >= 4.5  # the caution line, the subtitles
    assert contrast(palette.INK, palette.PAPER) >= 12.0


# -- the dichromat simulation ------------------------------------------------------------------


def test_simulation_keeps_white_black_and_blue():
    for kind in VISIONS:
        for c in ("#ffffff", "#000000", "#0000ff"):
            assert np.allclose(palette.simulate(c, kind), palette.to_rgb(c), atol=1e-9)
    with pytest.raises(ValueError, match="kind"):
        palette.simulate("#ffffff", "tritan")


def test_simulation_confuses_red_and_green_as_dichromats_do():
    for kind in ("protan", "deutan"):
        seen = palette.delta_e("#d62020", "#20a020", kind)
        assert seen < 0.4 * palette.delta_e("#d62020", "#20a020")
    # Blue against yellow stays clear for both.
    for kind in ("protan", "deutan"):
        assert palette.delta_e("#2020d0", "#e0e020", kind) > 70


def test_simulation_is_a_projection_onto_a_plane(rng):
    colours = rng.uniform(0.05, 0.95, size=(200, 3))
    for kind in ("protan", "deutan"):
        once = palette.simulate(colours, kind)
        inside = np.all((once > 0.001) & (once < 0.999), axis=1)  # away from clipping
        assert inside.sum() > 50
        twice = palette.simulate(once[inside], kind)
        assert np.allclose(twice, once[inside], atol=1e-6)
        # The simulated colours span a plane through black in linear RGB: rank 2.
        lin = np.where(once <= 0.04045, once / 12.92, ((once + 0.055) / 1.055) ** 2.4)
        s = np.linalg.svd(lin[inside], compute_uv=False)
        assert s[2] < 1e-6 * s[0]


# -- the sets stay apart for normal, protanope and deuteranope vision --------------------------


def over_white(colour, alpha):
    return alpha * palette.to_rgb(colour) + (1.0 - alpha)


def smallest_difference(colours):
    return min(
        palette.delta_e(a, b, kind)
        for kind in VISIONS
        for a, b in itertools.combinations(colours, 2)
    )


def test_glyph_and_reference_colours_stay_apart():
    glyphs = [*palette.GLYPHS.values(), palette.PAPER]
    assert smallest_difference(glyphs) >= palette.MIN_DELTA_E["GLYPHS"]
    references = [*palette.REFERENCES, palette.PAPER]
    assert smallest_difference(references) >= palette.MIN_DELTA_E["REFERENCES"]
    # The threshold means something: red against green falls far short for a deuteranope.
    assert smallest_difference(["#d62020", "#20a020"]) < palette.MIN_DELTA_E["REFERENCES"]


def test_flag_shadings_stay_apart_light_and_hatched():
    shades = [over_white(c, palette.FLAG_ALPHA) for c in palette.FLAGS.values()]
    band = over_white(palette.BAND, palette.BAND_ALPHA)
    white = palette.to_rgb(palette.PAPER)
    assert smallest_difference([*shades, band, white]) >= palette.MIN_DELTA_E["FLAGS"]
    assert min(palette.cielab(s)[0] for s in shades) >= 75.0  # curves stay readable on them
    assert (
        set(palette.FLAGS) == set(palette.HATCHES) == {f.name for f in __import__("osculate").Flag}
    )
    assert len(set(palette.HATCHES.values())) == len(palette.HATCHES)  # one pattern each


def test_element_shadings_and_the_model_stay_apart():
    # The kinds as shaded in a curvature diagram, with the band drawn over them and white.
    shades = [over_white(c, palette.ELEMENT_ALPHA) for c in palette.ELEMENTS.values()]
    band = over_white(palette.BAND, palette.BAND_ALPHA)
    white = palette.to_rgb(palette.PAPER)
    assert smallest_difference([*shades, band, white]) >= palette.MIN_DELTA_E["ELEMENTS"]
    assert min(palette.cielab(s)[0] for s in shades) >= 75.0  # the curves stay readable
    # The fitted model against the estimated curve, every tint and white.
    for other in [palette.LINE, *shades, white]:
        assert smallest_difference([palette.MODEL, other]) >= palette.MIN_DELTA_E["MODEL"]
    from osculate.elements import KINDS

    assert set(palette.ELEMENTS) == set(KINDS)
