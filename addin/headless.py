"""Evaluate a workbook without Excel: our cell functions and Excel's built-ins, via `formulas`.

Facts about formulas 1.3.4 this module relies on (each checked by tests/test_headless.py):
custom functions are registered in ``formulas.get_functions()`` before loading and wrapped with
``formulas.functions.wrap_func``; ranges arrive as object ndarrays with ``schedula.EMPTY`` for
blank cells; array formulas whose range is stored in the file evaluate (no dynamic spilling);
only workbook-scoped defined names evaluate; add-in prefixes on a function call
(``[1]!NAME(``, ``'x.xlam'!NAME(``, ``_xll.NAME(``, ``_xludf.NAME(``) break loading, so they are
removed for our function names on a temporary copy before loading.
"""

from __future__ import annotations

import os
import re
import shutil
import tempfile
import time
import zipfile
from dataclasses import dataclass, field

os.environ.setdefault("TQDM_DISABLE", "1")  # formulas shows a progress bar while compiling

from .cells import NoteRecorder, evaluate as evaluate_cell  # noqa: E402
from .registry import REGISTRY  # noqa: E402
from .safezip import guarded
from .xlsx import Book, BookError, read_book, split_ref  # noqa: E402

__all__ = ["register_functions", "rewrite_prefixes", "prefix_free_copy", "PREFIX_RE", "ANY_PREFIX_RE", "Evaluation", "evaluate_book", "parse_value",
           "resolve_target"]

_OUR_NAMES = "|".join(sorted((re.escape(f.name) for f in REGISTRY), key=len, reverse=True))
# The forms Excel writes an add-in function's call in, before its name: "[1]!", "'...xlam'!"
# (quotes escaped in the XML or not), "file.xlam!", "_xll." and "_xludf.".
_ADDIN_PREFIX = (r"(?:\[\d+\]!|'[^'<>]*?\.xla[m]?'!|&apos;[^<>]*?\.xla[m]?&apos;!|[\w.-]+\.xla[m]?!"
                 r"|_xll\.|_xludf\.)")
# An add-in prefix directly before one of our names and its opening parenthesis.
PREFIX_RE = re.compile(_ADDIN_PREFIX + r"(?=(?:" + _OUR_NAMES + r")\s*\()", re.I)
# An add-in prefix before any function name (the audit also strips unknown ones, which then
# load as #NAME? instead of stopping the load).
ANY_PREFIX_RE = re.compile(_ADDIN_PREFIX + r"(?=[A-Za-z_][\w.]*\s*\()", re.I)

_registered = False


def register_functions() -> None:
    """Register every registry function in formulas' function table (idempotent)."""
    global _registered
    if _registered:
        return
    import formulas
    from formulas.functions import wrap_func

    table = formulas.get_functions()
    for entry in REGISTRY:
        def cell_function(*args, _entry=entry):
            result = evaluate_cell(_entry, *args)
            if isinstance(result, list):
                import numpy as np
                return np.asarray(result, dtype=object)
            return result

        cell_function.__name__ = entry.name
        table[entry.name] = wrap_func(cell_function)
    _registered = True


def rewrite_prefixes(xml: bytes, pattern: re.Pattern = PREFIX_RE) -> bytes:
    """Remove add-in prefixes (by default of our functions' calls) from a part's XML."""
    return pattern.sub("", xml.decode("utf-8")).encode("utf-8")


def prefix_free_copy(book: Book, directory: str, pattern: re.Pattern = PREFIX_RE) -> str | None:
    """Copy of the workbook in ``directory`` with the add-in prefixes that ``pattern`` finds
    removed from its sheets and names, or None when nothing needs it."""
    parts = [s.part for s in book.sheets] + ["xl/workbook.xml"]
    with zipfile.ZipFile(book.path) as source:
        changed = {}
        for part in parts:
            data = source.read(part)
            new = rewrite_prefixes(data, pattern)
            if new != data:
                changed[part] = new
        if not changed:
            return None
        target_path = os.path.join(directory, os.path.basename(book.path))
        with zipfile.ZipFile(target_path, "w") as target:
            for info in source.infolist():
                target.writestr(info, changed.get(info.filename, source.read(info)),
                                compress_type=info.compress_type)
    return target_path


def parse_value(text: str):
    """A --set value: number, TRUE/FALSE, or text."""
    stripped = text.strip()
    if stripped.upper() in ("TRUE", "FALSE"):
        return stripped.upper() == "TRUE"
    try:
        return float(stripped)
    except ValueError:
        return text


_SHEET_REF_RE = re.compile(r"^(?:'((?:[^']|'')+)'|([^!]+))!\$?([A-Za-z]{1,3})\$?(\d+)$")


def resolve_target(book: Book, target: str) -> tuple[str, str]:
    """(sheet name, "B3") for "Sheet!B3", "'My sheet'!$B$3" or a defined name of one cell."""
    m = _SHEET_REF_RE.match(target.strip())
    if m:
        sheet_name = (m.group(1) or "").replace("''", "'") or m.group(2)
        try:
            sheet = book.sheet(sheet_name)
        except KeyError:
            raise BookError(f"--set {target}: no sheet named {sheet_name!r}") from None
        return sheet.name, f"{m.group(3).upper()}{m.group(4)}"
    for name in book.names:
        if name.name.lower() == target.strip().lower() and not name.name.startswith("_xlnm."):
            inner = _SHEET_REF_RE.match(name.text.strip().lstrip("="))
            if not inner:
                raise BookError(f"--set {target}: the name refers to {name.text}, not one cell")
            return resolve_target(book, name.text.strip().lstrip("="))
    raise BookError(f"--set {target}: not a cell reference (Sheet!B3) or a defined name of the workbook")


@dataclass
class Evaluation:
    """Result of evaluating a workbook headlessly."""

    book: Book
    values: dict[str, dict[str, object]]       # sheet -> ref -> value (formula cells only)
    names: dict[str, object]                    # defined name -> value
    notes: list[tuple[str, str]]                # (cell "Sheet!B3" or "", message)
    load_seconds: float
    calc_seconds: float
    sets: dict[tuple[str, str], object] = field(default_factory=dict)
    engine_seconds: float = 0.0                 # importing the engine (CoolProp)

    def flat_values(self) -> dict[str, object]:
        return {f"{_quote(sheet)}!{ref}": value for sheet, cells in self.values.items()
                for ref, value in cells.items()}


def _quote(sheet: str) -> str:
    return f"'{sheet}'" if re.search(r"[^A-Za-z0-9_.]", sheet) or sheet[:1].isdigit() else sheet


_KEY_RE = re.compile(r"^'?\[(?P<book>[^\]]*)\](?P<sheet>.*?)'?!(?P<ref>[A-Z$0-9:]+)$")


def _plain(value):
    """A formulas value as a Python scalar: float, bool, str (errors as "#VALUE!"), None."""
    import numpy as np
    import schedula as sh

    if value is sh.EMPTY:
        return None
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        return float(value)
    return str(value)


def _data_node_keys(model) -> dict[tuple[str, str], str]:
    keys = {}
    for key in model.dsp.data_nodes:
        m = _KEY_RE.match(str(key))
        if m and ":" not in m.group("ref"):
            keys[(m.group("sheet").replace("''", "'").upper(), m.group("ref"))] = key
    return keys


def _track_cells(model, recorder: NoteRecorder, sheet_names: dict[str, str]) -> None:
    """Make each formula's function node tell the recorder which cell it is computing."""
    from formulas.cell import CellWrapper

    for node in model.dsp.function_nodes.values():
        function = node.get("function")
        if not isinstance(function, CellWrapper) or not node.get("outputs"):
            continue
        m = _KEY_RE.match(str(node["outputs"][0]))
        label = (f"{_quote(sheet_names.get(m.group('sheet').upper(), m.group('sheet')))}!"
                 f"{m.group('ref').split(':')[0]}") if m else str(node["outputs"][0])

        def tracked(*args, _function=function, _label=label, **kwargs):
            recorder.current = _label
            try:
                return _function(*args, **kwargs)
            finally:
                recorder.current = None

        node["function"] = tracked


def evaluate_book(path: str, sets: dict[str, str] | None = None) -> Evaluation:
    """Load and calculate ``path``; ``sets`` maps a cell ("Sheet!B3") or name to a new value."""
    book = read_book(path)
    targets = {}
    for target, text in (sets or {}).items():
        targets[resolve_target(book, target)] = parse_value(text) if isinstance(text, str) else text

    started = time.perf_counter()
    import stillair  # noqa: F401  (timed apart from the workbook)
    engine_loaded = time.perf_counter()
    import formulas
    import numpy as np

    register_functions()
    sheet_names = {s.name.upper(): s.name for s in book.sheets}
    with tempfile.TemporaryDirectory(prefix="stillair-calc-") as directory:
        load_path = prefix_free_copy(book, directory) or book.path
        try:
            # formulas computes formulas without references (literals only) while loading.
            with NoteRecorder() as load_recorder, guarded():  # no links followed, no network
                model = formulas.ExcelModel().loads(load_path).finish()
        except Exception as error:
            raise BookError(f"{path}: cannot evaluate this workbook ({type(error).__name__}: "
                            f"{' '.join(str(error).split())[:200]})") from None
    loaded = time.perf_counter()

    nodes = _data_node_keys(model)
    inputs = {}
    for (sheet, ref), value in targets.items():
        key = nodes.get((sheet.upper(), ref))
        if key is not None:
            inputs[key] = np.asarray([[value]], dtype=object)
    recorder = NoteRecorder()
    _track_cells(model, recorder, sheet_names)
    with recorder:
        solution = model.calculate(inputs=inputs)
    calculated = time.perf_counter()

    computed: dict[tuple[str, str], object] = {}
    names: dict[str, object] = {}
    for key, ranges in solution.items():
        m = _KEY_RE.match(str(key))
        if not m or not hasattr(ranges, "value"):
            continue
        sheet = sheet_names.get(m.group("sheet").replace("''", "'").upper())
        array = np.asarray(ranges.value, dtype=object)
        if sheet is None:
            continue
        first = m.group("ref").split(":")[0].replace("$", "")
        if not re.search(r"\d", first):  # a whole-column or whole-row range: its cells come singly
            continue
        row0, col0 = split_ref(first)
        from .xlsx import index_to_col
        for i, row in enumerate(array):
            for j, value in enumerate(row):
                computed[(sheet, f"{index_to_col(col0 + j)}{row0 + i}")] = _plain(value)

    values: dict[str, dict[str, object]] = {}
    notes: list[tuple[str, str]] = []
    for sheet in book.sheets:
        cells = values.setdefault(sheet.name, {})
        for ref in sheet.formula_refs():
            if (sheet.name, ref) in computed:
                cells[ref] = computed[(sheet.name, ref)]
    for name in book.names:
        if name.hidden or name.name.startswith("_xlnm."):
            continue
        label = name.name if name.sheet is None else f"{_quote(name.sheet)}!{name.name}"
        names[label] = _name_value(name, computed, sheet_names)
    if load_recorder.notes:
        with recorder:
            _replay_literal_formulas(book, recorder)
    for cell, message in recorder.notes:
        notes.append((cell or "", message))
    noted = {cell for cell, _ in notes}
    for sheet, cells in values.items():
        for ref, value in cells.items():
            label = f"{_quote(sheet)}!{ref}"
            if isinstance(value, str) and value.startswith("#") and label not in noted:
                notes.append((label, f"Excel error {value}"))
    return Evaluation(book, values, names, notes, loaded - engine_loaded, calculated - loaded,
                      sets=targets, engine_seconds=engine_loaded - started)


_HAS_REFERENCE = re.compile(r"!|\$?\b[A-Za-z]{1,3}\$?\d+\b|\b[A-Za-z_][\w.]*\b(?!\s*\()")
_OUR_CALL = re.compile(r"\b(?:" + _OUR_NAMES + r")\s*\(", re.I)


def _replay_literal_formulas(book: Book, recorder: NoteRecorder) -> None:
    """formulas computes formulas without references while loading, before cells can be told
    apart; compute those that call our functions again, one by one, to attribute their notes."""
    from formulas import Parser

    for sheet in book.sheets:
        for ref, cell in sheet.formulas.items():
            text = rewrite_prefixes((cell.formula or "").encode()).decode()
            bare = re.sub(r'"[^"]*"', '""', text)
            bare = re.sub(r"\d(?:\.\d*)?[Ee][+-]?\d+", "0", bare)
            if not _OUR_CALL.search(bare) or _HAS_REFERENCE.search(_OUR_CALL.sub("(", bare)):
                continue
            recorder.current = f"{_quote(sheet.name)}!{ref}"
            try:
                Parser().ast("=" + text)[1].compile()()
            except Exception:  # the value itself came from the real evaluation
                pass
            finally:
                recorder.current = None


def _name_value(name, computed, sheet_names):
    """A defined name's value when it refers to one cell or a range (list of rows)."""
    text = name.text.strip().lstrip("=")
    m = re.match(r"^(?:'((?:[^']|'')+)'|([^!]+))!(\$?[A-Za-z]{1,3}\$?\d+)(?::(\$?[A-Za-z]{1,3}\$?\d+))?$",
                 text)
    if not m:
        return None
    sheet = sheet_names.get(((m.group(1) or "").replace("''", "'") or m.group(2)).upper())
    first = m.group(3).replace("$", "")
    if m.group(4) is None:
        return computed.get((sheet, first))
    from .xlsx import expand_range
    r1, c1 = split_ref(first)
    r2, c2 = split_ref(m.group(4).replace("$", ""))
    refs = expand_range(f"{first}:{m.group(4).replace('$', '')}")
    width = c2 - c1 + 1
    cells = [computed.get((sheet, ref)) for ref in refs]
    return [cells[i:i + width] for i in range(0, len(cells), width)]
