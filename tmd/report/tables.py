"""The report's tables: every number is a results.json value, traceable by its key path.

A :class:`Cell` holds the value read from the results dictionary, its key
path (``"design.mass_kg"``, ``"sweep.3.peak_acceleration_m_s2"``) and a
display scale (1e-3 for kN, 1000/g for milli-g, 1 +/- band for a re-tuning
limit); the printed text is ``format_value(value * scale)``. The HTML writes
path, full value and scale as data attributes; the CSV writes the scaled value
at full precision.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass, field

from tmd.constants import STANDARD_GRAVITY

SIGNIFICANT = 4
MILLI_G = 1000.0 / STANDARD_GRAVITY
UNIT_SUFFIXES = (  # longest first: the key's unit suffix and how it is printed
    ("_n_s_per_m", "N·s/m"), ("_n_per_m", "N/m"), ("_n2_per_hz", "N²/Hz"), ("_m_s2", "m/s²"),
    ("_m_s", "m/s"), ("_kg_m", "kg/m"), ("_m2", "m²"), ("_rad", "rad"), ("_hz", "Hz"),
    ("_kg", "kg"), ("_years", "years"), ("_n", "N"), ("_m", "m"), ("_s", "s"), ("_j", "J"),
)
LABELS = {
    "sigma_acceleration_m_s2": "rms acceleration",
    "peak_acceleration_m_s2": "peak acceleration",
    "sigma_displacement_m": "rms displacement at the damper level",
    "sigma_stroke_m": "rms stroke",
    "peak_stroke_m": "peak stroke (one-sided)",
    "peak_damper_force_n": "peak damper force on the structure",
    "upcrossing_hz": "up-crossing frequency",
    "mass_ratio": "mass ratio m_d / M*",
    "frequency_ratio": "frequency ratio f_d / f_s",
    "damping_ratio": "damping ratio",
    "stiffness_n_per_m": "spring stiffness",
    "damping_n_s_per_m": "dashpot coefficient",
    "effective_damping_ratio": "effective damping ratio of the building",
    "added_damping_ratio": "added damping ratio",
    "meets_target": "meets the target",
    "peak_acceleration_band_max_m_s2": "worst peak acceleration across the band",
    "structure_frequency_factor": "structure frequency factor",
}
# Labels of a damper's own block (design, robust design): its damping ratio is
# referred to its own frequency, the building's to the building's.
DAMPER_LABELS = {
    "damping_ratio": "damper damping ratio ζ_d (referred to the damper frequency f_d)",
    "frequency_hz": "damper frequency f_d",
    "mass_kg": "damper mass m_d",
}


@dataclass(frozen=True)
class Cell:
    """One table cell: a results value (with its key path) or a plain label.

    Parameters
    ----------
    value : object
        The value as in results.json (SI units), or the label's text.
    key : str, optional
        The value's key path in results.json (e.g. ``"design.mass_kg"``);
        None for a plain label.
    scale : float
        Factor applied for display (e.g. 1e-3 for kg shown in t) [-]; the
        HTML keeps the unscaled value beside it.
    """

    value: object
    key: str | None = None
    scale: float = 1.0

    @property
    def text(self) -> str:
        """The printed text: the (scaled) value formatted, or the label."""
        if self.key is None or not _is_number(self.value) or self.scale == 1.0:
            return format_value(self.value)
        return format_value(self.value * self.scale)


@dataclass(frozen=True)
class Table:
    """A titled table: ``header`` cells, then rows of cells (lists of cells allowed in a row).

    Parameters
    ----------
    name : str
        Short identifier (the table's HTML id and CSV file name).
    title : str
        The heading shown above it.
    header : list of Cell
        The column headings, units in brackets.
    rows : list of list of Cell
        The rows.
    note : str
        A note printed below the table.
    extra : dict
        Further data a renderer may use.
    """

    name: str
    title: str
    header: list[Cell]
    rows: list[list[Cell]]
    note: str = ""
    extra: dict = field(default_factory=dict)


def _is_number(value) -> bool:
    return isinstance(value, int | float) and not isinstance(value, bool)


def format_value(value, digits: int = SIGNIFICANT) -> str:
    """Return the printed form of a results value: numbers to ``digits`` significant figures.

    Fixed notation (thousands separated by commas) for 1e-3 <= |x| < 1e9,
    otherwise scientific; integers and integral floats without decimals;
    booleans as yes / no.

    Parameters
    ----------
    value : object
        A results value (number, bool, str or None).
    digits : int
        Significant figures of a non-integral number.

    Returns
    -------
    str
        The text; a dash for None and non-finite numbers.
    """
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return f"{value:,d}"
    if isinstance(value, float):
        if not math.isfinite(value):
            return "—"  # written as null in results.json
        if value == 0:
            return "0"
        if value.is_integer() and abs(value) < 1e9:
            return f"{value:,.0f}"  # return periods, durations: 10, not 10.00
        exponent = math.floor(math.log10(abs(value)))
        if -3 <= exponent < 9:
            decimals = digits - 1 - exponent
            if decimals >= 0:
                return f"{value:,.{decimals}f}"
            return f"{round(value, decimals):,.0f}"
        return f"{value:.{digits - 1}e}"
    return str(value)


def label_and_unit(key: str, scale_unit: str | None = None,
                   labels: dict | None = None) -> tuple[str, str]:
    """Readable quantity name and unit of a results key (the unit from its suffix).

    Parameters
    ----------
    key : str
        A results.json key, ending with its SI unit suffix (or dimensionless).
    scale_unit : str, optional
        The unit to print instead (for a scaled display, such as milli-g).
    labels : dict, optional
        Labels that take precedence over the general ones (a block's own wording).

    Returns
    -------
    label, unit : str
    """
    unit = ""
    stem = key
    for suffix, printed in UNIT_SUFFIXES:
        if key.endswith(suffix):
            unit, stem = printed, key[: -len(suffix)]
            break
    label = (labels or {}).get(key) or LABELS.get(key, stem.replace("_", " "))
    return label, scale_unit or unit


def leaf_label(dotted: str, key: str, labels: dict | None = None) -> tuple[str, str]:
    """Label and unit of a flattened key path, its parents named in front.

    An item of a list of numbers is named by its list once: the first item's
    row carries the label ("wind · return periods"), the rows of the further
    items continue it with an empty label (an index printed in a label would be
    a number without a results key).

    Parameters
    ----------
    dotted : str
        The key path below the table's block (``"wind.return_periods_years.1"``).
    key : str
        The leaf's key (for a list item: the list's key).
    labels : dict, optional
        Labels that take precedence over the general ones.

    Returns
    -------
    label, unit : str
    """
    parts = dotted.split(".") if dotted else []
    label, unit = label_and_unit(key, labels=labels)
    item = None
    if parts and parts[-1].isdigit() and len(parts) >= 2 and parts[-2] == key:
        item = int(parts[-1])
        parts = parts[:-1]
    if item:  # a further item of a list: its row continues the first one's label
        return "", unit
    parent = path_label(".".join(parts[:-1]))
    return (f"{parent} · {label}" if parent else label), unit


def path_label(dotted: str) -> str:
    """Return a key path as words; list indices are dropped (an index would be untraced).

    Parameters
    ----------
    dotted : str
        A results.json key path such as ``"wind.return_periods_years.1"``.

    Returns
    -------
    str
        The parts in words joined by " · ", without list indices.
    """
    parts = [p.replace("_", " ") for p in dotted.split(".") if not p.isdigit()]
    return " · ".join(parts)


def scalar(value) -> bool:
    """Tell whether a results value is a scalar (None, bool, number or str).

    Parameters
    ----------
    value : object
        A results value.

    Returns
    -------
    bool
        True for None, bool, int, float or str.
    """
    return value is None or isinstance(value, bool | int | float | str)


def flatten(block: dict, path: str) -> list[tuple[str, str, object]]:
    """Return (key path, leaf key, value) for every scalar in a nested dict (lists by index).

    Parameters
    ----------
    block : dict
        A results.json block.
    path : str
        The block's own key path, prefixed to every entry ('' at the top).

    Returns
    -------
    list of (str, str, object)
        Every scalar leaf in order, with its dotted path and its own key.
    """
    out = []
    for key, value in block.items():
        here = f"{path}.{key}" if path else str(key)
        if isinstance(value, dict):
            out += flatten(value, here)
        elif isinstance(value, list) and all(scalar(v) for v in value):
            out += [(f"{here}.{i}", str(key), v) for i, v in enumerate(value)]
        elif isinstance(value, list):
            for i, item in enumerate(value):
                if isinstance(item, dict):
                    out += flatten(item, f"{here}.{i}")
        else:
            out.append((here, str(key), value))
    return out


def key_value_table(name: str, title: str, block: dict, path: str, *, keys=None,
                    note: str = "", milli_g: bool = True, labels: dict | None = None) -> Table:
    """Quantity / value / unit rows for the scalars of ``block`` (in ``keys`` order if given).

    Accelerations get a second row in milli-g when ``milli_g``.

    Parameters
    ----------
    name, title : str
        Table file name and heading.
    block : dict
        The results block (nested dicts and lists are flattened).
    path : str
        Key path of ``block`` in results.json.
    keys : sequence of str, optional
        Top-level keys to show, in this order (default: every scalar, flattened).
    note : str
        Text under the table.
    milli_g : bool
        Add a milli-g row under every acceleration [m/s^2].
    labels : dict, optional
        Labels that take precedence over the general ones.

    Returns
    -------
    Table
    """
    rows = []
    items = flatten(block, path) if keys is None else [
        (f"{path}.{k}", k, block[k]) for k in keys if k in block]
    for key_path, key, value in items:
        shown_path = key_path[len(path) + 1:] if path else key_path
        label, unit = leaf_label(shown_path, key, labels)
        rows.append([Cell(label), Cell(value, key_path), Cell(unit)])
        if milli_g and unit == "m/s²" and _is_number(value):
            rows.append([Cell(f"{label} (milli-g)"), Cell(value, key_path, MILLI_G),
                         Cell("milli-g")])
    return Table(name, title, [Cell("quantity"), Cell("value"), Cell("unit")], rows, note)


def record_table(name: str, title: str, records: list[dict], path: str, *, columns=None,
                 note: str = "") -> Table:
    """Return a table of one row per record (e.g. sweep points, options).

    Parameters
    ----------
    name : str
        The table's identifier.
    title : str
        Its heading.
    records : list of dict
        The records, e.g. a results.json ``sweep`` list.
    path : str
        The records' key path in results.json (cells carry ``path.i.key``).
    columns : list of str, optional
        The keys to show; by default every scalar key of the records.
    note : str
        A note printed below the table.

    Returns
    -------
    Table
        Headings with the units of the keys' suffixes; one row per record.
    """
    if columns is None:
        columns = []
        for record in records:
            columns += [k for k, v in record.items() if scalar(v) and k not in columns]
    header = []
    for key in columns:
        label, unit = label_and_unit(key)
        header.append(Cell(f"{label} [{unit}]" if unit else label))
    rows = [[Cell(record[key], f"{path}.{i}.{key}") if key in record else Cell("")
             for key in columns] for i, record in enumerate(records)]
    return Table(name, title, header, rows, note)


def by_period_table(name: str, title: str, entries: list[dict], path: str, *,
                    note: str = "") -> Table:
    """Quantities down, return periods across, for a list of per-return-period records.

    Parameters
    ----------
    name, title : str
        Table file name and heading.
    entries : list of dict
        Per-return-period records, each with ``return_period_years`` [years].
    path : str
        Key path of ``entries`` in results.json.
    note : str
        Text under the table.

    Returns
    -------
    Table
    """
    return across_table(name, title + " (return period [years] across)", entries, path,
                        column_key="return_period_years", note=note)


def across_table(name: str, title: str, entries: list[dict], path: str, *, column_key: str,
                 skip: tuple[str, ...] = (), note: str = "") -> Table:
    """Quantities down, one column per record (headed by its ``column_key`` value).

    A narrow, tall table: it fits a printed page however many quantities the
    records hold, where one row per record with a column per quantity would not.

    Parameters
    ----------
    name, title : str
        Table file name and heading.
    entries : list of dict
        The records (nested dicts are flattened to dotted key paths).
    path : str
        Key path of ``entries`` in results.json.
    column_key : str
        The key whose value heads each record's column.
    skip : tuple of str
        Top-level keys left out (shown in tables of their own).
    note : str
        Text under the table.

    Returns
    -------
    Table
    """
    header = [Cell("quantity"), Cell("unit")] + [
        Cell(e.get(column_key), f"{path}.{i}.{column_key}") for i, e in enumerate(entries)]
    leaves: list[str] = []
    for entry in entries:
        shown = {k: v for k, v in entry.items() if k not in skip}
        leaves += [p for p, _, _ in flatten(shown, "") if p not in leaves and p != column_key]
    rows = []
    for leaf in leaves:
        parts = leaf.split(".")
        key = parts[-2] if parts[-1].isdigit() and len(parts) >= 2 else parts[-1]
        label, unit = leaf_label(leaf, key)
        cells = [Cell(label), Cell(unit)]
        for i, entry in enumerate(entries):
            value = _lookup(entry, leaf)
            # a quantity this record does not have is left blank, not shown as a null
            cells.append(Cell("") if value is _ABSENT else Cell(value, f"{path}.{i}.{leaf}"))
        rows.append(cells)
    return Table(name, title, header, rows, note)


_ABSENT = object()


def _lookup(block, dotted: str):
    for part in dotted.split("."):
        if isinstance(block, list):
            index = int(part)
            block = block[index] if index < len(block) else _ABSENT
        elif isinstance(block, dict):
            block = block.get(part, _ABSENT)
        else:
            return _ABSENT
    return block


def retuning_table(design: dict, frequency_band: float, band_source: str) -> Table:
    """Return the re-tuning range to specify: damper frequency and spring over f_s (1 +/- band).

    Parameters
    ----------
    design : dict
        The results.json ``design`` block (``frequency_hz``,
        ``stiffness_n_per_m``).
    frequency_band : float
        Half-width b of the band of structure frequency factors [-].
    band_source : str
        Where the band comes from, in words, for the note.

    Returns
    -------
    Table
        Lowest, designed and highest damper frequency [Hz] and spring [N/m].

    Notes
    -----
    The optimal frequency ratio f_d / f_s hardly depends on where f_s lies, so
    a damper re-tuned to a building of frequency s f_s needs f_d -> s f_d and,
    with its mass fixed, k_d = m_d (2 pi f_d)^2 -> s^2 k_d.
    """
    lo, hi = 1.0 - frequency_band, 1.0 + frequency_band
    f, k = "design.frequency_hz", "design.stiffness_n_per_m"
    rows = [
        [Cell("damper frequency"), Cell(design["frequency_hz"], f, lo),
         Cell(design["frequency_hz"], f), Cell(design["frequency_hz"], f, hi), Cell("Hz")],
        [Cell("spring stiffness"), Cell(design["stiffness_n_per_m"], k, lo * lo),
         Cell(design["stiffness_n_per_m"], k), Cell(design["stiffness_n_per_m"], k, hi * hi),
         Cell("N/m")],
    ]
    header = [Cell("adjustment"), Cell("lowest"), Cell("as designed"), Cell("highest"),
              Cell("unit")]
    note = (f"Range to specify so the damper can be re-tuned to the measured building frequency "
            f"anywhere within ±{100 * frequency_band:.3g} % of nominal ({band_source}): damper "
            "frequency scaled by the building's frequency factor s, spring by s² at fixed mass.")
    return Table("retuning", "Re-tuning adjustment range", header, rows, note)


def csv_bytes(table: Table) -> bytes:
    """Return the table as CSV: header texts, then each cell's scaled value at full precision.

    Spreadsheet programs guess the encoding of a CSV without a byte-order mark
    and garble non-ASCII text, so units are written as the ASCII suffixes of
    the results.json keys (``m_s2``, ``n_s_per_m``) and the project's own
    labels are kept to ASCII. Text from the case (a name with an accent) can
    still be non-ASCII; such a file is written as UTF-8 with a byte-order mark.

    Parameters
    ----------
    table : Table
        The table.

    Returns
    -------
    bytes
        The CSV file's content, ASCII or UTF-8 with a byte-order mark.
    """
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow([_ascii(c.text) for c in table.header])
    for row in table.rows:
        writer.writerow([_ascii(_raw(c)) if c.key is None else _raw(c) for c in row])
    text = buffer.getvalue()
    return text.encode("utf-8-sig" if not text.isascii() else "ascii")


_CSV_UNITS = {printed: suffix[1:] for suffix, printed in UNIT_SUFFIXES}
_CSV_SYMBOLS = {"·": "-", "±": "+/-", "²": "^2", "³": "^3", "×": "x", "—": "-", "–": "-",
                "≤": "<=", "≥": ">=", "µ": "u", "…": "...", "°": " deg", "≈": "~",
                "ζ": "zeta", "μ": "mu", "ω": "omega", "φ": "phi", "δ": "delta", "σ": "sigma",
                "β": "beta", "ν": "nu", "ρ": "rho", "Δ": "Delta"}


def _ascii(text: str) -> str:
    """Return a label or unit for a CSV: units as results.json suffixes, symbols spelt in ASCII."""
    if text in _CSV_UNITS:
        return _CSV_UNITS[text]
    if text.endswith("]") and "[" in text:
        label, _, unit = text[:-1].rpartition("[")
        if unit in _CSV_UNITS:
            text = f"{label}[{_CSV_UNITS[unit]}]"
    for symbol, spelt in _CSV_SYMBOLS.items():
        text = text.replace(symbol, spelt)
    return text


def _raw(cell: Cell) -> str:
    if cell.key is None:
        return cell.text
    if cell.value is None:
        return ""
    if isinstance(cell.value, bool):
        return "true" if cell.value else "false"
    if _is_number(cell.value):
        return repr(cell.value * cell.scale) if cell.scale != 1.0 else repr(cell.value)
    return str(cell.value)
