"""Charts drawn with matplotlib (Agg, no display): one quiet style shared by every figure."""
from __future__ import annotations

import io

from calc.cautions import CHART

STYLE = {"font.size": 9, "axes.spines.top": False, "axes.spines.right": False, "axes.grid": True,
         "grid.color": "#dddddd", "grid.linewidth": 0.6, "axes.edgecolor": "#555555"}
#: coolmargin's own palette: ink blue, amber, teal, plum, slate. Blue against amber stays apart for
#: red-green colour blindness; charts never tell two states apart by colour alone (markers and labels).
COLOURS = ("#2b4c7e", "#d98b2b", "#3a9a8f", "#8a5a9c", "#6b6b6b")
INK, AMBER, TEAL, PLUM, SLATE = COLOURS


def margin_colours():
    """The colour map of margins: amber below the safety factor, pale at it, teal and ink blue above (the house
    palette, not red against green); a chart pairs it with a hatch or a label, never colour alone."""
    from matplotlib.colors import LinearSegmentedColormap

    return LinearSegmentedColormap.from_list("coolmargin_margin",
                                             [AMBER, "#f2dcb8", "#eef1f2", "#bfe0dc", TEAL, INK])


def figure(rows: int, sharex: bool = True):
    """A figure of ``rows`` stacked panels in the house style; returns (figure, axes array)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from cycler import cycler

    style = dict(STYLE, **{"axes.prop_cycle": cycler(color=COLOURS)})
    with plt.rc_context(style):
        fig, axes = plt.subplots(rows, 1, figsize=(7.5, 2.6 * rows + 0.4), sharex=sharex, squeeze=False)
    return fig, axes[:, 0]


def render(fig, fmt: str) -> bytes:
    """SVG or PNG bytes of ``fig`` (reproducible: no date in the SVG); closes the figure."""
    import matplotlib.pyplot as plt

    import matplotlib

    buffer = io.BytesIO()
    fig.tight_layout()
    with matplotlib.rc_context({"svg.hashsalt": "coolmargin"}):  # the same chart gives the same bytes
        fig.savefig(buffer, format=fmt, dpi=120, metadata={"Date": None} if fmt == "svg" else None)
    plt.close(fig)
    return buffer.getvalue()


def footnote(fig) -> None:
    fig.text(0.01, 0.003, CHART,
             fontsize=7, color="#777777")


# Default API units too small to read on an axis, and the unit drawn instead (a request's output units
# replace the default, and are drawn as asked).
_READABLE = {"W": ("kW", 1e-3), "s": ("h", 1 / 3600.0), "Pa": ("bar", 1e-5)}


def readable(values, unit: str) -> tuple[list, str]:
    """``values`` (None kept) and their axis unit: W drawn as kW, s as h, Pa as bar; other units as given."""
    shown, factor = _READABLE.get(unit, (unit, 1.0))
    return [None if v is None else v * factor for v in values], shown


def margins(axis, positions, values, bands, adequate, *, horizontal: bool = False,
            band_label: str = "margin band") -> None:
    """Margins as verdict markers with their band as error bars, the same in every chart that shows verdicts.

    Adequate: filled teal circles; not adequate: open amber triangles labelled "NOT adequate" in the
    legend (never colour alone). ``positions`` place the points along the other axis (a volume, a rank);
    ``bands`` are the answers' ``margin_band`` objects (None, or without low/high: no bar);
    ``horizontal`` draws the margin along x.
    """
    lows = [b.get("low") if b and b.get("low") is not None else m for b, m in zip(bands, values)]
    highs = [b.get("high") if b and b.get("high") is not None else m for b, m in zip(bands, values)]
    spread = [[m - lo for m, lo in zip(values, lows)], [hi - m for m, hi in zip(values, highs)]]
    x, y = (values, positions) if horizontal else (positions, values)
    axis.errorbar(x, y, **{"xerr" if horizontal else "yerr": spread}, fmt="none", ecolor="#777777",
                  elinewidth=1.0, capsize=3, zorder=2, label=band_label)
    for verdict, marker, face, legend in ((True, "o", TEAL, "adequate"), (False, "v", "white", "NOT adequate")):
        colour = TEAL if verdict else AMBER
        chosen = [(a, b) for a, b, ok in zip(x, y, adequate) if bool(ok) == verdict]
        if chosen:
            axis.scatter([a for a, _ in chosen], [b for _, b in chosen], marker=marker, s=42, zorder=3,
                         edgecolors=colour, facecolors=face, linewidths=1.4, label=legend)
