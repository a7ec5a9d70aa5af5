"""Printable reports of a calculation (``format=html`` or ``format=pdf``): evidence for a change review.

A :class:`Report` is built once from the request as given and the answer (in the units asked for),
then written as self-contained HTML (charts inline, print styles: one printed page per scale) or as a
PDF through fpdf2 (pure Python; charts as PNG; the DejaVu font that matplotlib ships). Any resource
builds its report from the same pieces: :func:`check_page` for a cooling check (one vessel or one
scale), :func:`table_page` for a ranked or gridded answer (screening, jacket sizing, operating window:
a summary, tables with a column per quantity, the chart), :func:`input_rows` for the inputs as given,
:func:`build` for the frame (version, date, hash of the request, records used, cautions).
"""
from __future__ import annotations

import base64
import datetime
import hashlib
import io
import json
import math
import os
from dataclasses import dataclass, field
from typing import Any, Callable

from flask import Response, render_template

from . import VERSION

FORMATS = {"html": "text/html", "pdf": "application/pdf"}
REPORT_DIGITS = 4  # significant figures in a report, unless the request asks for others
FOOTER = ("Screening estimate from published correlations. Confirm heat release with reaction calorimetry and heat "
          "transfer with plant data; follow local codes and have a licensed engineer review before relying on it.")


@dataclass(frozen=True)
class Row:
    label: str
    value: str
    unit: str = ""
    note: str = ""

    def __post_init__(self):
        object.__setattr__(self, "unit", pretty_unit(self.unit))


@dataclass(frozen=True)
class Table:
    """A table with a column per quantity (one row per vessel, candidate or point), headings with units."""
    headings: list[str]
    rows: list[list[str]]
    numeric: list[bool]  # right-aligned columns
    marked: list[bool]  # rows printed in bold (the recommended candidate, the current point)
    widths: list[float]  # share of the page width of each column


@dataclass(frozen=True)
class Section:
    heading: str
    rows: list[Row] = field(default_factory=list)
    lines: list[str] = field(default_factory=list)  # free text: warnings, notes
    table: Table | None = None


@dataclass(frozen=True)
class Chart:
    svg: bytes
    png: bytes
    caption: str = ""


@dataclass(frozen=True)
class Page:
    heading: str
    sections: list[Section]
    verdict: str | None = None  # "ADEQUATE" / "NOT ADEQUATE"
    adequate: bool | None = None  # colours the verdict; None: neutral (a screening of many vessels)
    chart: Chart | None = None
    after: list[Section] = field(default_factory=list)  # printed below the chart (notes, warnings)


@dataclass(frozen=True)
class Report:
    title: str
    resource: str
    pages: list[Page]
    inputs: list[Row]
    records: list[Row]
    cautions: list[str]
    request_hash: str
    created: str
    version: str = VERSION
    units_note: str = ""


def request_hash(body: Any) -> str:
    """SHA-256 of the request object as canonical JSON (sorted keys, no spaces): the same inputs, the same hash."""
    canonical = json.dumps(body, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    return hashlib.sha256(canonical.encode("utf-8")).hexdigest()


def number(value: Any, digits: int = REPORT_DIGITS) -> str:
    """A value as a person reads it: ``digits`` significant figures, no exponent between 1e-4 and 1e12.

    >>> number(66458.33), number(0.0012834), number(2.19994), number(None)
    ('66,460', '0.001283', '2.200', '-')
    """
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if not isinstance(value, (int, float)):
        return str(value)
    if isinstance(value, int):  # counts, ranks, indices: whole numbers as they are
        return f"{value:,}"
    rounded = float(f"{value:.{digits}g}")
    if rounded == 0 or not math.isfinite(rounded):
        return f"{rounded:g}"
    if 1e-4 <= abs(rounded) < 1e12:
        decimals = max(0, digits - 1 - math.floor(math.log10(abs(rounded))))
        return f"{rounded:,.{decimals}f}"
    return f"{rounded:.{digits - 1}e}"


_PRETTY_UNITS = (("delta_degC", "K"), ("delta_degF", "\u0394\u00b0F"), ("degC", "\u00b0C"), ("degF", "\u00b0F"),
                 ("^2", "\u00b2"), ("^3", "\u00b3"), ("*", "\u00b7"))


def pretty_unit(unit: str) -> str:
    """A unit as printed for people: m^3 -> m³, degC -> °C, W/(m^2*K) -> W/(m²·K) (JSON keeps the plain form)."""
    for plain, printed in _PRETTY_UNITS:
        unit = unit.replace(plain, printed)
    return unit


def _flat(value: Any, prefix: str, out: list[tuple[str, Any]]) -> None:
    if isinstance(value, dict):
        for key, item in value.items():
            _flat(item, f"{prefix}.{key}" if prefix else key, out)
    elif isinstance(value, list) and any(isinstance(item, (dict, list)) for item in value):
        for index, item in enumerate(value):
            _flat(item, f"{prefix}[{index}]", out)
    else:
        out.append((prefix, value))


def input_rows(body: dict) -> list[Row]:
    """The request as given, one row per field (values verbatim: "1.8 m" stays "1.8 m")."""
    pairs: list[tuple[str, Any]] = []
    _flat(body, "", pairs)
    return [Row(name, value if isinstance(value, str) else json.dumps(value)) for name, value in pairs]


def _record_rows(payload: dict) -> list[Row]:
    """Catalogue records and revisions a result names (``records``), when the resource reports them."""
    rows = []
    for record in payload.get("records") or []:
        if isinstance(record, dict):
            label = str(record.get("path") or record.get("kind") or record.get("field") or "record")
            rest = ", ".join(f"{k} {v}" for k, v in record.items() if k not in ("path", "kind", "field"))
            rows.append(Row(label, rest))
    return rows


def _rows(payload: dict, units: dict, prefix: str, names: list[tuple[str, str]], digits: int) -> list[Row]:
    rows = []
    for key, label in names:
        node: Any = payload
        for part in key.split("."):
            node = node.get(part) if isinstance(node, dict) else None
        if node is None and key.endswith("_coil"):
            continue  # no coils: no coil rows
        note = ""
        parent, _, leaf = key.rpartition(".")
        holder = payload
        for part in parent.split(".") if parent else []:
            holder = holder.get(part, {}) if isinstance(holder, dict) else {}
        if isinstance(holder, dict) and isinstance(holder.get(leaf + "_note"), str) and node is None:
            note = holder[leaf + "_note"]
        rows.append(Row(label, number(node, digits), units.get(f"{prefix}{key}", ""), note))
    return rows


def band_section(band: dict, digits: int = REPORT_DIGITS) -> Section:
    """The margin band in a few lines: its ends with what sets each, and whether the verdict holds across it
    (each alternative's own margin is in the JSON and CSV answers, ``margin_band.members``)."""
    rows = [Row("lowest margin", number(band.get("low"), digits), "", str(band.get("low_set_by") or "")),
            Row("highest margin", number(band.get("high"), digits), "", str(band.get("high_set_by") or ""))]
    return Section("Margin band", rows, [str(band["statement"])] if band.get("statement") else [])


def check_page(payload: dict, units: dict, heading: str, *, prefix: str = "", digits: int = REPORT_DIGITS,
               chart: Chart | None = None, extra: list[Row] | None = None) -> Page:
    """One printed page of a cooling check (a single vessel, or one scale of a scale-up).

    ``prefix`` is where the check sits in the units map (``"scales."`` for a scale).
    """
    sections = []
    if extra:
        sections.append(Section("Vessel at this scale", extra))
    margin = payload.get("margin")
    required = payload.get("safety_factor")
    sections.append(Section("Heat balance", _rows(payload, units, prefix, [
        ("heat_load.reaction", "reaction heat release"), ("heat_load.agitator", "agitator work"),
        ("heat_load.feed_sensible", "sensible heat of cold feed (taken up)"), ("heat_load.total", "heat load"),
        ("cooling_capacity", "cooling capacity"), ("coolant_outlet_temperature", "coolant outlet temperature"),
        ("margin", "margin = capacity / load"), ("safety_factor", "required margin (safety factor)"),
    ], digits)))
    sections.append(Section("Limits that give the required margin", _rows(payload, units, prefix, [
        ("limits.minimum_dosing_time", "minimum dosing time"),
        ("limits.maximum_coolant_inlet_temperature", "warmest coolant inlet"),
        ("limits.required_coolant_flow", "required coolant flow"),
    ], digits)))
    band = payload.get("margin_band")
    if isinstance(band, dict):
        sections.append(band_section(band, digits))
    sections.append(Section("Heat transfer", _rows(payload, units, prefix, [
        ("heat_transfer.overall_coefficient", "overall coefficient U"), ("heat_transfer.ua", "UA"),
        ("heat_transfer.heat_transfer_area", "heat-transfer area"),
        ("heat_transfer.geometry.area_per_volume", "area per volume"),
        ("heat_transfer.resistances.controlling", "controlling resistance"),
        ("heat_transfer.film_coefficients.process_jacket", "process film, jacket wall"),
        ("heat_transfer.film_coefficients.service_jacket", "coolant film, jacket"),
        ("heat_transfer.film_coefficients.process_coil", "process film, coils"),
        ("heat_transfer.film_coefficients.service_coil", "coolant film, coils"),
        ("heat_transfer.agitation.reynolds", "impeller Reynolds number"),
        ("heat_transfer.agitation.power", "agitator power"),
    ], digits)))
    warnings = [w.get("message", "") for w in payload.get("warnings") or []]
    sections.append(Section("Warnings", lines=warnings or ["none"]))
    adequate = payload.get("adequate")
    verdict = None if adequate is None else ("ADEQUATE" if adequate else "NOT ADEQUATE")
    if verdict and margin is not None and required is not None:
        verdict += f": margin {number(margin, 3)} against {number(required, 3)} required"
    return Page(heading, sections, verdict, adequate, chart)


def value_at(item: Any, key: str) -> Any:
    """The value at dotted ``key`` of ``item`` (None where the path ends early)."""
    for part in key.split("."):
        item = item.get(part) if isinstance(item, dict) else None
    return item


@dataclass(frozen=True)
class Column:
    """A column of a :class:`Table`: the dotted ``key`` of each item's value, its heading, and where its unit is
    found in the answer's units map (``unit_key``; ``""``: a pure number or text). ``text`` writes a cell
    that is not a single value (a band "low-high", a verdict)."""
    key: str
    heading: str
    unit_key: str = ""
    text: Callable[[dict], str] | None = None
    figures: int | None = None  # significant figures; default the report's


def table_section(heading: str, items: list[dict], columns: list[Column], units: dict, *,
                  digits: int = REPORT_DIGITS, marked: Callable[[dict], bool] | None = None,
                  lines: list[str] | None = None) -> Section:
    """``items`` as one table: a row per item, a column per :class:`Column`, units in the headings.

    Columns whose every cell is empty are left out, so fields another release adds (``margin_band``)
    show up when present and take no room when not.
    """
    cells = []
    for item in items:
        row = []
        for column in columns:
            if column.text is not None:
                row.append(column.text(item))
            else:
                row.append(number(value_at(item, column.key), column.figures or digits))
        cells.append(row)
    keep = [i for i in range(len(columns)) if any(row[i] not in ("", "-") for row in cells)]
    chosen = [columns[i] for i in keep]
    headings = [c.heading + (f" [{pretty_unit(units[c.unit_key])}]" if units.get(c.unit_key) else "")
                for c in chosen]
    rows = [[row[i] for i in keep] for row in cells]
    numeric = [c.text is None and all(_numeric(row[j]) for row in rows) for j, c in enumerate(chosen)]
    table = Table(headings, rows, numeric, [bool(marked and marked(item)) for item in items],
                  _widths(headings, rows, numeric))
    return Section(heading, lines=list(lines or []), table=table)


LINE_CHARACTERS = 125  # characters of table text across the printed width (A4, 7 pt, with cell padding)


def _widths(headings: list[str], rows: list[list[str]], numeric: list[bool]) -> list[float]:
    """Share of the width of each column: numbers and short words never wrap; long text shares what is left."""
    def length(text: str) -> float:  # capitals are wider
        return len(text) + 0.35 * sum(1 for c in text if c.isupper())

    need = [max([length(row[j]) for row in rows] + [1.15 * max(length(word) for word in heading.split()) + 1,
                                                      length(heading) / 3, 5.0]) + 1.5
            for j, heading in enumerate(headings)]
    fixed = sum(n for n, number_column in zip(need, numeric) if number_column or n <= 14)
    text = sum(n for n, number_column in zip(need, numeric) if not number_column and n > 14)
    if text and fixed + text > LINE_CHARACTERS:  # shrink the long text columns (they wrap), not the numbers
        squeeze = max(LINE_CHARACTERS - fixed, 14 * sum(1 for n, c in zip(need, numeric) if not c and n > 14)) / text
        need = [n * squeeze if not number_column and n > 14 else n for n, number_column in zip(need, numeric)]
    elif sum(need) < LINE_CHARACTERS:  # room to spare: shared alike, so headings of short numbers wrap less
        need = [n + (LINE_CHARACTERS - sum(need)) / len(need) for n in need]
    total = sum(need) or 1.0
    return [n / total for n in need]


def _numeric(text: str) -> bool:
    """A cell written by :func:`number` (``"-"`` for none): right-aligned."""
    if text == "-":
        return True
    try:
        float(text.replace(",", ""))
    except ValueError:
        return False
    return True


def table_page(payload: dict | None, heading: str, *, summary: list[Row], tables: list[Section],
               notes: list[Section] | None = None, verdict: str | None = None, adequate: bool | None = None,
               chart: Chart | None = None) -> Page:
    """One report page of a ranked or gridded answer: a summary, its tables, notes, the answer's warnings.

    Screening, jacket sizing and operating window build their pages here: the summary and the tables,
    then the chart (on the first printed page with them when it fits), then the notes and warnings.
    A continuation page (``payload`` None) leaves the warnings to the first page.
    """
    after = list(notes or [])
    if payload is not None:
        warnings = [w.get("message", "") for w in payload.get("warnings") or [] if isinstance(w, dict)]
        after.append(Section("Warnings", lines=warnings or ["none"]))
    return Page(heading, ([Section("Summary", summary)] if summary else []) + list(tables), verdict, adequate, chart,
                after)


def build(title: str, resource: str, body: dict, payload: dict, pages: list[Page], units_note: str = "") -> Report:
    """The frame every report shares: inputs as given, records used, cautions, version, date, request hash."""
    return Report(title=title, resource=resource, pages=pages, inputs=input_rows(body),
                  records=_record_rows(payload), cautions=list(payload.get("cautions") or []),
                  request_hash=request_hash(body), units_note=units_note,
                  created=datetime.datetime.now(datetime.timezone.utc).strftime("%Y-%m-%d %H:%M UTC"))


def chart(draw, payload: dict, units: dict, caption: str = "") -> Chart:
    """Draw a resource's chart once as SVG (HTML) and once as PNG (PDF)."""
    return Chart(draw(payload, "svg", units), draw(payload, "png", units), caption)


# ---------------------------------------------------------------- writers

def to_html(report: Report) -> str:
    def data_uri(svg: bytes) -> str:
        return "data:image/svg+xml;base64," + base64.b64encode(svg).decode("ascii")

    return render_template("report.html", report=report, footer=FOOTER, data_uri=data_uri)


def _font_directory() -> str:
    import matplotlib

    return os.path.join(matplotlib.get_data_path(), "fonts", "ttf")


def to_pdf(report: Report) -> bytes:
    """The same report as PDF (A4), drawn with fpdf2; one page per report page, inputs last."""
    from fpdf import FPDF
    from fpdf.fonts import FontFace

    class _Document(FPDF):
        def footer(self):
            self.set_y(-14)
            self.set_font("body", size=6.5)
            self.set_text_color(90, 90, 90)
            self.multi_cell(0, 3, f"{FOOTER}  coolmargin {report.version}, {report.created}, request "
                                  f"{report.request_hash[:16]}, page {self.page_no()}/{{nb}}")
            self.set_text_color(0, 0, 0)

    pdf = _Document(format="A4")
    pdf.set_margins(14, 12, 14)
    pdf.set_auto_page_break(True, margin=18)
    fonts = _font_directory()
    pdf.add_font("body", "", os.path.join(fonts, "DejaVuSans.ttf"))
    pdf.add_font("body", "B", os.path.join(fonts, "DejaVuSans-Bold.ttf"))
    pdf.set_title(f"{report.title} - coolmargin")
    pdf.set_creator(f"coolmargin {report.version}")

    def header(heading: str) -> None:
        pdf.add_page()
        pdf.set_font("body", "B", 12)
        pdf.cell(0, 6, report.title, new_x="LMARGIN", new_y="NEXT")
        pdf.set_font("body", "", 7)
        pdf.cell(0, 3.5, f"{report.resource}   coolmargin {report.version}   {report.created}",
                 new_x="LMARGIN", new_y="NEXT")
        pdf.cell(0, 3.5, f"request SHA-256 {report.request_hash}", new_x="LMARGIN", new_y="NEXT")
        pdf.set_font("body", "B", 10.5)
        pdf.ln(1)
        pdf.cell(0, 6, heading, new_x="LMARGIN", new_y="NEXT")

    def table(rows: list[Row], widths: tuple = (60, 22, 26, 74)) -> None:
        pdf.set_font("body", "", 7.5)
        pdf.set_draw_color(205, 213, 219)
        pdf.set_line_width(0.15)
        with pdf.table(col_widths=widths, first_row_as_headings=False, line_height=3.6, cell_fill_mode="NONE",
                       borders_layout="HORIZONTAL_LINES", padding=0.6,
                       text_align=("LEFT", "RIGHT", "LEFT", "LEFT")[:len(widths)]) as grid:
            for row in rows:
                grid.row([row.label, row.value, row.unit, row.note][:len(widths)])

    def grid(content: Table) -> None:
        pdf.set_font("body", "", 6.8)
        pdf.set_draw_color(205, 213, 219)
        pdf.set_line_width(0.15)
        width = pdf.w - pdf.l_margin - pdf.r_margin
        align = tuple("RIGHT" if n else "LEFT" for n in content.numeric)
        with pdf.table(col_widths=tuple(w * width for w in content.widths), width=width, line_height=3.2,
                       cell_fill_mode="NONE", borders_layout="HORIZONTAL_LINES", padding=0.5, text_align=align,
                       headings_style=FontFace(emphasis="BOLD", fill_color=(238, 243, 246))) as drawn:
            drawn.row(content.headings)
            for cells, marked in zip(content.rows, content.marked):
                drawn.row(cells, style=FontFace(emphasis="BOLD") if marked else None)

    fills = {True: (226, 240, 222), False: (248, 222, 218), None: (236, 239, 242)}
    for page in report.pages:
        header(page.heading)
        if page.verdict:
            pdf.set_font("body", "B", 10)
            pdf.set_fill_color(*fills[page.adequate])
            pdf.multi_cell(0, 6, page.verdict, fill=True, new_x="LMARGIN", new_y="NEXT")
            pdf.set_fill_color(255, 255, 255)
        def sections(chosen: list[Section]) -> None:
            for section in chosen:
                pdf.set_font("body", "B", 8.5)
                pdf.ln(1)
                pdf.cell(0, 4.5, section.heading, new_x="LMARGIN", new_y="NEXT")
                if section.rows:
                    table(section.rows)
                if section.table is not None:
                    grid(section.table)
                pdf.set_font("body", "", 7.5)
                for line in section.lines:
                    pdf.multi_cell(0, 3.6, "- " + line, new_x="LMARGIN", new_y="NEXT")

        sections(page.sections)
        if page.chart is not None:
            room = pdf.h - 20 - pdf.get_y()
            if room < 70:  # too little room left for a readable chart: it gets the next page
                header(page.heading + " (chart)")
                room = pdf.h - 20 - pdf.get_y()
            pdf.ln(1)
            pdf.image(io.BytesIO(page.chart.png), w=min(175, room * 7.5 / 5.6), keep_aspect_ratio=True)
        sections(page.after)
    header("Inputs as given, records used and cautions")
    if report.units_note:
        pdf.set_font("body", "", 7.5)
        pdf.multi_cell(0, 3.6, report.units_note, new_x="LMARGIN", new_y="NEXT")
    if report.records:
        table(report.records)
    pdf.set_font("body", "B", 8.5)
    pdf.cell(0, 5, "Inputs as given", new_x="LMARGIN", new_y="NEXT")
    table(report.inputs, (60, 122))
    pdf.set_font("body", "B", 8.5)
    pdf.cell(0, 5, "Cautions", new_x="LMARGIN", new_y="NEXT")
    pdf.set_font("body", "", 7.5)
    for caution in report.cautions:
        pdf.multi_cell(0, 3.6, "- " + caution, new_x="LMARGIN", new_y="NEXT")
    return bytes(pdf.output())


def render(report: Report, fmt: str) -> tuple[bytes, str]:
    """(body, media type) of the report in ``fmt`` (html or pdf)."""
    if fmt == "pdf":
        return to_pdf(report), FORMATS["pdf"]
    return to_html(report).encode("utf-8"), FORMATS["html"]


def response(report: Report, fmt: str, name: str, status: int = 200) -> Response:
    """The report as an HTTP answer, named for saving: ``coolmargin-<name>-<request hash>.<fmt>``."""
    body, media = render(report, fmt)
    answer = Response(body, status=status, mimetype=media)
    answer.headers["Content-Disposition"] = f'inline; filename="coolmargin-{name}-{report.request_hash[:12]}.{fmt}"'
    return answer
