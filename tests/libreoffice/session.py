"""Drive a headless LibreOffice from the Python that LibreOffice itself runs (/usr/bin/python3).

Run as a script by the tests and the benchmark: ``python3 session.py REQUEST.json`` prints one
JSON object.  The request names an isolated user profile and shared-extension cache (the
extension is installed there with ``unopkg add --shared``), and a list of jobs:

``{"functions": [NAME, ...]}``: what the Function Wizard lists for them.  ``{"open": PATH}``: load the workbook hidden, recalculate everything (``calculateAll``; not with
``"recalculate": false``: the cells then show what the load left, computed as they are read) and
report every formula cell (formula, value or text, error code) and the load and recalculation
times (wall, and the CPU time soffice spent: ``load_cpu_seconds``; ``load_started`` and
``load_finished``, time.perf_counter, to place the extension's timing marks); ``"report": false`` leaves
the cells out.  ``{"recalc": {"inputs": [[...], ...], "formulas": {"E": [...], ...}}, "repeat":
3}``: a new sheet with the inputs from A1 and each column of formulas (API grammar) from row 1;
reports, per column alone, the best of ``repeat`` full recalculations (each sample repeated
to at least 20,000 cells) (wall and soffice CPU) and
the first column's last value.  ``{"type": {"Sheet1": {"A1": 1.5, "B1": "=F(A1)"}}, "arrays": {"Sheet1": {"A9:J20":
"=F(..)"}}, "formats": {"Sheet1": {"B1": "0.00"}}}``: type cells (and number formats) into a
new spreadsheet through the API and report them likewise.  Every reported cell also has
``shown``, the text the cell displays.
"""

import json
import os
import signal
import socket
import subprocess
import sys
import time

import uno
from com.sun.star.beans import PropertyValue
from com.sun.star.connection import NoConnectException

FORMULA_CELLS = 16  # com.sun.star.sheet.CellFlags.FORMULA
RESULT_VALUE, RESULT_STRING, RESULT_ERROR = 1, 2, 4  # com.sun.star.sheet.FormulaResult


def _props(**values):
    out = []
    for name, value in values.items():
        p = PropertyValue()
        p.Name, p.Value = name, value
        out.append(p)
    return tuple(out)


def _url(path):
    return uno.systemPathToFileUrl(os.path.abspath(path))


def _free_port():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


class Session:
    def __init__(self, soffice, profile, shared_cache):
        self.port = _free_port()
        self.env_args = [f"-env:UserInstallation={_url(profile)}"]
        if shared_cache:
            self.env_args.append(f"-env:UNO_SHARED_PACKAGES_CACHE={_url(shared_cache)}")
        self.log = open(os.path.join(profile + "-soffice.log"), "ab")
        self.process = subprocess.Popen(
            [soffice, *self.env_args, "--headless", "--invisible", "--norestore", "--nologo",
             "--nodefault", f"--accept=socket,host=127.0.0.1,port={self.port};urp;"],
            stdin=subprocess.DEVNULL, stdout=self.log, stderr=subprocess.STDOUT,
            start_new_session=True)  # soffice is a wrapper script: end its whole group at close
        local = uno.getComponentContext()
        resolver = local.ServiceManager.createInstanceWithContext(
            "com.sun.star.bridge.UnoUrlResolver", local)
        deadline = time.time() + 60
        while True:
            try:
                self.ctx = resolver.resolve(
                    f"uno:socket,host=127.0.0.1,port={self.port};urp;StarOffice.ComponentContext")
                break
            except NoConnectException:
                if self.process.poll() is not None or time.time() > deadline:
                    raise RuntimeError(f"soffice did not start (see {self.log.name})")
                time.sleep(0.2)
        self.desktop = self.ctx.ServiceManager.createInstanceWithContext(
            "com.sun.star.frame.Desktop", self.ctx)

    def cpu(self):
        """CPU seconds (user + system) of every process of soffice's group (Linux /proc)."""
        total = 0
        for entry in os.listdir("/proc"):
            if not entry.isdigit():
                continue
            try:
                with open(f"/proc/{entry}/stat", encoding="ascii") as file:
                    fields = file.read().rsplit(")", 1)[1].split()
            except OSError:
                continue
            if int(fields[2]) == self.process.pid:  # pgrp
                total += int(fields[11]) + int(fields[12])
        return total / os.sysconf("SC_CLK_TCK")

    def close(self):
        try:
            self.desktop.terminate()
        except Exception:
            pass
        try:
            self.process.wait(timeout=30)
        except subprocess.TimeoutExpired:
            pass
        try:  # soffice.bin outlives its wrapper when terminate was refused
            os.killpg(self.process.pid, signal.SIGKILL)
        except ProcessLookupError:
            pass
        self.process.wait()


def _column(index):
    name = ""
    index += 1
    while index:
        index, rest = divmod(index - 1, 26)
        name = chr(65 + rest) + name
    return name


def read_formula_cells(doc):
    """{sheet: {ref: {"formula", "value" | "text", "error"}}} for every formula cell."""
    out = {}
    sheets = doc.getSheets()
    for index in range(sheets.getCount()):
        sheet = sheets.getByIndex(index)
        cells = {}
        ranges = sheet.queryContentCells(FORMULA_CELLS)
        enumeration = ranges.getCells().createEnumeration()
        while enumeration.hasMoreElements():
            cell = enumeration.nextElement()
            address = cell.getCellAddress()
            ref = f"{_column(address.Column)}{address.Row + 1}"
            kind = cell.getPropertyValue("FormulaResultType2")
            item = {"formula": cell.getFormula(), "error": cell.getError(), "shown": cell.getString()}
            if item["error"]:
                item["text"] = cell.getString()
            elif kind == RESULT_STRING:
                item["text"] = cell.getString()
            else:
                item["value"] = cell.getValue()
            cells[ref] = item
        out[sheet.getName()] = cells
    return out


def open_and_recalculate(desktop, path, cpu=lambda: 0.0, report=True, recalculate=True):
    started, cpu_started = time.perf_counter(), cpu()
    doc = desktop.loadComponentFromURL(_url(path), "_blank", 0, _props(Hidden=True))
    if doc is None:  # the first load after an extension was installed can come back empty
        started, cpu_started = time.perf_counter(), cpu()
        doc = desktop.loadComponentFromURL(_url(path), "_blank", 0, _props(Hidden=True))
    loaded, cpu_loaded = time.perf_counter(), cpu()
    if recalculate:
        doc.calculateAll()
    calculated = time.perf_counter()
    try:
        return {"path": path, "load_seconds": loaded - started, "load_started": started,
                "load_finished": loaded,
                "load_cpu_seconds": cpu_loaded - cpu_started,
                "calculate_seconds": calculated - loaded,
                "sheets": read_formula_cells(doc) if report else {}}
    finally:
        doc.close(True)


def time_recalculation(desktop, inputs, formulas, repeat=3, cpu=lambda: 0.0):
    """Best full recalculation (wall, soffice CPU) of each column of formulas, one at a time."""
    doc = desktop.loadComponentFromURL("private:factory/scalc", "_blank", 0, _props(Hidden=True))
    try:
        sheet = doc.getSheets().getByIndex(0)
        width = len(inputs[0])
        sheet.getCellRangeByPosition(0, 0, width - 1, len(inputs) - 1).setDataArray(
            tuple(tuple(row) for row in inputs))
        out = {}
        for column, texts in formulas.items():
            index = ord(column) - ord("A")
            target = sheet.getCellRangeByPosition(index, 0, index, len(texts) - 1)
            target.setFormulaArray(tuple((t,) for t in texts))
            doc.calculateAll()  # first call: imports, caches
            walls, cpus = [], []
            inner = max(1, 20000 // len(texts))  # each sample long enough for the CPU clock's tick
            for _ in range(repeat):
                started, cpu_started = time.perf_counter(), cpu()
                for _ in range(inner):
                    doc.calculateAll()
                walls.append((time.perf_counter() - started) / inner)
                cpus.append((cpu() - cpu_started) / inner)
            last = sheet.getCellByPosition(index, len(texts) - 1)
            out[column] = {"wall": min(walls), "cpu": min(cpus), "last": last.getString()}
            target.clearContents(FORMULA_CELLS)
        return out
    finally:
        doc.close(True)


def _number_format(doc, code):
    from com.sun.star.lang import Locale

    formats = doc.getNumberFormats()
    key = formats.queryKey(code, Locale(), False)
    return key if key != -1 else formats.addNew(code, Locale())


def type_workbook(desktop, cells, arrays, formats=None, save=None, names=None, iterate=None):
    """``names``: {name: "$Sheet1.$A$1"} workbook names; ``iterate``: [count, delta] switches
    iterative calculation on (saved as calcPr iterate in .xlsx)."""
    doc = desktop.loadComponentFromURL("private:factory/scalc", "_blank", 0, _props(Hidden=True))
    try:
        if iterate:
            doc.setPropertyValue("IsIterationEnabled", True)
            doc.setPropertyValue("IterationCount", int(iterate[0]))
            doc.setPropertyValue("IterationEpsilon", float(iterate[1]))
        sheets = doc.getSheets()
        for name in list(cells) + [n for n in arrays if n not in cells]:
            if not sheets.hasByName(name):
                sheets.insertNewByName(name, sheets.getCount())
        if names:
            from com.sun.star.table import CellAddress
            for name, content in names.items():
                doc.NamedRanges.addNewByName(name, content, CellAddress(0, 0, 0), 0)
        for name, values in cells.items():
            sheet = sheets.getByName(name)
            for ref, value in values.items():
                cell = sheet.getCellRangeByName(ref)
                if isinstance(value, str) and value.startswith("="):
                    cell.setFormula(value)
                elif isinstance(value, str):
                    cell.setString(value)
                else:
                    cell.setValue(value)
        for name, formulas in arrays.items():
            sheet = sheets.getByName(name)
            for ref, formula in formulas.items():
                sheet.getCellRangeByName(ref).setArrayFormula(formula)
        for name, codes in (formats or {}).items():
            sheet = sheets.getByName(name)
            for ref, code in codes.items():
                sheet.getCellRangeByName(ref).setPropertyValue("NumberFormat", _number_format(doc, code))
        doc.calculateAll()
        result = {"sheets": read_formula_cells(doc)}
        if save:
            doc.storeToURL(_url(save), _props(FilterName="Calc MS Excel 2007 XML"))
        return result
    finally:
        doc.close(True)


def function_descriptions(ctx, names):
    """What the Function Wizard lists for the functions named (com.sun.star.sheet.FunctionDescriptions)."""
    descriptions = ctx.ServiceManager.createInstanceWithContext(
        "com.sun.star.sheet.FunctionDescriptions", ctx)
    found = {}
    for index in range(descriptions.getCount()):
        props = {p.Name: p.Value for p in descriptions.getByIndex(index)}
        if props["Name"] in names:
            found[props["Name"]] = {
                "description": props["Description"], "category": props["Category"],
                "arguments": [{"name": a.Name, "description": a.Description, "optional": a.IsOptional}
                              for a in props["Arguments"] or ()]}
    return {"functions": found}


def main(request_path):
    with open(request_path, encoding="utf-8") as file:
        request = json.load(file)
    session = Session(request.get("soffice", "soffice"), request["profile"], request.get("shared_cache"))
    results = []
    try:
        for job in request["jobs"]:
            try:
                if "functions" in job:
                    results.append(function_descriptions(session.ctx, set(job["functions"])))
                elif "open" in job:
                    results.append(open_and_recalculate(session.desktop, job["open"], session.cpu,
                                                        job.get("report", True), job.get("recalculate", True)))
                elif "recalc" in job:
                    results.append(time_recalculation(session.desktop, job["recalc"]["inputs"],
                                                      job["recalc"]["formulas"], job.get("repeat", 3),
                                                      session.cpu))
                else:
                    results.append(type_workbook(session.desktop, job.get("type", {}),
                                                 job.get("arrays", {}), job.get("formats"),
                                                 job.get("save"), job.get("names"),
                                                 job.get("iterate")))
            except Exception as error:  # reported per job; the session goes on
                results.append({"failed": f"{type(error).__name__}: {error}"})
    finally:
        session.close()
    json.dump({"results": results}, sys.stdout)


if __name__ == "__main__":
    main(sys.argv[1])
